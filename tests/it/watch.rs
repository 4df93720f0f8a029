//! `tandem watch` in a real browser: headless Chromium driven through the
//! DevTools protocol opens the served page; the calc is edited, broken and
//! mended, and the page follows each save by itself.

use std::io::{BufRead, BufReader, Read, Write};
use std::net::TcpStream;
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

use serde_json::{json, Value};
use tungstenite::{Message, WebSocket};

fn browser() -> Option<&'static str> {
    ["chromium", "chromium-browser", "google-chrome"]
        .into_iter()
        .find(|b| Command::new(b).arg("--version").output().is_ok())
}

/// A DevTools session on one page.
struct Page {
    ws: WebSocket<tungstenite::stream::MaybeTlsStream<TcpStream>>,
    session: String,
    next: u64,
}

impl Page {
    fn call(&mut self, method: &str, params: Value, session: bool) -> Value {
        self.next += 1;
        let mut msg = json!({"id": self.next, "method": method});
        msg["params"] = params;
        if session {
            msg["sessionId"] = json!(self.session);
        }
        self.ws
            .send(Message::Text(msg.to_string().into()))
            .expect("send");
        loop {
            let m = self.ws.read().expect("read");
            if let Message::Text(t) = m {
                let v: Value = serde_json::from_str(t.as_str()).unwrap_or(Value::Null);
                if v["id"] == self.next {
                    return v["result"].clone();
                }
            }
        }
    }

    fn eval(&mut self, js: &str) -> Value {
        let r = self.call(
            "Runtime.evaluate",
            json!({"expression": js, "returnByValue": true}),
            true,
        );
        r["result"]["value"].clone()
    }

    /// Poll `js` until it is true; how long it took.
    fn until(&mut self, js: &str, limit: Duration) -> Option<Duration> {
        let t0 = Instant::now();
        while t0.elapsed() < limit {
            if self.eval(js) == json!(true) {
                return Some(t0.elapsed());
            }
            std::thread::sleep(Duration::from_millis(5));
        }
        None
    }
}

struct Killed(Child);

impl Drop for Killed {
    fn drop(&mut self) {
        let _ = self.0.kill();
        let _ = self.0.wait();
    }
}

fn http_status(port: u16, path: &str) -> String {
    let mut s = TcpStream::connect(("127.0.0.1", port)).expect("connect");
    write!(
        s,
        "GET {path} HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n"
    )
    .expect("write");
    let mut text = String::new();
    let _ = s.read_to_string(&mut text);
    text.lines().next().unwrap_or_default().to_string()
}

#[test]
fn the_page_follows_every_save_in_a_real_browser() {
    let Some(chrome) = browser() else {
        eprintln!("skipped: no Chromium installed (.ci/run installs Debian's)");
        return;
    };
    let dir = tempfile::tempdir().expect("dir");
    let calc = dir.path().join("post.tandem");
    let good = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/filled_post.tandem"),
    )
    .expect("example");
    std::fs::write(&calc, &good).expect("write");
    let mut server = Command::new(env!("CARGO_BIN_EXE_tandem"))
        .args(["watch", "--port", "0"])
        .arg(&calc)
        .stderr(Stdio::piped())
        .spawn()
        .expect("watch");
    let mut err = BufReader::new(server.stderr.take().expect("stderr"));
    let mut line = String::new();
    err.read_line(&mut line).expect("the serving line");
    let server = Killed(server);
    let port: u16 = line
        .split("http://127.0.0.1:")
        .nth(1)
        .and_then(|r| r.split('/').next())
        .and_then(|p| p.parse().ok())
        .unwrap_or_else(|| panic!("no loopback address in {line:?}"));
    // only the two paths are served
    assert!(http_status(port, "/nothing-here").contains("404"));
    assert!(http_status(port, "/").contains("200"));

    let profile = tempfile::tempdir().expect("profile");
    let mut chromium = Command::new(chrome)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--remote-debugging-port=0",
        ])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .arg("about:blank")
        .stderr(Stdio::piped())
        .spawn()
        .expect("chromium");
    let mut cerr = BufReader::new(chromium.stderr.take().expect("stderr"));
    let _chromium = Killed(chromium);
    let mut ws_url = None;
    for _ in 0..200 {
        let mut l = String::new();
        if cerr.read_line(&mut l).unwrap_or(0) == 0 {
            break;
        }
        if let Some(i) = l.find("ws://") {
            ws_url = Some(l[i..].trim().to_string());
            break;
        }
    }
    let ws_url = ws_url.expect("DevTools listening");
    let (ws, _) = tungstenite::connect(ws_url.as_str()).expect("DevTools socket");
    let mut page = Page {
        ws,
        session: String::new(),
        next: 0,
    };
    let target = page.call(
        "Target.createTarget",
        json!({"url": format!("http://127.0.0.1:{port}/")}),
        false,
    );
    let attached = page.call(
        "Target.attachToTarget",
        json!({"targetId": target["targetId"], "flatten": true}),
        false,
    );
    page.session = attached["sessionId"].as_str().expect("session").to_string();
    let shows = |text: &str| {
        format!(
            "document.body && document.body.innerText.includes({})",
            json!(text)
        )
    };
    assert!(
        page.until(&shows("Column C-3"), Duration::from_secs(20))
            .is_some(),
        "the report did not load"
    );
    // a save: the page shows the new value by itself
    assert_eq!(page.eval(&shows("C-3 (revised)")), json!(false));
    std::fs::write(
        &calc,
        good.replacen("Column C-3:", "Column C-3 (revised):", 1),
    )
    .expect("save");
    let took = page
        .until(&shows("C-3 (revised)"), Duration::from_secs(10))
        .expect("the page followed the save");
    eprintln!("save to new page in the browser: {took:?}");
    // a half-typed file: the diagnostics in place of the stale report
    std::fs::write(
        &calc,
        good.replacen("node cap  at height", "node cap  at", 1),
    )
    .expect("save");
    assert!(
        page.until(
            "document.getElementById('trouble') !== null && document.getElementById('diagnostics').innerText.length > 0",
            Duration::from_secs(10)
        )
        .is_some(),
        "the errors were not shown"
    );
    // the file gone, then back: the page says so, then recovers
    std::fs::remove_file(&calc).expect("remove");
    assert!(page
        .until(&shows("cannot be read"), Duration::from_secs(10))
        .is_some());
    std::fs::write(&calc, &good).expect("save");
    assert!(page
        .until(&shows("Column C-3"), Duration::from_secs(10))
        .is_some());
    assert!(
        http_status(port, "/").contains("200"),
        "the server kept serving"
    );
    // Ctrl-C stops it
    let mut server = server;
    let pid = server.0.id().to_string();
    Command::new("kill")
        .args(["-INT", &pid])
        .status()
        .expect("kill");
    let t0 = Instant::now();
    let status = loop {
        if let Some(s) = server.0.try_wait().expect("wait") {
            break Some(s);
        }
        if t0.elapsed() > Duration::from_secs(5) {
            break None;
        }
        std::thread::sleep(Duration::from_millis(20));
    };
    let status = status.expect("stopped on SIGINT within 5 s");
    assert_eq!(status.code(), Some(130), "{status:?}");
}
