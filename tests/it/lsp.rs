//! `tandem lsp` driven over JSON-RPC on its standard input and output, as an
//! editor drives it.

use std::io::{BufRead, BufReader, Read, Write};
use std::process::{Child, ChildStdin, Command, Stdio};
use std::sync::mpsc::{channel, Receiver};
use std::time::{Duration, Instant};

use serde_json::{json, Value};

struct Client {
    child: Child,
    stdin: ChildStdin,
    inbox: Receiver<Value>,
    next: i64,
    /// Messages read while waiting for another.
    held: Vec<Value>,
}

impl Client {
    fn start() -> Self {
        let mut child = Command::new(env!("CARGO_BIN_EXE_tandem"))
            .arg("lsp")
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .expect("start the server");
        let stdin = child.stdin.take().expect("stdin");
        let stdout = child.stdout.take().expect("stdout");
        let (tx, inbox) = channel();
        std::thread::spawn(move || {
            let mut r = BufReader::new(stdout);
            loop {
                let mut len = 0usize;
                loop {
                    let mut line = String::new();
                    if r.read_line(&mut line).unwrap_or(0) == 0 {
                        return;
                    }
                    let line = line.trim_end();
                    if line.is_empty() {
                        break;
                    }
                    if let Some(n) = line.strip_prefix("Content-Length: ") {
                        len = n.parse().unwrap_or(0);
                    }
                }
                let mut body = vec![0; len];
                if r.read_exact(&mut body).is_err() {
                    return;
                }
                if let Ok(v) = serde_json::from_slice(&body) {
                    if tx.send(v).is_err() {
                        return;
                    }
                }
            }
        });
        Self {
            child,
            stdin,
            inbox,
            next: 1,
            held: Vec::new(),
        }
    }

    fn send(&mut self, v: &Value) {
        let body = v.to_string();
        write!(self.stdin, "Content-Length: {}\r\n\r\n{body}", body.len()).expect("write");
        self.stdin.flush().expect("flush");
    }

    fn notify(&mut self, method: &str, params: Value) {
        let mut msg = json!({"jsonrpc": "2.0", "method": method});
        msg["params"] = params;
        self.send(&msg);
    }

    /// A request's result, and how long the answer took.
    fn request(&mut self, method: &str, params: Value) -> (Value, Duration) {
        let id = self.next;
        self.next += 1;
        let t0 = Instant::now();
        let mut msg = json!({"jsonrpc": "2.0", "id": id, "method": method});
        msg["params"] = params;
        self.send(&msg);
        let v = self.wait(|m| m["id"] == id);
        (v["result"].clone(), t0.elapsed())
    }

    fn wait(&mut self, want: impl Fn(&Value) -> bool) -> Value {
        if let Some(i) = self.held.iter().position(&want) {
            return self.held.remove(i);
        }
        loop {
            let v = self
                .inbox
                .recv_timeout(Duration::from_secs(20))
                .expect("an answer within 20 s");
            if want(&v) {
                return v;
            }
            self.held.push(v);
        }
    }

    /// The next diagnostics published for `uri`.
    fn diagnostics(&mut self, uri: &str) -> Vec<Value> {
        let v = self.wait(|m| {
            m["method"] == "textDocument/publishDiagnostics" && m["params"]["uri"] == uri
        });
        v["params"]["diagnostics"]
            .as_array()
            .cloned()
            .unwrap_or_default()
    }
}

/// A hover answer's Markdown text (empty when there is none).
fn hover_text(h: &Value) -> String {
    h["contents"]["value"]
        .as_str()
        .unwrap_or_default()
        .to_string()
}

fn example(name: &str) -> String {
    std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("examples")
            .join(name),
    )
    .expect("example")
}

/// The LSP position of the `nth` occurrence of `word` in `text` (plus
/// `into` characters), UTF-16 columns (the examples are ASCII there).
fn at(text: &str, word: &str, nth: usize, into: usize) -> Value {
    let i = text
        .match_indices(word)
        .nth(nth)
        .map(|(i, _)| i)
        .expect("the word");
    let line = text[..i].matches('\n').count();
    let col = i - text[..i].rfind('\n').map_or(0, |k| k + 1);
    json!({"line": line, "character": col + into})
}

