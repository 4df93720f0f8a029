//! The report's drawings: well-formed SVG (parsed back with `roxmltree`, a
//! general-purpose XML parser) with one element per part, node, support and
//! load of the model; golden drawings of two examples; the files `report
//! -o` writes beside a Markdown report and the SVG an HTML report carries
//! inline.
//!
//! Goldens: `tests/drawings/NAME.*.svg`; regenerate with
//! `UPDATE_GOLDEN=1 cargo test --test it drawings::` and look at them.

use std::path::{Path, PathBuf};

use tandem::report::drawing::{forces, sketch};
use tandem::report::Display;
use tandem::source::Source;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn analyse(path: &Path) -> tandem::Analysis {
    let text = std::fs::read_to_string(path).expect("read");
    let src = Source::new(path.display().to_string(), text);
    tandem::analyse(&src).expect("analyses")
}

/// The `<g class=...>` groups of a drawing, by class.
fn groups(svg: &str, class: &str) -> usize {
    let doc = roxmltree::Document::parse(svg).expect("well-formed SVG");
    assert_eq!(doc.root_element().tag_name().name(), "svg");
    doc.descendants()
        .filter(|n| n.tag_name().name() == "g" && n.attribute("class") == Some(class))
        .count()
}

#[test]
fn every_drawing_is_well_formed_and_draws_every_item_once() {
    let mut files = Vec::new();
    for dir in ["examples", "tests/reports", "tests/sweep"] {
        for e in std::fs::read_dir(root().join(dir))
            .expect("folder")
            .flatten()
        {
            if e.path().extension().is_some_and(|x| x == "tandem") {
                files.push(e.path());
            }
        }
    }
    assert!(files.len() >= 10);
    for path in files {
        let a = analyse(&path);
        let m = &a.model;
        let d = Display::for_model(m, 4);
        let s = sketch(m, &d).svg;
        let name = path.display();
        let beams = m.parts.iter().filter(|p| p.bend.is_some()).count();
        assert_eq!(groups(&s, "part"), m.parts.len() - beams, "parts of {name}");
        assert_eq!(groups(&s, "beam"), beams, "beams of {name}");
        assert_eq!(groups(&s, "node"), m.nodes.len(), "nodes of {name}");
        let along: usize = m.cases.iter().map(|c| c.distributed.len()).sum();
        assert_eq!(
            groups(&s, "line-load"),
            along,
            "loads along beams of {name}"
        );
        let moments: usize = m.cases.iter().map(|c| c.moments.len()).sum();
        assert_eq!(groups(&s, "moment"), moments, "moments of {name}");
        let supported = m.nodes.iter().filter(|n| n.fixed.contains(&true)).count();
        assert_eq!(groups(&s, "support"), supported, "supports of {name}");
        let loads: usize = m.cases.iter().map(|c| c.loads.len()).sum();
        assert_eq!(groups(&s, "load"), loads, "loads of {name}");
        assert_eq!(
            groups(&s, "rigid"),
            m.rigids.len(),
            "rigid bodies of {name}"
        );
        assert_eq!(groups(&s, "tie"), m.ties.len(), "ties of {name}");
        assert_eq!(groups(&s, "key"), 1, "key of {name}");
        for (ci, r) in a.solution.combinations.iter().enumerate() {
            let f = forces(m, r, ci, &d).svg;
            assert_eq!(groups(&f, "part"), m.parts.len() - beams, "parts of {name}");
            assert_eq!(groups(&f, "beam"), beams, "beams of {name}");
            // every beam that bends has its moment diagram
            if r.beams.iter().any(|b| b.moment_max.0 != 0.0) {
                assert_eq!(groups(&f, "moment-diagram"), beams, "diagrams of {name}");
            }
            assert_eq!(groups(&f, "node"), m.nodes.len(), "nodes of {name}");
            assert_eq!(groups(&f, "support"), supported, "supports of {name}");
            // a part's force is written beside it, with the unit
            let doc = roxmltree::Document::parse(&f).expect("well-formed");
            for (i, p) in m.parts.iter().enumerate() {
                let g = doc
                    .descendants()
                    .find(|n| {
                        matches!(n.attribute("class"), Some("part" | "beam"))
                            && n.attribute("data-name") == Some(p.name.as_str())
                    })
                    .expect("part drawn");
                let text: String = g
                    .descendants()
                    .filter(roxmltree::Node::is_text)
                    .filter_map(|n| n.text())
                    .collect::<Vec<_>>()
                    .join(" ");
                assert!(text.contains(&d.force.name), "{name} {}: {text}", p.name);
                // tension and compression differ by line style: a part in
                // compression is a double line (two strokes)
                let lines = g
                    .children()
                    .filter(|n| n.tag_name().name() == "line")
                    .count();
                let n = r.parts[i].force.value;
                let tiny = 1e-9 * r.force_scale.value;
                if n < -tiny
                    && r.parts[i].state == tandem::solve::PartState::Elastic
                    && p.bend.is_none()
                {
                    assert!(lines >= 2, "{name} {} in compression", p.name);
                }
            }
        }
    }
}

