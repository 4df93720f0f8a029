//! Reports printed by a real browser: two example reports as HTML, printed
//! to PDF by headless Chromium, read back with poppler's `pdfinfo` and
//! `pdftotext`. Every sheet carries the running header (calc number, title,
//! revision) and "Sheet X of Y"; no word lies outside the page's margins
//! (no table wider than the page); no section heading is stranded at the
//! foot of a sheet; the browser's own header (a URL) is not printed; a
//! table that runs over several sheets repeats its header row on each.
//!
//! Skipped with a notice when no browser or poppler is installed
//! (`.ci/run` installs Debian's `chromium` and `poppler-utils`). The
//! browser is `$TANDEM_BROWSER`, else `chromium` on the PATH.

use std::path::{Path, PathBuf};
use std::process::Command;

fn on_path(name: &str) -> Option<PathBuf> {
    std::env::var_os("PATH").and_then(|paths| {
        std::env::split_paths(&paths)
            .map(|d| d.join(name))
            .find(|p| p.is_file())
    })
}

fn browser() -> Option<PathBuf> {
    if let Some(b) = std::env::var_os("TANDEM_BROWSER") {
        return Some(PathBuf::from(b));
    }
    ["chromium", "chromium-browser", "google-chrome"]
        .iter()
        .find_map(|n| on_path(n))
}

fn run(cmd: &mut Command) -> String {
    let out = cmd.output().expect("run");
    assert!(out.status.success(), "{cmd:?}: {out:?}");
    String::from_utf8_lossy(&out.stdout).to_string()
}

fn print(browser: &Path, html: &Path, pdf: &Path, profile: &Path) {
    let url = format!("file://{}", html.display());
    let out = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg(format!("--print-to-pdf={}", pdf.display()))
        .arg(url)
        .output()
        .expect("run the browser");
    assert!(pdf.is_file(), "no PDF printed: {out:?}");
}

/// The page width in points (from `pdfinfo`) and the number of pages.
fn info(pdf: &Path) -> (f64, usize) {
    let text = run(Command::new("pdfinfo").arg(pdf));
    let field = |key: &str| {
        text.lines()
            .find_map(|l| l.strip_prefix(key))
            .map(str::trim)
            .expect("pdfinfo field")
            .to_string()
    };
    let pages = field("Pages:").parse().expect("pages");
    let size = field("Page size:");
    let width = size
        .split_whitespace()
        .next()
        .and_then(|w| w.parse().ok())
        .expect("width");
    (width, pages)
}

/// An invented bundle of 70 rods between two plates: its parts table
/// runs over more than one sheet.
fn bundle() -> String {
    let mut s = String::from(
        "calc {\n  title = \"Rod bundle RB-1\"\n  number = \"RB-001\"\n  revision = \"C\"\n}\n\
         material steel { E = 29000 ksi }\nnode base at 0 ft\nnode top at 16 ft\nfix base\n",
    );
    for k in 1..=70 {
        s.push_str(&format!(
            "part r{k} {{ material = steel; area = 0.5 in^2; ends = base, top }}\n"
        ));
    }
    s.push_str("case pull { load top = 100 kip }\n");
    s
}

/// Invented demo: a door lintel hung from three rods of different lengths
/// and metals, drawn taller than half a sheet.
const LINTEL: &str = "calc {
  title    = \"Door lintel L-4: three hangers sharing a hoist load\"
  number   = \"HBS-012\"
  revision = \"B\"
}
material steel { E = 29000 ksi; allowable = 0.6 * 36 ksi }
material bronze { E = 16000 ksi; allowable = 14 ksi }
node a  at (0 ft, 0 ft)
node b  at (6 ft, 0 ft)
node c  at (14 ft, 0 ft)
node h  at (10 ft, 0 ft)
node ta at (0 ft, 9 ft)
node tb at (6 ft, 6 ft)
node tc at (14 ft, 12 ft)
fix ta, tb, tc
fix a x
rigid lintel { nodes = a, b, c, h }
part hang_a { material = steel;  area = circle(d = 0.625 in); ends = a, ta }
part hang_b { material = bronze; area = circle(d = 0.75 in);  ends = b, tb }
part hang_c { material = steel;  area = circle(d = 0.625 in); ends = c, tc }
load h = (0 kip, -4.5 kip)
";

