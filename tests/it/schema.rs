//! The JSON of `solve --json`: its schema (docs/solve.schema.json) is
//! generated from the output structs and kept in step by a golden test,
//! and the output of every shipped calc validates against it with
//! `jsonschema`, a general-purpose JSON Schema validator.
//!
//! Regenerate the schema with `UPDATE_GOLDEN=1 cargo test --test it schema::`.

use std::path::PathBuf;

use tandem::source::Source;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn the_published_schema_is_the_generated_one() {
    let file = root().join("docs/solve.schema.json");
    let schema = tandem::report::json::schema();
    if std::env::var_os("UPDATE_GOLDEN").is_some() {
        std::fs::write(&file, &schema).expect("write schema");
    }
    assert_eq!(
        std::fs::read_to_string(&file).unwrap_or_default(),
        schema,
        "docs/solve.schema.json is out of date (UPDATE_GOLDEN=1 to regenerate)"
    );
}

#[test]
fn every_calc_validates_against_the_schema() {
    let schema: serde_json::Value =
        serde_json::from_str(&tandem::report::json::schema()).expect("schema is JSON");
    let validator = jsonschema::validator_for(&schema).expect("a valid schema");
    let mut n = 0;
    for dir in ["examples", "tests/reports", "tests/sweep"] {
        for e in std::fs::read_dir(root().join(dir))
            .expect("folder")
            .flatten()
        {
            let path = e.path();
            if path.extension().is_none_or(|x| x != "tandem") {
                continue;
            }
            let src = Source::new(
                path.display().to_string(),
                std::fs::read_to_string(&path).expect("read"),
            );
            let a = tandem::analyse(&src).expect("analyses");
            let doc = tandem::report::json::solution_json(&src.name, &a);
            let errors: Vec<String> = validator
                .iter_errors(&doc)
                .map(|e| format!("{e} at {}", e.instance_path()))
                .collect();
            assert!(errors.is_empty(), "{}: {errors:?}", path.display());
            assert_eq!(doc["schema_version"], tandem::report::json::SCHEMA_VERSION);
            n += 1;
        }
    }
    assert!(n >= 10);
    // the schema is not vacuous: a record missing a key fails
    let src = Source::new(
        "examples/filled_post.tandem",
        std::fs::read_to_string(root().join("examples/filled_post.tandem")).expect("read"),
    );
    let a = tandem::analyse(&src).expect("analyses");
    let mut doc = tandem::report::json::solution_json(&src.name, &a);
    doc["combinations"][0]["parts"][0]
        .as_object_mut()
        .expect("a part")
        .remove("force_N");
    assert!(!validator.is_valid(&doc));
}

#[test]
fn check_demand_and_capacity_carry_their_unit() {
    let src = Source::new(
        "examples/filled_post.tandem",
        std::fs::read_to_string(root().join("examples/filled_post.tandem")).expect("read"),
    );
    let a = tandem::analyse(&src).expect("analyses");
    let doc = tandem::report::json::solution_json(&src.name, &a);
    let unit = |label: &str| {
        doc["checks"]
            .as_array()
            .expect("checks")
            .iter()
            .find(|c| c["label"] == label)
            .map(|c| c["unit"].clone())
            .expect("check")
    };
    assert_eq!(unit("fill service stress"), "Pa");
    assert_eq!(unit("cap movement"), "m");
}
