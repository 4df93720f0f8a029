//! `--csv DIR`: parts.csv, nodes.csv and checks.csv, read back with the
//! `csv` crate. One row per combination and item, units in the headers,
//! values equal to the solution; the reactions in nodes.csv balance the
//! applied loads (statics); a label with a comma or quote is quoted
//! (RFC 4180).

use std::path::Path;

use super::common::tandem;

fn read(path: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let mut r = csv::Reader::from_path(path).expect("csv");
    let head = r
        .headers()
        .expect("header")
        .iter()
        .map(String::from)
        .collect();
    let rows = r
        .records()
        .map(|x| x.expect("record").iter().map(String::from).collect())
        .collect();
    (head, rows)
}

#[test]
fn solve_writes_the_three_tables_with_units_in_the_headers() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("data");
    let o = tandem(&[
        "solve",
        "examples/hung_platform.tandem",
        "--csv",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let text = std::fs::read_to_string("examples/hung_platform.tandem").expect("read");
    let a = tandem::analyse(&tandem::source::Source::new("h", text)).expect("analyses");
    let kip = 4_448.221_615_260_5; // N per kip (NIST SP 811, B.8)

    let (head, rows) = read(&out.join("parts.csv"));
    assert_eq!(head[2], "force (kip)");
    assert_eq!(head[3], "stress (ksi)");
    assert_eq!(head[6], "elongation (in)");
    assert_eq!(
        rows.len(),
        a.solution.combinations.len() * a.model.parts.len()
    );
    for (row, pr) in rows.iter().zip(&a.solution.combinations[0].parts) {
        let f: f64 = row[2].parse().expect("number");
        assert!((f * kip - pr.force.value).abs() <= 1e-9 * pr.force.value.abs());
    }

    let (head, rows) = read(&out.join("nodes.csv"));
    assert_eq!(head[4..], ["reaction x (kip)", "reaction y (kip)"]);
    // ΣRy balances the 6 kip actuator load: statics of the whole assembly
    let ry: f64 = rows
        .iter()
        .filter(|r| !r[5].is_empty())
        .map(|r| r[5].parse::<f64>().expect("number"))
        .sum();
    assert!((ry - 6.0).abs() < 1e-9, "ΣRy = {ry}");
    // a free direction has no reaction
    assert!(rows.iter().any(|r| r[1] == "tip" && r[5].is_empty()));

    let (head, rows) = read(&out.join("checks.csv"));
    assert_eq!(head[..4], ["check", "state", "combination", "governing"]);
    let tip = rows
        .iter()
        .find(|r| r[0] == "tip deflection")
        .expect("check row");
    assert_eq!(tip[6], "in");
    // 12 ft / 240 = 0.6 in, written without conversion noise
    assert_eq!(tip[5], "0.6");
}

#[test]
fn report_csv_for_several_files_writes_a_folder_each_and_quotes_labels() {
    let dir = tempfile::tempdir().expect("tempdir");
    let calc = dir.path().join("quoted.tandem");
    std::fs::write(
        &calc,
        "material s { E = 200 GPa }\nnode a at 0 m\nnode b at 2 m\nfix a\n\
         part p { material = s; area = 100 mm^2; ends = a, b }\nload b = 10 kN\n\
         check \"stress, \\\"rod\\\" p\" : p.stress <= 250 MPa\n",
    )
    .expect("write");
    let out = dir.path().join("tables");
    let reports = dir.path().join("reports");
    std::fs::create_dir(&reports).expect("folder");
    let o = tandem(&[
        "report",
        calc.to_str().expect("utf-8"),
        "examples/filled_post.tandem",
        "-o",
        reports.to_str().expect("utf-8"),
        "--csv",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    assert!(out.join("filled_post/parts.csv").is_file());
    let (_, rows) = read(&out.join("quoted/checks.csv"));
    assert_eq!(rows[0][0], "stress, \"rod\" p");
    let raw = std::fs::read_to_string(out.join("quoted/checks.csv")).expect("read");
    assert!(raw.contains("\"stress, \"\"rod\"\" p\""), "{raw}");
}

/// A model with beams adds their bending to parts.csv and the rotations to
/// nodes.csv: the mezzanine example's moments over the post balance (the
/// two beams' end moments there are one moment, as along each beam), and
/// the reaction moment column is empty where no rotation is held.
#[test]
fn beams_add_their_bending_to_the_tables() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("data");
    let o = tandem(&[
        "solve",
        "examples/mezzanine_edge.tandem",
        "--csv",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let (head, rows) = read(&out.join("parts.csv"));
    let col = |name: &str| {
        head.iter()
            .position(|h| h == name)
            .unwrap_or_else(|| panic!("no column {name} in {head:?}"))
    };
    let (kind, at_a, at_b) = (
        col("kind"),
        col("moment at A (kip·ft)"),
        col("moment at B (kip·ft)"),
    );
    let row = |part: &str| {
        rows.iter()
            .find(|r| r[0] == "service" && r[1] == part)
            .expect("row")
    };
    assert_eq!(row("edge_west")[kind], "beam");
    assert_eq!(row("column")[kind], "part");
    assert_eq!(row("column")[at_a], "");
    let num = |s: &str| s.parse::<f64>().expect("number");
    // continuous over the post: the moment at the end of one is the moment
    // at the start of the next
    let (west_b, east_a) = (num(&row("edge_west")[at_b]), num(&row("edge_east")[at_a]));
    assert!(
        (west_b - east_a).abs() <= 1e-9 * west_b.abs(),
        "{west_b} {east_a}"
    );
    assert!(west_b < 0.0, "hogging over the post");
    let (head, rows) = read(&out.join("nodes.csv"));
    let rot = head
        .iter()
        .position(|h| h == "rotation (rad)")
        .expect("rotation column");
    let held = head
        .iter()
        .position(|h| h == "reaction moment (kip·ft)")
        .expect("reaction moment column");
    let ledger = rows.iter().find(|r| r[1] == "ledger").expect("ledger");
    assert!(num(&ledger[rot]) < 0.0, "the ledger end turns");
    assert_eq!(ledger[held], "", "a pin holds no moment");
    let base = rows.iter().find(|r| r[1] == "base").expect("base");
    assert_eq!(base[rot], "", "no beam turns the post's base");
}