#[test]
fn drawings_are_deterministic_at_true_geometry_and_escaped() {
    let text = "node a at (0 m, 0 m)\nnode b at (3 m, 4 m)\nfix a\nfix b\nmaterial s { E = 200 GPa }\npart p { material = s\n area = 100 mm^2\n ends = a, b }\ncase w { load b = (1 kN, 0 kN) }\n";
    let src = Source::new("t.tandem", text.to_string());
    let a = tandem::analyse(&src).expect("analyses");
    let d = Display::for_model(&a.model, 4);
    let svg = sketch(&a.model, &d).svg;
    assert_eq!(svg, sketch(&a.model, &d).svg);
    // true geometry: the 3-4-5 part is drawn with its slope
    let doc = roxmltree::Document::parse(&svg).expect("well-formed");
    let line = doc
        .descendants()
        .find(|n| n.attribute("class") == Some("part"))
        .and_then(|g| g.children().find(|n| n.tag_name().name() == "line"))
        .expect("a line");
    let v = |k: &str| {
        line.attribute(k)
            .and_then(|s| s.parse::<f64>().ok())
            .expect("coordinate")
    };
    let (dx, dy) = (v("x2") - v("x1"), v("y1") - v("y2"));
    assert!((dy / dx - 4.0 / 3.0).abs() < 0.01, "slope {}", dy / dx);
    // text that would break the markup is escaped
    assert_eq!(
        tandem::report::drawing::escape("a<b & \"c\""),
        "a&lt;b &amp; &quot;c&quot;"
    );
}

#[test]
fn golden_drawings() {
    let update = std::env::var_os("UPDATE_GOLDEN").is_some();
    let mut changed = Vec::new();
    for stem in ["filled_post", "hung_platform", "mezzanine_edge"] {
        let a = analyse(&root().join(format!("examples/{stem}.tandem")));
        let d = Display::for_model(&a.model, 4);
        let mut all = vec![sketch(&a.model, &d)];
        for (ci, r) in a.solution.combinations.iter().enumerate() {
            all.push(forces(&a.model, r, ci, &d));
        }
        for g in all {
            let file = root().join(format!("tests/drawings/{stem}.{}", g.suffix));
            if update {
                std::fs::create_dir_all(root().join("tests/drawings")).expect("folder");
                std::fs::write(&file, &g.svg).expect("write golden");
            } else if std::fs::read_to_string(&file).unwrap_or_default() != g.svg {
                changed.push(file.display().to_string());
            }
        }
    }
    assert!(
        changed.is_empty(),
        "drawings changed (UPDATE_GOLDEN=1 to accept): {changed:?}"
    );
}

use super::common::tandem;

