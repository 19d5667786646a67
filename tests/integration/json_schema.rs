//! Every JSON output against its schema in `schema/` (JSON Schema
//! 2020-12, the published IETF draft the files declare, checked by an
//! independent validator): `design` on every example (worst case and
//! nominal, and an infeasible specification), `analyze` and `verify` on
//! each example's best design. The schemas are strict (every object lists
//! its keys, all required, and admits no other), so a key added to an
//! output without the schema fails here; see DEVELOPERS.md.

use crate::cli_errors::{run, temp_dir, BASE};
use serde_json::Value;
use std::path::{Path, PathBuf};

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn schema(name: &str) -> Value {
    let path = root().join("schema").join(format!("{name}.schema.json"));
    serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap()
}

fn validator(name: &str) -> jsonschema::Validator {
    let s = schema(name);
    jsonschema::draft202012::new(&s).unwrap_or_else(|e| panic!("{name} schema: {e}"))
}

/// Every validation error of `doc`, one per line.
fn errors(v: &jsonschema::Validator, doc: &Value) -> String {
    v.iter_errors(doc)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect::<Vec<_>>()
        .join("\n")
}

fn examples() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root().join("examples"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        .collect();
    v.sort();
    assert!(v.len() >= 6);
    v
}

/// The JSON a command prints (exit 0 or 1).
fn output(args: &[&str], cwd: &Path) -> Value {
    let out = run(args, cwd);
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("{args:?}: {e}"))
}

#[test]
#[allow(clippy::unwrap_used)]
fn every_json_output_of_every_example_meets_its_schema() {
    let design = validator("design");
    let analyze = validator("analyze");
    let verify = validator("verify");
    let dir = temp_dir("json-schema");
    let mut checked = 0;
    for ex in examples() {
        let spec = ex.to_str().unwrap();
        for extra in [
            &[][..],
            &["--nominal"],
            &["--top", "30", "--prefer", "low-power"],
        ] {
            let mut args = vec!["design", spec, "--format", "json"];
            args.extend_from_slice(extra);
            let doc = output(&args, &dir);
            assert_eq!(errors(&design, &doc), "", "{args:?}");
            assert_eq!(
                doc["schema_version"],
                gatewright::report::json::SCHEMA_VERSION
            );
            checked += 1;
            if !extra.is_empty() {
                continue;
            }
            let best = &doc["designs"][0];
            let values: Vec<String> = best["values"]
                .as_object()
                .unwrap()
                .iter()
                .map(|(k, v)| format!("{k}={}", v.as_f64().unwrap()))
                .collect();
            let topology = best["topology"].as_str().unwrap();
            let doc = output(
                &[
                    "analyze",
                    spec,
                    "--topology",
                    topology,
                    "--values",
                    &values.join(","),
                    "--format",
                    "json",
                ],
                &dir,
            );
            assert_eq!(errors(&analyze, &doc), "", "analyze {spec}");
            let doc = output(
                &[
                    "verify",
                    spec,
                    "--topology",
                    topology,
                    "--values",
                    &values.join(","),
                    "--format",
                    "json",
                ],
                &dir,
            );
            assert_eq!(errors(&verify, &doc), "", "verify {spec}");
            checked += 2;
        }
    }
    // An answer with no design: every topology's reason.
    std::fs::write(
        dir.join("none.toml"),
        BASE.replace("gain = 4.0", "gain = 9000"),
    )
    .unwrap();
    let doc = output(&["design", "none.toml", "--format", "json"], &dir);
    assert_eq!(doc["designs"].as_array().map(Vec::len), Some(0));
    assert_eq!(errors(&design, &doc), "");
    assert!(checked >= 30, "{checked}");
    let _ = std::fs::remove_dir_all(&dir);
}

/// Each object in a schema, with its path.
fn objects<'a>(node: &'a Value, at: String, out: &mut Vec<(String, &'a Value)>) {
    match node {
        Value::Object(map) => {
            if map.get("type") == Some(&Value::from("object")) {
                out.push((at.clone(), node));
            }
            for (k, v) in map {
                objects(v, format!("{at}/{k}"), out);
            }
        }
        Value::Array(list) => {
            for (i, v) in list.iter().enumerate() {
                objects(v, format!("{at}/{i}"), out);
            }
        }
        _ => {}
    }
}

