//! The hand-written statement parser must build exactly the syntax tree that
//! the pest grammar (`grammar/tandem.pest`) and its lowering build, and must
//! refuse exactly what they refuse. The grammar is the reference here: each
//! statement is parsed both ways and the results compared.

mod common;

use common::Rng;

fn agree(text: &str) -> usize {
    match tandem::syntax::compare_parsers(text) {
        Ok(n) => n,
        Err(e) => panic!("parsers disagree on\n{text}\n{e}"),
    }
}

#[test]
fn every_shipped_and_test_calc_parses_the_same_both_ways() {
    let files = common::calc_files();
    assert!(files.len() > 40, "only {} calc files found", files.len());
    let mut statements = 0;
    for f in &files {
        let text = std::fs::read_to_string(f).expect("read calc");
        statements += agree(&text);
    }
    assert!(statements > 300, "only {statements} statements compared");
}

/// Hand-picked corners of the grammar: where a PEG backtracks, where blanks
/// and comments may stand, where the lowering refuses what the grammar takes.
#[test]
fn grammar_corners_parse_the_same_both_ways() {
    let cases = [
        "let a = 10 ft * b",
        "let a = 10 ft * b * 2",
        "let e = 57000 psi * sqrt(fc / psi)",
        "group hangers = h1, h2, h3",
        "group g = a",
        "check \"s\" for h in hangers : h.stress <= 1 MPa",
        "check \"s\" for h in hangers under factored : h.stress <= 1 MPa",
        "check \"s\" under service, factored long_term : a.force <= 1 kN",
        "check \"s\" under long_term : a.force <= 1 kN",
        "check \"s\" under short_term : a.force <= 1 kN",
        "check \"s\" under service : a.force <= 1 kN",
        "let e = 50 kN * max(1, 2)",
        "let e = 50 kN * max (1, 2)",
        "check \"r\" : 1 MPa / rod.stress <= 2",
        "check \"r\" : 1 MPa / rod . stress <= 2",
        "let e = 2 in^2 * f(x)",
        "let a = 10 ft * (b)",
        "let a = 2 in ^ x",
        "let a = 2 in^-2",
        "let a = 2 in ^ -2",
        "let a = 2 in ^ - 2",
        "let a = 2 in^13",
        "let a = 2 in^99999999999",
        "let a = 2e",
        "let a = 2e5x",
        "let a = 1e999",
        "let a = 1__0",
        "let a = 1_000.5_5e-3 kip",
        "let a = 1. + .5",
        "let a = . 5",
        "let a = 2in",
        "let a = 3 kips",
        "let a = 3 kip in",
        "let a = 3 in at",
        "let a = - - -3",
        "let a = -2^-2^3",
        "let a = a^b^c",
        "let a = f (x)",
        "let a = f(x, y = 2, )",
        "let a = f(x == 2)",
        "let a = f(a <= b)",
        "let a = f()",
        "let a = f(",
        "let a = p . force",
        "let a = p.5",
        "let a = ((1 + 2) * 3) / psi",
        "let a = sqrt(fc / psi) * psi # comment",
        "let a = 1 +",
        "let a = 1 + # c",
        "let let = 2",
        "let_x = 2",
        "letx = 2",
        "calc { title = \"a \\\"b\\\" \\\\ c\" ; revision = \"R\" }",
        "calc { title = \"bad \\n escape\" }",
        "calc { title = \"é ü\" }",
        "calc {}",
        "calc { ; ; }",
        "calc {\n\n title = \"x\"\n\n}",
        "calc { title = \"x\" revision = \"y\" }",
        "calc { title = \"x\", 2 }",
        "material s { E = 29000 ksi; alpha = 6.5e-6 / degF }",
        "material s { E = 29000 ksi;; }",
        "material s { E = 29000 ksi, 3 ksi }",
        "material s { E = }",
        "material s { # only a comment\n E = 1 ksi # and another\n }",
        "part p { material = s; area = a; ends = n0, n1 }",
        "part p { material = s\r\n area = a\r\n ends = n0, n1 }",
        "part p {material=s;area=a;ends=n0,n1}",
        "rigid r { nodes = a, b }",
        "node a at 3 ft",
        "node a at (3 ft, 4 ft)",
        "node a at (3 ft)",
        "node a at (3 ft, 4 ft) + 1 ft",
        "node a at (1e999 in, 2 in)",
        "node at at 3 in",
        "node a 3 in",
        "node a atx 3 in",
        "fix a",
        "fix a x",
        "fix a xy",
        "fix a x y",
        "fix a, b y, c",
        "fix x x",
        "fix a,",
        "tie a, b, c",
        "tie a",
        "tie a, ",
        "settle a = 2 mm",
        "settle a y = -2 mm",
        "settle x y = 1 mm",
        "settle a z = 1 mm",
        "case dead { load b = 5 kip }",
        "case dead sustained { load b = 5 kip; temperature = 30 degF }",
        "case sustained { }",
        "case a sustained sustained {\n load b = (1 kip, -2 kip)\n strain p = 100 microstrain\n}",
        "case a sustainedx { }",
        "case a { let x = 2 }",
        "case a { load b = 1 kip load c = 2 kip }",
        "combine c = 1.2 dead + 1.6 live",
        "combine c = - 1.2 * dead - live",
        "combine c = 2e",
        "combine c = 2e5x",
        "combine c = 1.2 * * dead",
        "combine c = dead +",
        "combine c = 1e999 dead",
        "check \"stress\" : p.stress <= 0.6 * fy",
        "check \"a\": x >= 2",
        "check \"a\": x < 2",
        "check \"a\": x > 2",
        "check \"a\": x = 2",
        "check \"a\": x < = 2",
        "check \"a\" x < 2",
        "units us",
        "units si",
        "units usx",
        "units us, kip",
        "units kip, in, ksi",
        "units kip/in^2, kN/m",
        "units kip, foo",
        "load b = 5 kip",
        "load b = (0 kip, -5 kip)",
        "temperature = 40 degF",
        "temperature p = 40 degF",
        "temperature p 40 degF",
        "strain p = 200 microstrain",
        "frobnicate a = 2",
        "part p { ends = a, b } extra",
        "# only a comment",
        "   ",
        "let a = 2 # trailing",
        "let a = 2\r",
        "\tlet\ta\t=\t2\t",
    ];
    for c in cases {
        agree(c);
    }
}

