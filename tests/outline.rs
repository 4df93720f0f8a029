//! `tandem::check` reads a file in outline: each `node` and `part` is parsed
//! only when the model builder reaches it. The result must be exactly that of
//! the full parse followed by the model builder (`syntax::parse` then
//! `model::build`), which is the reference here: the same model, or the
//! same errors in the same order, for every calc the tests know, for syntax
//! errors inside the deferred statements, and for files large enough to take
//! the parallel paths.

mod common;

use std::fmt::Write as _;

use tandem::source::Source;

/// The full parse and build, as `tandem::check` did before outlines.
fn reference(src: &Source) -> Result<tandem::model::Model, Vec<tandem::Error>> {
    let file = tandem::syntax::parse(&src.text)
        .map_err(|es| es.into_iter().map(tandem::Error::from).collect::<Vec<_>>())?;
    tandem::model::build(&file, tandem::model::Limits::default())
        .map_err(|es| es.into_iter().map(tandem::Error::from).collect())
}

fn same(name: &str, text: &str) {
    let src = Source::new(name, text.to_string());
    let outline = tandem::check(&src);
    let full = reference(&src);
    assert!(
        outline == full,
        "{name}: outline and full parse differ\noutline: {outline:#?}\nfull: {full:#?}"
    );
}

#[test]
fn every_shipped_and_test_calc_checks_the_same_in_outline() {
    let files = common::calc_files();
    assert!(files.len() > 40, "only {} calc files found", files.len());
    let mut failing = 0;
    for f in &files {
        let text = std::fs::read_to_string(f).expect("read calc");
        let name = f.display().to_string();
        same(&name, &text);
        failing += usize::from(tandem::check(&Source::new(&name, text)).is_err());
    }
    // the error files of the diagnostics tests are among them
    assert!(failing > 10, "only {failing} files with errors");
}

const HEAD: &str = "material s { E = 29000 ksi }\nlet a = 2 in^2\nnode n0 at 0 in\nfix n0\n";

/// Syntax errors inside deferred statements are found as the model is
/// built; they must be the full parse's, alone and in file order, also
/// when a statement that is not deferred has one too.
#[test]
fn syntax_errors_in_deferred_statements_are_the_full_parse_errors() {
    let cases = [
        // in a part's block
        "node n1 at 1 in\npart p1 { material = s; area = ; ends = n0, n1 }\n",
        // in a node's position, after the head was read
        "node n1 at 1 in +\npart p1 { material = s; area = a; ends = n0, n1 }\n",
        // text after a part's block
        "node n1 at 1 in\npart p1 { material = s; area = a; ends = n0, n1 } extra\n",
        // several, in nodes and parts, with model errors that must not show
        "node n1 at 1 kips\nnode n2 at (1 in\npart p1 { material = q; area = a; ends = n0, n1 }\npart p2 { material = s area = a; ends = n1, n2 }\n",
        // a statement that is not deferred has an error as well
        "let b = * 2\nnode n1 at 1 in\npart p1 { material = s; area = a; ends = n0 n1 }\n",
        // a head that is not a stub: the whole statement goes to the parser
        "node n1 1 in\npart p1 { material = s; area = a; ends = n0, n1 }\n",
        "part\nnode n1 at 1 in\n",
    ];
    for (i, body) in cases.iter().enumerate() {
        let text = format!("{HEAD}{body}load n1 = 1 kip\n");
        let src = Source::new("case.tandem", text.clone());
        let errors = tandem::check(&src).expect_err("syntax errors");
        assert!(
            errors.iter().all(|e| matches!(e, tandem::Error::Syntax(_))),
            "case {i}: {errors:#?}"
        );
        same(&format!("case {i}"), &text);
    }
    // A model error that ends the build early (no nodes at all, too many
    // declarations) must not hide a syntax error in a deferred part.
    for text in [
        "material s { E = 1 ksi }\npart p { material = s; area = 1.n }\n",
        "tie a, b\npart p { material = s; area = 2 \u{19} * a; ends = a, b }\n",
        // the first node does not parse, so the kind of model is unknown
        "node a at (0 fq, 0 ft)\nnode b at (1 ft, 0 ft)\npart p { ends = a {\n  load b = (0 kip, 1 kip)\n}\n}\n",
    ] {
        let errors = tandem::check(&Source::new("early.tandem", text.to_string()))
            .expect_err("syntax errors");
        assert!(
            errors.iter().all(|e| matches!(e, tandem::Error::Syntax(_))),
            "{errors:#?}"
        );
        same("early", text);
    }
}

/// Nodes and parts beyond 20,000 are built on every core from their
/// outlines; model errors in them (an unknown node, a plane node in an axial
/// model, a position that is not a length, a duplicate name) come in file
/// order, and a clean file gives the full parse's model.
#[test]
fn large_files_check_the_same_in_outline() {
    let n = 24_000;
    let chain = |bad: bool| {
        let mut t = String::from(HEAD);
        for i in 1..=n {
            let at = match i {
                7 if bad => "(7 in, 0 in)".to_string(),
                15_000 if bad => "15000 kip".to_string(),
                _ => format!("{i} in"),
            };
            let _ = writeln!(t, "node n{i} at {at}");
        }
        for i in 1..=n {
            let a = if bad && i == 23_999 {
                "nowhere".to_string()
            } else {
                format!("n{}", i - 1)
            };
            let name = if bad && i == 20_001 { 5 } else { i };
            let _ = writeln!(
                t,
                "part p{name} {{ material = s; area = a; ends = {a}, n{i} }}"
            );
        }
        let _ = writeln!(t, "load n{n} = 10 kip");
        t
    };
    same("clean", &chain(false));
    let bad = chain(true);
    same("bad", &bad);
    let errors = tandem::check(&Source::new("bad", bad)).expect_err("four errors");
    assert_eq!(errors.len(), 4, "{errors:#?}");
}
