//! JSON outputs: each view as serde writes it, with the version of its
//! shape as the first key. The shapes are written down, strictly, in
//! `schema/*.schema.json` (JSON Schema 2020-12); a test validates the
//! outputs against them.

use serde::Serialize;

/// Version of the JSON outputs' shape (`schema_version`, the first key of
/// `design`, `analyze` and `verify` JSON). Raised when a key is renamed or
/// removed or changes meaning or type; keys may be added within a version.
/// NOTE: keep `schema/*.schema.json` in step (their `schema_version` const
/// and `$id`).
pub const SCHEMA_VERSION: u32 = 1;

#[derive(Serialize)]
struct Versioned<'a, T: Serialize> {
    schema_version: u32,
    #[serde(flatten)]
    view: &'a T,
}

/// Pretty JSON of `view` (which must serialise as an object) with
/// `schema_version` first, and a final line end.
pub fn versioned<T: Serialize>(view: &T) -> Result<String, serde_json::Error> {
    let mut s = serde_json::to_string_pretty(&Versioned {
        schema_version: SCHEMA_VERSION,
        view,
    })?;
    s.push('\n');
    Ok(s)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_version_comes_first_and_the_view_follows_unchanged() {
        #[derive(Serialize)]
        struct View {
            b: u8,
            a: Vec<f64>,
        }
        let text = versioned(&View { b: 1, a: vec![0.5] }).unwrap();
        assert_eq!(
            text,
            "{\n  \"schema_version\": 1,\n  \"b\": 1,\n  \"a\": [\n    0.5\n  ]\n}\n"
        );
    }
}
