//! The example workflow of docs/ci.md run as its steps would run: every
//! `run:` block (except those marked `# hosting`) executed with bash in a
//! scratch repository of calcs, with the outputs of the steps passed on as
//! the hosting would pass them.

use std::collections::HashMap;
use std::path::Path;
use std::process::Command;

use super::common::git;

/// One step of the workflow: its id and its `run:` block.
struct Step {
    id: Option<String>,
    name: String,
    run: String,
}

/// The steps with a `run: |` block, read line by line (the file is ours
/// and simple: two-space YAML, block scalars for the scripts).
fn steps(yaml: &str) -> Vec<Step> {
    let lines: Vec<&str> = yaml.lines().collect();
    let mut out = Vec::new();
    let (mut name, mut id) = (String::new(), None);
    let mut i = 0;
    while i < lines.len() {
        let l = lines[i].trim_start();
        if let Some(n) = l.strip_prefix("- name: ") {
            name = n.to_string();
            id = None;
        } else if l.starts_with("- uses:") {
            name = String::new();
            id = None;
        } else if let Some(x) = l.strip_prefix("id: ") {
            id = Some(x.to_string());
        } else if l == "run: |" {
            let key_indent = lines[i].len() - l.len();
            let mut block = Vec::new();
            i += 1;
            while i < lines.len()
                && (lines[i].trim().is_empty()
                    || lines[i].len() - lines[i].trim_start().len() > key_indent)
            {
                block.push(lines[i]);
                i += 1;
            }
            let indent = block
                .iter()
                .filter(|b| !b.trim().is_empty())
                .map(|b| b.len() - b.trim_start().len())
                .min()
                .unwrap_or(0);
            let run: Vec<&str> = block
                .iter()
                .map(|b| if b.len() >= indent { &b[indent..] } else { "" })
                .collect();
            out.push(Step {
                id: id.clone(),
                name: name.clone(),
                run: run.join("\n"),
            });
            continue;
        }
        i += 1;
    }
    out
}

const ROD: &str = "let a = 1 m\nnode x at 0 m\nnode y at a\nfix x\nmaterial s { E = 200 GPa }\npart p { material = s; area = 100 mm^2; ends = x, y }\nload y = 1 kN\ncheck \"rod stress\" : p.stress <= 100 MPa\n";

/// Run the workflow's steps on a repository whose pull request changes
/// `calcs/rod.tandem` to `changed` (and adds `extra` files); the exit code
/// of the last (gating) step, the comment and the annotations.
fn run_workflow(changed: &str, extra: &[(&str, &str)]) -> (i32, String, String, Vec<String>) {
    let yaml =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/ci/calcs.yml"))
            .expect("workflow");
    let dir = tempfile::tempdir().expect("dir");
    let root = dir.path();
    std::fs::create_dir_all(root.join("calcs")).expect("calcs");
    git(root, &["init", "-q"]);
    std::fs::write(root.join("calcs/rod.tandem"), ROD).expect("rod");
    std::fs::write(root.join("calcs/post.tandem"), ROD.replace("1 kN", "2 kN")).expect("post");
    git(root, &["add", "."]);
    git(root, &["commit", "-qm", "base"]);
    let base = git(root, &["rev-parse", "HEAD"]);
    std::fs::write(root.join("calcs/rod.tandem"), changed).expect("changed");
    for (name, text) in extra {
        std::fs::write(root.join(name), text).expect("extra");
    }
    git(root, &["add", "."]);
    git(root, &["commit", "-qm", "change"]);
    let bin = Path::new(env!("CARGO_BIN_EXE_tandem"))
        .parent()
        .expect("bin dir")
        .to_path_buf();
    let path = format!(
        "{}:{}",
        bin.display(),
        std::env::var("PATH").unwrap_or_default()
    );
    let mut outputs: HashMap<String, HashMap<String, String>> = HashMap::new();
    let mut last = -1;
    let mut logs = String::new();
    for step in steps(&yaml) {
        if step.run.starts_with("# hosting") {
            continue;
        }
        let out_file = root.join(".github_output");
        std::fs::write(&out_file, "").expect("output file");
        let get = |id: &str| {
            outputs
                .get(id)
                .and_then(|o| o.get("code"))
                .cloned()
                .unwrap_or_default()
        };
        let out = Command::new("bash")
            .current_dir(root)
            .args(["--noprofile", "--norc", "-eo", "pipefail", "-c", &step.run])
            .env("PATH", &path)
            .env("GITHUB_OUTPUT", &out_file)
            .env("BASE", &base)
            .env("CHECK", get("check"))
            .env("REPORT", get("report"))
            .env_remove("NO_COLOR")
            .output()
            .expect("bash");
        logs.push_str(&format!(
            "== {} ==\n{}{}",
            step.name,
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        ));
        if let Some(id) = step.id {
            let written = std::fs::read_to_string(&out_file).unwrap_or_default();
            let map = written
                .lines()
                .filter_map(|l| l.split_once('='))
                .map(|(k, v)| (k.to_string(), v.to_string()))
                .collect();
            outputs.insert(id, map);
        }
        last = out.status.code().unwrap_or(-1);
    }
    let comment = std::fs::read_to_string(root.join("comment.md")).unwrap_or_default();
    let mut reports: Vec<String> = std::fs::read_dir(root.join("reports"))
        .map(|d| {
            d.flatten()
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .collect()
        })
        .unwrap_or_default();
    reports.sort();
    (last, comment, logs, reports)
}

#[test]
fn the_example_workflow_gates_a_repository_of_calcs() {
    if Command::new("git").arg("--version").output().is_err()
        || Command::new("bash").arg("--version").output().is_err()
    {
        eprintln!("skipped: git or bash is not installed");
        return;
    }
    // a change that keeps every check passing: the gate passes, the
    // comment shows the diff, both reports are written
    let (code, comment, logs, reports) = run_workflow(&ROD.replace("100 mm^2", "120 mm^2"), &[]);
    assert_eq!(code, 0, "{logs}");
    assert!(comment.contains("### calcs/rod.tandem"), "{comment}");
    assert!(comment.contains("area"), "{comment}");
    assert_eq!(reports, vec!["post.html", "rod.html"], "{logs}");
    // a change that fails a check, and a calc with an error: the gate
    // fails, the error is annotated at its line
    let (code, _, logs, _) = run_workflow(
        &ROD.replace("100 mm^2", "1 mm^2"),
        &[("calcs/wrong.tandem", "node x at 0 m\nnode y at 1 m\nfix x\npart p { material = steel; area = 1 mm^2; ends = x, y }\n")],
    );
    assert_ne!(code, 0, "{logs}");
    assert!(
        logs.contains("tandem check: exit 2, tandem report: exit 2"),
        "{logs}"
    );
    assert!(
        logs.contains("::error file=./calcs/wrong.tandem,line=4,col="),
        "{logs}"
    );
}
