//! The TextMate grammar (editors/tandem.tmLanguage.json): its word lists
//! agree with the language, and every example tokenized by the engine VS
//! Code uses (vscode-textmate with vscode-oniguruma, run by node) gives
//! every comment, keyword and unit its scope.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn grammar() -> Value {
    serde_json::from_str(
        &std::fs::read_to_string(root().join("editors/tandem.tmLanguage.json")).expect("grammar"),
    )
    .expect("JSON")
}

/// The words of a rule's `match`, from its first `(a|b|c)` group.
fn alternation(g: &Value, rule: &str) -> BTreeSet<String> {
    let m = g["repository"][rule]["match"].as_str().unwrap_or_default();
    let open = m
        .find("\\b(")
        .map(|i| i + 3)
        .or_else(|| m.find(".])(").map(|i| i + 4));
    let Some(open) = open else {
        return BTreeSet::new();
    };
    let close = m[open..].find(')').map_or(m.len(), |i| open + i);
    m[open..close].split('|').map(str::to_string).collect()
}

/// The language's keywords: the quoted words of the pest grammar.
fn keywords() -> BTreeSet<String> {
    let pest = std::fs::read_to_string(root().join("grammar/tandem.pest")).expect("pest");
    let mut out = BTreeSet::new();
    for part in pest.split('"').skip(1).step_by(2) {
        if part.len() > 1 && part.chars().all(|c| c.is_ascii_lowercase() || c == '_') {
            out.insert(part.to_string());
        }
    }
    out
}

#[test]
fn the_grammars_words_are_the_languages() {
    let g = grammar();
    assert_eq!(g["scopeName"], "source.tandem");
    let units: BTreeSet<String> = tandem::units::units()
        .iter()
        .map(|u| u.name.to_string())
        .collect();
    assert_eq!(
        alternation(&g, "unit"),
        units,
        "the unit list and the unit table"
    );
    let mut grammar_words = alternation(&g, "declaration");
    grammar_words.extend(alternation(&g, "keyword"));
    grammar_words.extend(["for".to_string(), "in".to_string()]);
    for k in keywords() {
        assert!(grammar_words.contains(&k), "keyword `{k}` has no scope");
    }
}

/// node and npm, with the two packages installed once under the target
/// folder; `None` (with a notice) when they cannot be had.
fn tokenizer() -> Option<PathBuf> {
    // set up once for every test that tokenizes: tests run in parallel,
    // and a second `npm install` into the same folder would pull files
    // from under the first one's feet
    static READY: std::sync::OnceLock<Option<PathBuf>> = std::sync::OnceLock::new();
    READY.get_or_init(install_tokenizer).clone()
}

fn install_tokenizer() -> Option<PathBuf> {
    if Command::new("node").arg("--version").output().is_err()
        || Command::new("npm").arg("--version").output().is_err()
    {
        eprintln!("skipped: node and npm are not installed (.ci/run installs Debian's)");
        return None;
    }
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("grammar-test");
    std::fs::create_dir_all(&dir).expect("dir");
    for f in ["package.json", "tokenize.js"] {
        std::fs::copy(root().join("editors/test").join(f), dir.join(f)).expect("copy");
    }
    if !dir.join("node_modules/vscode-textmate").exists() {
        let ok = Command::new("npm")
            .current_dir(&dir)
            .args(["install", "--no-audit", "--no-fund", "--silent"])
            .status()
            .is_ok_and(|s| s.success());
        if !ok {
            eprintln!("skipped: npm could not install vscode-textmate and vscode-oniguruma");
            return None;
        }
    }
    Some(dir)
}

/// Each file's tokens by the grammar through vscode-textmate, as
/// `tokenize.js` prints them (`dir`: [`tokenizer`]'s folder).
fn tokenize(dir: &Path, files: &[PathBuf]) -> Value {
    let out = Command::new("node")
        .current_dir(dir)
        .arg("tokenize.js")
        .arg(root().join("editors/tandem.tmLanguage.json"))
        .args(files)
        .output()
        .expect("node");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("tokens")
}

