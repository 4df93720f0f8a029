//! `tandem lsp`: a language server over standard input and output
//! (JSON-RPC, `lsp-server`). Documents are synced whole; each change is
//! parsed and checked again (a calc checks in about a millisecond) and its
//! diagnostics published. Answers: hover, go to definition, references,
//! completion, formatting and document symbols.

mod document;

use std::collections::HashMap;

use lsp_server::{Connection, Message, Notification, Request, Response};
use serde_json::{json, Value};

use document::Document;

/// The LSP position (line, UTF-16 character) of a byte offset.
fn position(text: &str, offset: usize) -> Value {
    let (line, before) = crate::source::locate(text, offset);
    let character: usize = before.chars().map(char::len_utf16).sum();
    json!({"line": line, "character": character})
}

/// The LSP range of a byte range.
pub(crate) fn range(text: &str, start: usize, end: usize) -> Value {
    json!({"start": position(text, start), "end": position(text, end)})
}

/// The byte offset of an LSP position (clamped to the text).
fn offset(text: &str, pos: &Value) -> usize {
    let line = usize::try_from(pos["line"].as_u64().unwrap_or(0)).unwrap_or(0);
    let character = usize::try_from(pos["character"].as_u64().unwrap_or(0)).unwrap_or(0);
    let mut start = 0;
    for _ in 0..line {
        match text[start..].find('\n') {
            Some(i) => start += i + 1,
            None => return text.len(),
        }
    }
    let mut units = 0;
    for (i, c) in text[start..].char_indices() {
        if units >= character || c == '\n' {
            return start + i;
        }
        units += c.len_utf16();
    }
    text.len()
}

/// The server's capabilities, answered to `initialize`.
fn capabilities() -> Value {
    json!({
        "textDocumentSync": 1,
        "hoverProvider": true,
        "definitionProvider": true,
        "referencesProvider": true,
        "completionProvider": {"triggerCharacters": [" ", "="]},
        "documentFormattingProvider": true,
        "documentSymbolProvider": true,
    })
}

/// The LSP kind of a declaration (SymbolKind).
fn symbol_kind(kind: &str) -> u8 {
    match kind {
        "material" => 23,         // Struct
        "node" => 19,             // Object
        "part" | "beam" => 5,     // Class
        "rigid" | "group" => 3,   // Namespace
        "case" | "combine" => 24, // Event
        _ => 13,                  // Variable (a `let`)
    }
}

struct Server {
    docs: HashMap<String, Document>,
}

impl Server {
    fn publish(&self, conn: &Connection, uri: &str) {
        let diagnostics = self
            .docs
            .get(uri)
            .map(|d| d.diagnostics(uri))
            .unwrap_or_default();
        let _ = conn.sender.send(Message::Notification(Notification::new(
            "textDocument/publishDiagnostics".into(),
            json!({"uri": uri, "diagnostics": diagnostics}),
        )));
    }

    fn notification(&mut self, conn: &Connection, n: &Notification) {
        let uri = n.params["textDocument"]["uri"]
            .as_str()
            .unwrap_or_default()
            .to_string();
        match n.method.as_str() {
            "textDocument/didOpen" => {
                let text = n.params["textDocument"]["text"]
                    .as_str()
                    .unwrap_or_default();
                self.docs
                    .insert(uri.clone(), Document::new(&name_of(&uri), text.to_string()));
                self.publish(conn, &uri);
            }
            "textDocument/didChange" => {
                // whole-document sync: the last change holds the text
                let text = n.params["contentChanges"]
                    .as_array()
                    .and_then(|c| c.last())
                    .and_then(|c| c["text"].as_str())
                    .unwrap_or_default();
                self.docs
                    .insert(uri.clone(), Document::new(&name_of(&uri), text.to_string()));
                self.publish(conn, &uri);
            }
            "textDocument/didClose" => {
                self.docs.remove(&uri);
                let _ = conn.sender.send(Message::Notification(Notification::new(
                    "textDocument/publishDiagnostics".into(),
                    json!({"uri": uri, "diagnostics": []}),
                )));
            }
            _ => {}
        }
    }

    fn request(&self, r: &Request) -> Value {
        let uri = r.params["textDocument"]["uri"].as_str().unwrap_or_default();
        let Some(doc) = self.docs.get(uri) else {
            return Value::Null;
        };
        let text = &doc.source.text;
        let at = offset(text, &r.params["position"]);
        let location = |(s, e): (usize, usize)| json!({"uri": uri, "range": range(text, s, e)});
        match r.method.as_str() {
            "textDocument/hover" => doc.hover(at).map_or(Value::Null, |md| {
                json!({"contents": {"kind": "markdown", "value": md}})
            }),
            "textDocument/definition" => doc
                .definition(at)
                .map_or(Value::Null, |d| location(d.at)),
            "textDocument/references" => {
                Value::Array(doc.references(at).into_iter().map(location).collect())
            }
            "textDocument/completion" => Value::Array(
                doc.completion(at)
                    .into_iter()
                    .map(|(label, kind, detail)| {
                        json!({"label": label, "kind": kind, "detail": detail})
                    })
                    .collect(),
            ),
            "textDocument/formatting" => match doc.formatted() {
                Some(new) if new != *text => json!([{
                    "range": range(text, 0, text.len()),
                    "newText": new,
                }]),
                _ => json!([]),
            },
            "textDocument/documentSymbol" => Value::Array(
                doc.declared()
                    .iter()
                    .map(|d| {
                        json!({
                            "name": d.name,
                            "detail": d.kind,
                            "kind": symbol_kind(d.kind),
                            "range": range(text, d.whole.0, d.whole.1),
                            "selectionRange": range(text, d.at.0, d.at.1),
                        })
                    })
                    .collect(),
            ),
            _ => Value::Null,
        }
    }
}

/// The name diagnostics give a document: its path for a `file:` URI.
fn name_of(uri: &str) -> String {
    uri.strip_prefix("file://").unwrap_or(uri).to_string()
}

/// Serve on standard input and output until the client says `exit`.
///
/// # Errors
/// A broken connection, in words.
pub fn serve() -> Result<(), String> {
    let (conn, threads) = Connection::stdio();
    let (id, _params) = conn.initialize_start().map_err(|e| e.to_string())?;
    // The answer is sent here rather than by `initialize_finish`, which
    // stops the server when the next message is not `initialized`: a
    // client that skips that notification (or sends a request first) is
    // served all the same, and `initialized` is ignored when it comes.
    conn.sender
        .send(Message::Response(Response::new_ok(
            id,
            json!({
                "capabilities": capabilities(),
                "serverInfo": {"name": "tandem", "version": env!("CARGO_PKG_VERSION")},
            }),
        )))
        .map_err(|e| e.to_string())?;
    let mut server = Server {
        docs: HashMap::new(),
    };
    for msg in &conn.receiver {
        match msg {
            Message::Request(r) => {
                // a client that asks twice or does not wait for the answer
                // is shut down all the same
                if conn.handle_shutdown(&r).unwrap_or(true) {
                    break;
                }
                let result = server.request(&r);
                let _ = conn
                    .sender
                    .send(Message::Response(Response::new_ok(r.id.clone(), result)));
            }
            Message::Notification(n) => server.notification(&conn, &n),
            Message::Response(_) => {}
        }
    }
    drop(conn);
    threads.join().map_err(|e| e.to_string())
}