// Strict means: an object with named keys requires every one of them (or,
// for a key that only some outputs carry, requires it exactly when its
// condition holds) and admits no other; a map (designator → ohms) restricts its key names and
// its values. So neither a new key nor a dropped one passes unnoticed.
#[test]
#[allow(clippy::unwrap_used)]
fn the_schemas_are_strict() {
    for name in ["design", "analyze", "verify"] {
        let s = schema(name);
        assert_eq!(
            s["properties"]["schema_version"]["const"],
            gatewright::report::json::SCHEMA_VERSION,
            "{name}"
        );
        let mut all = Vec::new();
        objects(&s, String::new(), &mut all);
        assert!(all.len() >= 3, "{name}");
        for (at, o) in all {
            match o.get("properties") {
                Some(Value::Object(props)) => {
                    assert_eq!(o["additionalProperties"], false, "{name}{at}");
                    let names = |v: &Value| -> Vec<String> {
                        v.as_array()
                            .map(|a| a.iter().map(|x| x.as_str().unwrap().to_string()).collect())
                            .unwrap_or_default()
                    };
                    // Required always, or required exactly when a
                    // condition holds (`then`, and forbidden in `else`).
                    let mut covered = names(&o["required"]);
                    covered.extend(names(&o["then"]["required"]));
                    covered.sort_unstable();
                    let mut keys: Vec<String> = props.keys().cloned().collect();
                    keys.sort_unstable();
                    assert_eq!(covered, keys, "{name}{at}");
                    assert_eq!(
                        names(&o["then"]["required"]),
                        names(&o["else"]["not"]["required"]),
                        "{name}{at}: a conditional key is forbidden otherwise"
                    );
                }
                _ => {
                    assert!(
                        o.get("propertyNames").is_some(),
                        "{name}{at}: a map names its keys"
                    );
                    assert!(
                        o["additionalProperties"].is_object(),
                        "{name}{at}: a map types its values"
                    );
                }
            }
        }
    }
}

// The validator does reject what the strict schema forbids: a real output
// with one key added, one removed, or one of the wrong type.
#[test]
#[allow(clippy::unwrap_used)]
fn an_unknown_or_missing_key_fails_the_schema() {
    let design = validator("design");
    let dir = temp_dir("json-schema-strict");
    let spec = root().join("examples/line-gain.toml");
    let doc = output(
        &[
            "design",
            spec.to_str().unwrap(),
            "--format",
            "json",
            "--top",
            "2",
        ],
        &dir,
    );
    assert_eq!(errors(&design, &doc), "");
    let mut added = doc.clone();
    added["designs"][0]["metrics"]["new_metric"] = Value::from(1.0);
    assert!(errors(&design, &added).contains("new_metric"));
    let mut removed = doc.clone();
    removed["effort"]
        .as_object_mut()
        .unwrap()
        .remove("exact_checks");
    assert!(errors(&design, &removed).contains("exact_checks"));
    let mut retyped = doc.clone();
    retyped["designs"][1]["rank"] = Value::from("2");
    assert!(!errors(&design, &retyped).is_empty());
    let mut unversioned = doc.clone();
    unversioned
        .as_object_mut()
        .unwrap()
        .remove("schema_version");
    assert!(errors(&design, &unversioned).contains("schema_version"));
    // The nominal note comes with nominal mode and with nothing else.
    let mut noted = doc;
    noted["mode_note"] = Value::from("nominal only, not worst case: ...");
    assert!(!errors(&design, &noted).is_empty());
    noted["mode"] = Value::from("nominal");
    assert_eq!(errors(&design, &noted), "");
    noted.as_object_mut().unwrap().remove("mode_note");
    assert!(!errors(&design, &noted).is_empty());
    let _ = std::fs::remove_dir_all(&dir);
}