/// Comment starts (`#` outside strings) of a line, as UTF-16 offsets.
fn comment_at(line: &str) -> Option<usize> {
    let mut quoted = false;
    let mut units = 0;
    for c in line.chars() {
        match c {
            '"' => quoted = !quoted,
            '#' if !quoted => return Some(units),
            _ => {}
        }
        units += c.len_utf16();
    }
    None
}

#[test]
fn every_example_gets_its_scopes() {
    let Some(dir) = tokenizer() else {
        return;
    };
    let mut files: Vec<PathBuf> = std::fs::read_dir(root().join("examples"))
        .expect("examples")
        .flatten()
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "tandem"))
        .collect();
    files.sort();
    let tokens = tokenize(&dir, &files);
    let grammar_words = {
        let g = grammar();
        let mut w = alternation(&g, "declaration");
        w.extend(alternation(&g, "keyword"));
        w
    };
    let (mut comments, mut units, mut keywords) = (0, 0, 0);
    for f in &files {
        let text = std::fs::read_to_string(f).expect("read");
        let lines: Vec<&str> = text.split('\n').collect();
        let toks = &tokens[f.display().to_string()];
        // the scopes of the token covering (line, UTF-16 column)
        let scope_at = |line: usize, col: usize| -> Vec<String> {
            toks[line]
                .as_array()
                .into_iter()
                .flatten()
                .find(|t| {
                    let at = |k: usize| usize::try_from(t[k].as_u64().unwrap_or(0)).unwrap_or(0);
                    at(0) <= col && col < at(1)
                })
                .map(|t| {
                    t[2].as_array()
                        .into_iter()
                        .flatten()
                        .filter_map(|s| s.as_str().map(str::to_string))
                        .collect()
                })
                .unwrap_or_default()
        };
        let has = |scopes: &[String], prefix: &str| scopes.iter().any(|s| s.starts_with(prefix));
        let name = f.display();
        // comments
        for (i, l) in lines.iter().enumerate() {
            if let Some(c) = comment_at(l) {
                assert!(
                    has(&scope_at(i, c), "comment.line"),
                    "{name}:{}: {l}",
                    i + 1
                );
                comments += 1;
            }
        }
        // units: every unit the parser read, at its place
        let file = tandem::syntax::parse(&text).expect("parses");
        let mut exprs = Vec::new();
        for d in &file.decls {
            d.exprs(&mut exprs);
        }
        for e in exprs {
            e.visit(&mut |x| {
                use tandem::syntax::ast::ExprKind;
                let (ExprKind::Quantity { unit: Some(u), .. } | ExprKind::Unit(u)) = &x.kind else {
                    return;
                };
                for fac in &u.factors {
                    let at = fac.span.start();
                    let line = text[..at].matches('\n').count();
                    let start = text[..at].rfind('\n').map_or(0, |k| k + 1);
                    let col: usize = text[start..at].chars().map(char::len_utf16).sum();
                    assert!(
                        has(&scope_at(line, col), "keyword.other.unit"),
                        "{name}:{}: `{}` is not scoped a unit",
                        line + 1,
                        fac.name
                    );
                    units += 1;
                }
            });
        }
        // keywords: each word of the language outside comments and strings
        for (i, l) in lines.iter().enumerate() {
            let code_end = comment_at(l).unwrap_or(usize::MAX);
            let mut quoted = false;
            let mut col = 0;
            let chars: Vec<char> = l.chars().collect();
            let mut k = 0;
            while k < chars.len() {
                let c = chars[k];
                if c == '"' {
                    quoted = !quoted;
                }
                if !quoted
                    && col < code_end
                    && (c.is_ascii_alphabetic() || c == '_')
                    && (k == 0
                        || !(chars[k - 1].is_ascii_alphanumeric()
                            || chars[k - 1] == '_'
                            || chars[k - 1] == '.'))
                {
                    let word: String = chars[k..]
                        .iter()
                        .take_while(|c| c.is_ascii_alphanumeric() || **c == '_')
                        .collect();
                    // a block's key may share a keyword's spelling (`load`?):
                    // a key is followed by `=`
                    let after: String = chars[k + word.len()..].iter().collect();
                    let is_key = after.trim_start().starts_with('=')
                        && !after.trim_start().starts_with("==");
                    if grammar_words.contains(&word) && !is_key {
                        assert!(
                            has(&scope_at(i, col), "keyword."),
                            "{name}:{}: keyword `{word}` in {l}",
                            i + 1
                        );
                        keywords += 1;
                    }
                    col += word.len();
                    k += word.len();
                    continue;
                }
                col += c.len_utf16();
                k += 1;
            }
        }
    }
    assert!(
        comments > 20 && units > 50 && keywords > 50,
        "{comments} {units} {keywords}"
    );
}