#[test]
fn the_language_server_answers_an_editor() {
    let mut c = Client::start();
    let (init, _) = c.request(
        "initialize",
        json!({"processId": null, "rootUri": null, "capabilities": {}}),
    );
    let caps = &init["capabilities"];
    for cap in [
        "hoverProvider",
        "definitionProvider",
        "referencesProvider",
        "documentFormattingProvider",
        "documentSymbolProvider",
    ] {
        assert_eq!(caps[cap], true, "{cap}: {init}");
    }
    c.notify("initialized", json!({}));
    let uri = "file:///calcs/post.tandem";
    let good = example("filled_post.tandem");
    // a misspelt material: the diagnostic `check` gives, at its place
    let bad = good.replacen("material = fill", "material = fil", 1);
    c.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": uri, "languageId": "tandem", "version": 1, "text": bad}}),
    );
    let d = c.diagnostics(uri);
    assert_eq!(d.len(), 1, "{d:?}");
    assert_eq!(d[0]["range"]["start"], at(&bad, "fil\n", 0, 0), "{d:?}");
    assert!(
        d[0]["message"].as_str().is_some_and(|m| m.contains("fil")),
        "{d:?}"
    );
    assert!(
        d[0]["message"]
            .as_str()
            .is_some_and(|m| m.contains("did you mean")),
        "{d:?}"
    );
    // mended: no diagnostics
    let t0 = Instant::now();
    c.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": uri, "version": 2}, "contentChanges": [{"text": good}]}),
    );
    assert!(c.diagnostics(uri).is_empty());
    let recheck = t0.elapsed();
    let doc = json!({"uri": uri});
    let mut slowest = Duration::ZERO;
    let mut ask = |c: &mut Client, method: &str, pos: Value| {
        let (v, dt) = c.request(
            method,
            json!({"textDocument": doc, "position": pos, "context": {"includeDeclaration": true}}),
        );
        slowest = slowest.max(dt);
        v
    };
    // hover: a let's expression and value, a part's E, A, L and k, a
    // unit's factor, a function's signature and source
    let h = ask(&mut c, "textDocument/hover", at(&good, "0.45 * fc", 0, 8));
    let text = hover_text(&h);
    assert!(
        text.contains("let fc") && text.contains("= 5 ksi"),
        "{text}"
    );
    let h = ask(&mut c, "textDocument/hover", at(&good, "part core", 0, 6));
    let text = hover_text(&h);
    assert!(
        text.contains("E = ")
            && text.contains("A = ")
            && text.contains("L = ")
            && text.contains("k = E·A/L"),
        "{text}"
    );
    let h = ask(&mut c, "textDocument/hover", at(&good, "5 ksi", 0, 3));
    let text = hover_text(&h);
    // 1 ksi = 6 894 757.293 168 36 Pa (NIST SP 811, B.8)
    assert!(
        text.contains("unit `ksi`") && text.contains("6894757.293"),
        "{text}"
    );
    let h = ask(&mut c, "textDocument/hover", at(&good, "ring(", 0, 1));
    let text = hover_text(&h);
    assert!(text.contains("ring("), "{text}");
    // go to definition: `cap` in `load cap` is `node cap`
    let v = ask(
        &mut c,
        "textDocument/definition",
        at(&good, "load cap", 0, 6),
    );
    assert_eq!(v["range"]["start"], at(&good, "node cap", 0, 5), "{v}");
    // references of fc: the let, the fill's E and allowable, the check
    let v = ask(&mut c, "textDocument/references", at(&good, "let fc", 0, 4));
    assert_eq!(v.as_array().map(Vec::len), Some(4), "{v}");
    // completion: a material block's keys at a line's start, units after a number
    let v = ask(
        &mut c,
        "textDocument/completion",
        at(&good, "  alpha     = 5.5e-6", 0, 2),
    );
    let labels: Vec<&str> = v
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|i| i["label"].as_str())
        .collect();
    assert!(
        labels.contains(&"E") && labels.contains(&"allowable") && labels.contains(&"creep"),
        "{labels:?}"
    );
    let v = ask(
        &mut c,
        "textDocument/completion",
        at(&good, "-95 kip", 0, 5),
    );
    let labels: Vec<&str> = v
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|i| i["label"].as_str())
        .collect();
    assert!(
        labels.contains(&"kip") && labels.contains(&"ksi"),
        "{labels:?}"
    );
    // document symbols: materials, nodes, parts, cases, combinations, lets
    let (v, _) = c.request("textDocument/documentSymbol", json!({"textDocument": doc}));
    let names: Vec<&str> = v
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|s| s["name"].as_str())
        .collect();
    for n in [
        "fc",
        "fill",
        "pipe_steel",
        "base",
        "cap",
        "core",
        "shell",
        "dead",
        "service",
    ] {
        assert!(names.contains(&n), "{n}: {names:?}");
    }
    // formatting: the example is canonical, a squeezed copy is not
    let (v, _) = c.request(
        "textDocument/formatting",
        json!({"textDocument": doc, "options": {"tabSize": 2, "insertSpaces": true}}),
    );
    assert_eq!(v, json!([]));
    let squeezed = good.replacen("let fc     = 5 ksi", "let fc = 5 ksi", 1);
    c.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": uri, "version": 3}, "contentChanges": [{"text": squeezed}]}),
    );
    let _ = c.diagnostics(uri);
    let (v, _) = c.request(
        "textDocument/formatting",
        json!({"textDocument": doc, "options": {"tabSize": 2, "insertSpaces": true}}),
    );
    assert_eq!(v[0]["newText"].as_str(), Some(good.as_str()));
    // a half-typed file: diagnostics, and symbols and hover from its words
    let half = good.replacen("node cap  at height", "node cap  at", 1);
    c.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": uri, "version": 4}, "contentChanges": [{"text": half}]}),
    );
    assert!(!c.diagnostics(uri).is_empty());
    let (v, _) = c.request("textDocument/documentSymbol", json!({"textDocument": doc}));
    let names: Vec<&str> = v
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|s| s["name"].as_str())
        .collect();
    assert!(
        names.contains(&"fill") && names.contains(&"core"),
        "{names:?}"
    );
    let h = ask(&mut c, "textDocument/hover", at(&half, "0.45 * fc", 0, 8));
    assert!(hover_text(&h).contains("let fc"), "{h}");
    // every answer is quick (the issue asks 50 ms; this debug build is
    // slower than a release one, so the bound here is generous)
    assert!(slowest < Duration::from_millis(250), "{slowest:?}");
    assert!(recheck < Duration::from_millis(500), "{recheck:?}");
    let _ = c.request("shutdown", Value::Null);
    c.notify("exit", Value::Null);
    let status = c.child.wait().expect("exit");
    assert!(status.success());
}