#[test]
fn printed_reports_carry_their_header_and_sheet_number_on_every_page() {
    let (Some(browser), Some(_), Some(_)) = (browser(), on_path("pdftotext"), on_path("pdfinfo"))
    else {
        eprintln!("notice: print test skipped: no headless browser or poppler-utils installed");
        return;
    };
    let dir = tempfile::tempdir().expect("tempdir");
    let bundle_file = dir.path().join("bundle.tandem");
    std::fs::write(&bundle_file, bundle()).expect("write");
    // a tall sketch that cannot share its heading's sheet
    let lintel_file = dir.path().join("lintel.tandem");
    std::fs::write(&lintel_file, LINTEL).expect("write");
    let cases = [
        (
            "examples/filled_post.tandem".to_string(),
            "DCS-114 · Column C-3",
            "Revision A",
        ),
        (
            "examples/hung_platform.tandem".to_string(),
            "NWW-207 · Platform SP-2",
            "Revision B",
        ),
        (
            bundle_file.display().to_string(),
            "RB-001 · Rod bundle RB-1",
            "Revision C",
        ),
        (
            lintel_file.display().to_string(),
            "HBS-012 · Door lintel L-4",
            "Revision B",
        ),
        // beams: the longest equations and the moment diagrams
        (
            "examples/mezzanine_edge.tandem".to_string(),
            "QRW-208 · Mezzanine edge beam EB-1 on post P-1 and hanger H-1",
            "Revision B",
        ),
    ];
    for (input, header, revision) in cases {
        let stem = Path::new(&input)
            .file_stem()
            .map(|s| s.to_string_lossy().to_string())
            .expect("stem");
        let html = dir.path().join(format!("{stem}.html"));
        let pdf = dir.path().join(format!("{stem}.pdf"));
        let o = Command::new(env!("CARGO_BIN_EXE_tandem"))
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .args(["report", "--html", &input, "-o"])
            .arg(&html)
            .output()
            .expect("tandem");
        assert_eq!(o.status.code(), Some(0), "{o:?}");
        print(&browser, &html, &pdf, &dir.path().join("profile"));
        let (width, pages) = info(&pdf);
        assert!(pages >= 2, "{stem}: {pages} pages");
        let markdown = String::from_utf8_lossy(
            &Command::new(env!("CARGO_BIN_EXE_tandem"))
                .current_dir(env!("CARGO_MANIFEST_DIR"))
                .args(["report", &input])
                .output()
                .expect("tandem")
                .stdout,
        )
        .to_string();
        let headings: Vec<&str> = markdown
            .lines()
            .filter_map(|l| l.strip_prefix("## "))
            .filter(|h| !h.contains('`'))
            .collect();
        let mut parts_sheets = 0;
        for page in 1..=pages {
            let n = page.to_string();
            let text = run(Command::new("pdftotext")
                .args(["-layout", "-f", &n, "-l", &n])
                .arg(&pdf)
                .arg("-"));
            assert!(text.contains(header), "{stem} sheet {page}: no header");
            assert!(text.contains(revision), "{stem} sheet {page}: no revision");
            assert!(
                text.contains(&format!("Sheet {page} of {pages}")),
                "{stem} sheet {page}: no sheet number"
            );
            assert!(
                !text.contains("file://"),
                "{stem}: the browser's header printed"
            );
            // a sheet with rows of the parts table carries its header row
            if text.contains("base → top") {
                assert!(
                    text.contains("k (kip/in)"),
                    "{stem} sheet {page}: parts table rows without their header"
                );
                parts_sheets += 1;
            }
            // the sketch's sentence is printed on the sheet of the sketch
            if text.contains("Drawn at true geometry") || text.contains("Drawn as a schematic") {
                assert!(
                    text.contains("Figure 1. Sketch of the assembly"),
                    "{stem} sheet {page}: the sketch's words without the sketch"
                );
            }
            // no section heading is the last line of the sheet's body
            let body: Vec<&str> = text
                .lines()
                .map(str::trim)
                .filter(|l| !l.is_empty() && !l.starts_with("tandem ") && !l.contains(header))
                .collect();
            if let Some(last) = body.last() {
                assert!(
                    !headings.contains(last),
                    "{stem} sheet {page}: heading {last:?} stranded at the foot"
                );
            }
            // every word within the page's side margins (16 mm = 45.4 pt)
            let bbox = run(Command::new("pdftotext")
                .args(["-bbox", "-f", &n, "-l", &n])
                .arg(&pdf)
                .arg("-"));
            let mut words = 0;
            for line in bbox.lines().filter(|l| l.trim_start().starts_with("<word")) {
                words += 1;
                let attr = |k: &str| -> f64 {
                    let at = line.find(&format!("{k}=\"")).expect("attribute") + k.len() + 2;
                    line[at..]
                        .split('"')
                        .next()
                        .and_then(|v| v.parse().ok())
                        .expect("number")
                };
                let (x0, x1) = (attr("xMin"), attr("xMax"));
                assert!(
                    x0 >= 45.4 - 1.0 && x1 <= width - 45.4 + 1.0,
                    "{stem} sheet {page}: a word beyond the margins ({x0:.1}..{x1:.1} of {width}): {line}"
                );
            }
            assert!(words > 10, "{stem} sheet {page}: {words} words read back");
        }
        if stem == "bundle" {
            assert!(
                parts_sheets >= 2,
                "the parts table fits one sheet: {parts_sheets}"
            );
        }
    }
}