/// The VS Code extension's manifest registers the language, the grammar
/// (the file this suite tokenizes with) and a main script that starts
/// `tandem lsp`.
#[test]
fn the_vscode_manifest_registers_the_grammar_and_the_server() {
    let dir = root().join("editors/vscode");
    let m: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("package.json")).expect("manifest"))
            .expect("JSON");
    assert_eq!(m["contributes"]["languages"][0]["id"], "tandem");
    assert_eq!(m["contributes"]["languages"][0]["extensions"][0], ".tandem");
    let g = &m["contributes"]["grammars"][0];
    assert_eq!(g["scopeName"], "source.tandem");
    let path = dir.join(g["path"].as_str().expect("path"));
    assert_eq!(
        std::fs::canonicalize(path).expect("the grammar exists"),
        std::fs::canonicalize(root().join("editors/tandem.tmLanguage.json")).expect("grammar")
    );
    let main = std::fs::read_to_string(dir.join(m["main"].as_str().expect("main"))).expect("main");
    assert!(main.contains("args: [\"lsp\"]"), "{main}");
    assert!(dir.join("language-configuration.json").exists());
}

/// `x`, `y` and `rotation` are directions only after the node they hold
/// or move (`fix a x`, `settle a y = ...`); elsewhere `x` is a name like
/// any other and is coloured as one.
#[test]
fn directions_are_keywords_only_where_they_are_directions() {
    let Some(dir) = tokenizer() else {
        return;
    };
    let calc = dir.join("axes.tandem");
    std::fs::write(
        &calc,
        "node x at (0 m, 0 m)\nfix x y, b rotation # held\ncase c { settle x y = 5 mm; load x = (1 kN, 0 kN) }\n",
    )
    .expect("write");
    let tokens = tokenize(&dir, std::slice::from_ref(&calc));
    let lines = &tokens[calc.to_string_lossy().as_ref()];
    let text = [
        "node x at (0 m, 0 m)",
        "fix x y, b rotation # held",
        "case c { settle x y = 5 mm; load x = (1 kN, 0 kN) }",
    ];
    // the scopes of the token holding UTF-16 offset `col` of line `i`
    let scope_of = |i: usize, col: usize| -> String {
        let col = u64::try_from(col).unwrap_or(u64::MAX);
        lines[i]
            .as_array()
            .expect("tokens")
            .iter()
            .find(|t| t[0].as_u64().unwrap_or(0) <= col && col < t[1].as_u64().unwrap_or(0))
            .map(|t| t[2].to_string())
            .unwrap_or_default()
    };
    let at = |i: usize, word: &str, nth: usize| -> String {
        let col = text[i]
            .match_indices(word)
            .nth(nth)
            .map(|(c, _)| c)
            .expect("word");
        scope_of(i, col)
    };
    assert!(at(1, "fix", 0).contains("keyword.other.tandem"));
    assert!(
        scope_of(1, 4).contains("variable.other"),
        "{}",
        scope_of(1, 4)
    );
    assert!(
        at(1, "y", 0).contains("keyword.other.axis"),
        "{}",
        at(1, "y", 0)
    );
    assert!(at(1, "rotation", 0).contains("keyword.other.axis"));
    assert!(at(1, "#", 0).contains("comment"));
    assert!(at(2, "settle", 0).contains("keyword.other.tandem"));
    // `settle x y`: the node, then its direction
    let x_in_settle = text[2].find("settle x").map(|c| c + 7).expect("settle");
    assert!(scope_of(2, x_in_settle).contains("variable.other"));
    assert!(scope_of(2, x_in_settle + 2).contains("keyword.other.axis"));
    // `load x = ...`: a name, not a keyword
    let x_in_load = text[2].find("load x").map(|c| c + 5).expect("load");
    assert!(
        !scope_of(2, x_in_load).contains("keyword"),
        "{}",
        scope_of(2, x_in_load)
    );
}