/// A client that does not send `initialized` after the answer to
/// `initialize` (the protocol asks for it; some scripts and test clients
/// skip it) is served all the same, and one that sends it late too.
#[test]
fn a_client_that_skips_initialized_is_served() {
    let mut c = Client::start();
    let (init, _) = c.request(
        "initialize",
        json!({"processId": null, "rootUri": null, "capabilities": {}}),
    );
    assert_eq!(init["capabilities"]["hoverProvider"], true, "{init}");
    let uri = "file:///calcs/quick.tandem";
    let bad = example("filled_post.tandem").replacen("material = fill", "material = fil", 1);
    c.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": uri, "languageId": "tandem", "version": 1, "text": bad}}),
    );
    assert_eq!(c.diagnostics(uri).len(), 1);
    // `initialized` arriving late is no message the server stops on
    c.notify("initialized", json!({}));
    let (symbols, _) = c.request(
        "textDocument/documentSymbol",
        json!({"textDocument": {"uri": uri}}),
    );
    assert!(
        symbols.as_array().is_some_and(|s| !s.is_empty()),
        "{symbols}"
    );
}

/// A real client: headless Neovim (Debian's package) attaches the server to
/// a calc with an error and reads back the diagnostic and a hover
/// (editors/nvim/check.sh). Skipped with a notice when `nvim` is absent.
#[test]
fn neovim_reads_back_the_diagnostics() {
    if Command::new("nvim").arg("--version").output().is_err() {
        eprintln!("skipped: nvim is not installed (.ci/run installs Debian's neovim)");
        return;
    }
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let out = Command::new("bash")
        .arg(root.join("editors/nvim/check.sh"))
        .arg("")
        .arg(env!("CARGO_BIN_EXE_tandem"))
        .output()
        .expect("run the script");
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "{text}{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        text.contains("diagnostic 36:14 unknown material `fil`"),
        "{text}"
    );
    assert!(text.contains("did you mean `fill`?"), "{text}");
    assert!(text.contains("hover") && text.contains("let fc"), "{text}");
}
