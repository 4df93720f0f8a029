//! `tandem watch FILE`: the HTML report served on 127.0.0.1, made again on
//! every save of the file; the page reloads itself (server-sent events).
//! When the file has errors, or is gone, the page shows that in place of
//! a stale report, and the next good save brings the report back.

use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::{Arc, Condvar, Mutex};
use std::time::Duration;

use crate::cli::Show;
use crate::{bad, display};

/// The page served and its version (bumped by every render).
struct Page {
    html: String,
    version: u64,
}

type Shared = Arc<(Mutex<Page>, Condvar)>;

/// The script that reloads the page when the server's version is not the
/// one the page was made from (a save between the page and its listener
/// connecting is not missed).
fn reload_script(version: u64) -> String {
    format!(
        "<script>(function(){{var s=new EventSource('/events');s.onmessage=function(e){{if(e.data!=='{version}'){{s.close();location.reload();}}}};}})();</script>"
    )
}

fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

/// A page that says what is wrong (the diagnostics as `check` draws them).
fn trouble_page(file: &Path, title: &str, body: &str) -> String {
    format!(
        "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>{} — {}</title>\
         <style>body{{font-family:sans-serif;margin:2em}}pre{{background:#f4f4f4;padding:1em;overflow:auto}}</style>\
         </head><body><h1 id=\"trouble\">{}</h1><p>{} — the report comes back at the next save that checks.</p><pre id=\"diagnostics\">{}</pre></body></html>",
        escape(&file.display().to_string()),
        escape(title),
        escape(title),
        escape(&file.display().to_string()),
        escape(body)
    )
}

/// The HTML report of the file as it is now, or a page of its errors.
fn render(file: &Path, show: &Show) -> String {
    use tandem::report::markdown::{report_with, Figures, Options};
    let source = match tandem::read_source(file) {
        Ok(s) => s,
        Err(msg) => return trouble_page(file, "The file cannot be read", &msg),
    };
    let (analysis, errors) = tandem::analyse_partial(&source);
    let (Some(mut a), true) = (analysis, errors.is_empty()) else {
        let text = tandem::diagnostic::write(
            &errors,
            &source,
            tandem::diagnostic::Format::Human,
            100,
            false,
        );
        return trouble_page(file, "The calc has errors", &text);
    };
    tandem::with_sensitivity(&source, &mut a);
    let d = match display(&a.model, show) {
        Ok(d) => d,
        Err(msg) => return trouble_page(file, "The display units are wrong", &msg),
    };
    let stem = file
        .file_stem()
        .map_or_else(|| "report".to_string(), |s| s.to_string_lossy().to_string());
    // a preview: the title block's git history is left to `tandem report`
    let options = Options {
        figures: Figures::Beside(stem.clone()),
        history: None,
    };
    let written = report_with(&source, &a, &d, &options);
    tandem::report::html(&written.markdown, &a.model.title, &stem, &written.drawings)
}

fn publish(shared: &Shared, html: String) {
    let (lock, changed) = &**shared;
    if let Ok(mut p) = lock.lock() {
        p.html = html;
        p.version += 1;
    }
    changed.notify_all();
}

/// The body of `/events`: a line `data: VERSION` now and after each
/// render, for as long as the browser listens.
struct Events {
    shared: Shared,
    seen: Option<u64>,
    pending: Vec<u8>,
}

impl Read for Events {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.pending.is_empty() {
            let (lock, changed) = &*self.shared;
            let mut p = lock
                .lock()
                .map_err(|_| std::io::Error::other("the page lock is poisoned"))?;
            // a comment line every 15 s keeps the connection open
            while self.seen == Some(p.version) {
                let (next, timeout) = changed
                    .wait_timeout(p, Duration::from_secs(15))
                    .map_err(|_| std::io::Error::other("the page lock is poisoned"))?;
                p = next;
                if timeout.timed_out() && self.seen == Some(p.version) {
                    self.pending = b": keep-alive\n\n".to_vec();
                    break;
                }
            }
            if self.pending.is_empty() {
                self.seen = Some(p.version);
                self.pending = format!("data: {}\n\n", p.version).into_bytes();
            }
        }
        let n = buf.len().min(self.pending.len());
        buf[..n].copy_from_slice(&self.pending[..n]);
        self.pending.drain(..n);
        Ok(n)
    }
}

fn headers(pairs: &[(&str, &str)]) -> Vec<tiny_http::Header> {
    pairs
        .iter()
        .filter_map(|(n, v)| tiny_http::Header::from_bytes(n.as_bytes(), v.as_bytes()).ok())
        .collect()
}