#[test]
fn markdown_written_to_a_file_links_its_drawings_beside_it() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("post.md");
    let o = tandem(&[
        "report",
        "examples/filled_post.tandem",
        "-o",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{o:?}");
    let md = std::fs::read_to_string(&out).expect("report");
    for file in [
        "post.sketch.svg",
        "post.forces.service.svg",
        "post.forces.factored.svg",
    ] {
        assert!(md.contains(&format!("]({file})")), "{file} linked");
        let svg = std::fs::read_to_string(dir.path().join(file)).expect("drawing written");
        roxmltree::Document::parse(&svg).expect("well-formed");
    }
    // to standard output: no files, and a line saying how to get them
    let o = tandem(&["report", "examples/filled_post.tandem"]);
    let md = String::from_utf8_lossy(&o.stdout);
    assert!(!md.contains(".svg)"));
    assert!(md.contains("written as SVG files beside the report with `-o FILE.md`"));
}

#[test]
fn html_carries_its_drawings_inline() {
    let o = tandem(&["report", "--html", "examples/hung_platform.tandem"]);
    assert_eq!(o.status.code(), Some(0));
    let html = String::from_utf8_lossy(&o.stdout);
    // the sketch and the one combination's drawing, no links left behind
    assert_eq!(html.matches("<svg xmlns").count(), 2);
    assert!(!html.contains("<img"));
    assert_eq!(html.matches("<figure class=\"drawing\">").count(), 2);
}

/// The capacity path of one rod: elastic up to its yield force, then a
/// mechanism. F_y = f_y·A = 250 MPa · 100 mm² = 25 kN, so λ_y = 25 / 10 =
/// 2.5; the end has moved δ = F·L / (E·A) = 25 kN · 1 m / (200 GPa ·
/// 100 mm²) = 1.25 mm (Hooke's law).
#[test]
fn the_capacity_path_of_one_rod_follows_hookes_law_to_yield() {
    let text =
        "material s { E = 200 GPa\n yield = 250 MPa }\nnode a at 0 m\nnode b at 1 m\nfix a\n\
                part p { material = s; area = 100 mm^2; ends = a, b }\nload b = 10 kN\n";
    let src = Source::new("rod.tandem", text.to_string());
    let a = tandem::analyse(&src).expect("analyses");
    let c = &a.capacity[0];
    assert_eq!(c.path_node, Some(1));
    assert_eq!(c.path.len(), 2);
    assert!(c.path[0].0.abs() < 1e-12 && c.path[0].1.abs() < 1e-15);
    assert!((c.path[1].0 - 2.5).abs() < 1e-9);
    assert!((c.path[1].1 - 1.25e-3).abs() < 1e-12);
    let d = Display::for_model(&a.model, 4);
    let plot = tandem::report::drawing::capacity_plot(&a.model, c, &d).expect("a plot");
    let doc = roxmltree::Document::parse(&plot.svg).expect("well-formed");
    let marks = doc
        .descendants()
        .filter(|n| n.attribute("class") == Some("mark"))
        .count();
    assert_eq!(marks, c.events.len());
    assert!(plot.svg.contains("plastic limit, λ_p = 2.500"));
    assert!(plot.svg.contains("(mm)"));
}

#[test]
fn a_report_written_to_a_file_links_its_capacity_paths() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("sleeve.md");
    let o = tandem(&[
        "report",
        "examples/bolted_sleeve.tandem",
        "-o",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(1), "{o:?}"); // the example's bolt check fails
    let md = std::fs::read_to_string(&out).expect("report");
    assert!(md.contains("](sleeve.capacity.surge.svg)"), "{md}");
    assert!(dir.path().join("sleeve.capacity.surge.svg").is_file());
}

/// Beams in the drawings: drawn heavier than parts, a hinge as an open
/// circle, a clamped support, a moment at a node as a turning arrow; the
/// moment diagram of a simply supported beam under a downward load lies
/// below it, on the side of the fibre in tension (sagging), and reaches
/// its peak, wL²/8, at mid-span (beam tables, from memory).
#[test]
fn beams_are_drawn_with_their_moments_on_the_tension_side() {
    let text = "material s { E = 200 GPa }\n\
                node a at (0 m, 0 m)\nnode b at (4 m, 0 m)\nnode c at (6 m, 0 m)\nnode d at (6 m, -2 m)\n\
                pin a\nfix b y\nfix d\n\
                beam g { material = s; section = rect(b = 100 mm, h = 300 mm); ends = a, b }\n\
                beam h { material = s; section = rect(b = 100 mm, h = 300 mm); ends = b, c; hinge = c }\n\
                beam k { material = s; section = rect(b = 100 mm, h = 300 mm); ends = d, c }\n\
                case w { load g = (0 kN/m, -10 kN/m)\n moment b = 1 kN*m }\n";
    let src = Source::new("beams.tandem", text.to_string());
    let a = tandem::analyse(&src).expect("analyses");
    let d = Display::for_model(&a.model, 4);
    let s = sketch(&a.model, &d).svg;
    assert_eq!(groups(&s, "beam"), 3);
    assert_eq!(groups(&s, "line-load"), 1);
    assert_eq!(groups(&s, "moment"), 1);
    let doc = roxmltree::Document::parse(&s).expect("well-formed");
    let in_group = |class: &str, name: &str, tag: &str| {
        doc.descendants()
            .find(|n| n.attribute("class") == Some(class) && n.attribute("data-name") == Some(name))
            .map_or(0, |g| {
                g.descendants()
                    .filter(|n| n.tag_name().name() == tag)
                    .count()
            })
    };
    // the hinge of `h` is an open circle; the clamp at `d` a filled bar
    assert_eq!(in_group("beam", "h", "circle"), 1);
    assert_eq!(in_group("beam", "g", "circle"), 0);
    assert_eq!(in_group("support", "d", "rect"), 1);
    assert_eq!(in_group("support", "a", "rect"), 0);
    let heavy = doc
        .descendants()
        .find(|n| n.attribute("class") == Some("beam"))
        .and_then(|g| g.children().find(|n| n.tag_name().name() == "line"))
        .and_then(|l| l.attribute("stroke-width"))
        .and_then(|w| w.parse::<f64>().ok())
        .expect("a beam's line");
    assert!(heavy > 1.6, "beams are heavier than parts ({heavy})");
    let f = forces(&a.model, &a.solution.combinations[0], 0, &d).svg;
    let doc = roxmltree::Document::parse(&f).expect("well-formed");
    let diagram = doc
        .descendants()
        .find(|n| {
            n.attribute("class") == Some("moment-diagram") && n.attribute("data-name") == Some("g")
        })
        .expect("the diagram of g");
    let pts: Vec<(f64, f64)> = diagram
        .descendants()
        .find(|n| n.tag_name().name() == "polyline")
        .and_then(|p| p.attribute("points"))
        .expect("points")
        .split(' ')
        .filter_map(|xy| {
            let (x, y) = xy.split_once(',')?;
            Some((x.parse().ok()?, y.parse().ok()?))
        })
        .collect();
    let beam_y = pts[0].1;
    let lowest = pts
        .iter()
        .copied()
        .max_by(|p, q| p.1.total_cmp(&q.1))
        .expect("points");
    // below the beam on the page (y grows downward), near mid-span
    assert!(lowest.1 > beam_y + 10.0, "{pts:?}");
    let (x0, x1) = (pts[0].0, pts[pts.len() - 1].0);
    let t = (lowest.0 - x0) / (x1 - x0);
    assert!((0.3..0.6).contains(&t), "peak at {t} of the span");
}