/// Token soup: random sequences of the language's tokens, blanks, comments
/// and line ends, most of them wrong, each parsed both ways.
#[test]
fn random_token_sequences_parse_the_same_both_ways() {
    const HEADS: &[&str] = &[
        "let",
        "material",
        "part",
        "rigid",
        "node",
        "fix",
        "tie",
        "settle",
        "case",
        "combine",
        "check",
        "units",
        "load",
        "temperature",
        "strain",
        "calc",
        "a",
        "",
    ];
    const TOKENS: &[&str] = &[
        "a",
        "b",
        "x",
        "y",
        "at",
        "sustained",
        "us",
        "si",
        "kip",
        "in",
        "ft",
        "ksi",
        "psi",
        "mm",
        "kN",
        "degF",
        "e",
        "E",
        "sqrt",
        "max",
        "p.force",
        "2",
        "10",
        "1.5",
        ".5",
        "1.",
        "2e3",
        "1e-5",
        "1_000",
        "1e999",
        "=",
        "==",
        "<=",
        ">=",
        "<",
        ">",
        "+",
        "-",
        "*",
        "/",
        "^",
        "(",
        ")",
        ",",
        ".",
        ":",
        ";",
        "{",
        "}",
        "\n",
        "\"t\"",
        "\"a\\\"b\"",
        "#c\n",
        " ",
        "\t",
        "\r",
        "^2",
        "^-2",
        "^ 13",
    ];
    let mut rng = Rng(0x5eed_1234_abcd_0042);
    let mut compared = 0;
    for _ in 0..30_000 {
        let mut t = String::from(rng.pick(HEADS));
        for _ in 0..rng.below(14) {
            t.push(' ');
            t.push_str(rng.pick(TOKENS));
        }
        compared += agree(&t);
    }
    assert!(compared > 20_000, "only {compared} statements compared");
}

/// Statements built from the grammar, so that most of them parse: the
/// agreement must hold on the accepted ones too, not only on errors.
#[test]
fn random_well_formed_statements_parse_the_same_both_ways() {
    fn value(rng: &mut Rng, depth: usize) -> String {
        let atoms = [
            "2",
            "1.5",
            "3 kip",
            "4 in^2",
            "29000 ksi",
            "a",
            "b",
            "p.force",
            "psi",
            "10 ft * b",
            "2 kN/m",
            "0.5e-3",
        ];
        if depth == 0 || rng.chance(0.4) {
            return rng.pick(&atoms).to_string();
        }
        match rng.below(6) {
            0 => format!(
                "{} {} {}",
                value(rng, depth - 1),
                rng.pick(&["+", "-"]),
                value(rng, depth - 1)
            ),
            1 => format!(
                "{}{}{}",
                value(rng, depth - 1),
                rng.pick(&[" * ", "/", " / "]),
                value(rng, depth - 1)
            ),
            2 => format!("-{}", value(rng, depth - 1)),
            3 => format!("({})", value(rng, depth - 1)),
            4 => format!(
                "{}^{}",
                rng.pick(&["a", "2", "(b)"]),
                rng.pick(&["2", "-1", "a"])
            ),
            _ => format!(
                "{}({}, d = {})",
                rng.pick(&["sqrt", "max", "min", "f"]),
                value(rng, depth - 1),
                value(rng, depth - 1)
            ),
        }
    }
    let mut rng = Rng(0x0bad_cafe_1357_9bdf);
    let mut accepted = 0;
    for _ in 0..5_000 {
        let v = value(&mut rng, 3);
        let w = value(&mut rng, 2);
        let stmt = match rng.below(8) {
            0 => format!("let a = {v}"),
            1 => format!("node n at ({v}, {w})"),
            2 => format!("material m {{ E = {v}\n  alpha = {w} }}"),
            3 => format!("part p {{ material = m; area = {v}; ends = a, b }}"),
            4 => format!("check \"c\" : {v} <= {w}"),
            5 => format!("case c {{ load n = {v}; settle n x = {w} }}"),
            6 => format!(
                "combine k = {} dead - live",
                rng.pick(&["1.2", "2", "0.9 *"])
            ),
            _ => format!("temperature = {v} # warm"),
        };
        if tandem::syntax::parse(&stmt).is_ok() {
            accepted += 1;
        }
        agree(&stmt);
    }
    assert!(accepted > 2_000, "only {accepted} of 5000 accepted");
}