fn serve(request: tiny_http::Request, shared: &Shared) {
    let path = request.url().split('?').next().unwrap_or("/").to_string();
    let result = match path.as_str() {
        "/" | "/index.html" => {
            let (html, version) = shared
                .0
                .lock()
                .map(|p| (p.html.clone(), p.version))
                .unwrap_or_default();
            let reload = reload_script(version);
            let page = match html.rfind("</body>") {
                Some(i) => format!("{}{reload}{}", &html[..i], &html[i..]),
                None => format!("{html}{reload}"),
            };
            let mut response = tiny_http::Response::from_string(page);
            for h in headers(&[
                ("Content-Type", "text/html; charset=utf-8"),
                ("Cache-Control", "no-store"),
            ]) {
                response.add_header(h);
            }
            request.respond(response)
        }
        "/events" => {
            let shared = Arc::clone(shared);
            // each listener on a thread of its own, written to the socket
            // directly so that every event leaves at once (a chunked body
            // would wait for a full chunk)
            std::thread::spawn(move || {
                let mut w = request.into_writer();
                let mut body = Events {
                    shared,
                    seen: None,
                    pending: Vec::new(),
                };
                let head = "HTTP/1.1 200 OK\r\nContent-Type: text/event-stream\r\nCache-Control: no-store\r\nConnection: close\r\n\r\n";
                if w.write_all(head.as_bytes())
                    .and_then(|()| w.flush())
                    .is_err()
                {
                    return;
                }
                let mut buf = [0u8; 256];
                // until the browser goes away
                while let Ok(n) = body.read(&mut buf) {
                    if w.write_all(&buf[..n]).and_then(|()| w.flush()).is_err() {
                        return;
                    }
                }
            });
            Ok(())
        }
        _ => request.respond(
            tiny_http::Response::from_string("not found: tandem watch serves / and /events\n")
                .with_status_code(404),
        ),
    };
    // a browser that went away mid-answer is not the server's trouble
    let _ = result;
}

pub(crate) fn watch(file: &Path, port: u16, show: &Show) -> ExitCode {
    let file: PathBuf = file.to_path_buf();
    if !file.is_file() {
        errln!("error: {} is not a file", file.display());
        return bad();
    }
    // loopback only: the report is for the one at this machine
    let server = match tiny_http::Server::http(("127.0.0.1", port)) {
        Ok(s) => s,
        Err(e) => {
            errln!("error: cannot serve on 127.0.0.1:{port}: {e}");
            return bad();
        }
    };
    let shared: Shared = Arc::new((
        Mutex::new(Page {
            html: render(&file, show),
            version: 0,
        }),
        Condvar::new(),
    ));
    let bound = server.server_addr().to_ip().map_or(port, |a| a.port());
    errln!(
        "serving {} at http://127.0.0.1:{bound}/ (it follows every save; Ctrl-C stops)",
        file.display()
    );
    // editors save by writing in place or by renaming a new file over the
    // old: the folder is watched, and events for the file re-render
    let (tx, rx) = std::sync::mpsc::channel();
    let mut watcher = match notify::recommended_watcher(tx) {
        Ok(w) => w,
        Err(e) => {
            errln!("error: cannot watch {}: {e}", file.display());
            return bad();
        }
    };
    let folder = file
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .map_or_else(|| PathBuf::from("."), Path::to_path_buf);
    if let Err(e) =
        notify::Watcher::watch(&mut watcher, &folder, notify::RecursiveMode::NonRecursive)
    {
        errln!("error: cannot watch {}: {e}", folder.display());
        return bad();
    }
    let name = file.file_name().map(std::ffi::OsStr::to_os_string);
    let on_save = {
        let shared = Arc::clone(&shared);
        let file = file.clone();
        let show = show.clone();
        std::thread::spawn(move || {
            while let Ok(event) = rx.recv() {
                // reading the file (as a render does) is an event too: only
                // a change counts
                let ours = event.is_ok_and(|e: notify::Event| {
                    !e.kind.is_access()
                        && e.paths
                            .iter()
                            .any(|p| p.file_name().map(std::ffi::OsStr::to_os_string) == name)
                });
                if !ours {
                    continue;
                }
                // a save is often several events: let them settle
                std::thread::sleep(Duration::from_millis(15));
                while rx.try_recv().is_ok() {}
                publish(&shared, render(&file, &show));
            }
        })
    };
    for request in server.incoming_requests() {
        serve(request, &shared);
    }
    drop(watcher);
    let _ = on_save.join();
    ExitCode::SUCCESS
}
