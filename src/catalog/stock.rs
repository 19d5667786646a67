//! In-house stock lists: the resistor values actually on the shelf.
//!
//! Schema (TOML; documented for users in `catalogs/README.md`):
//!
//! ```toml
//! name = "bench drawer"   # optional, default "stock"
//! tolerance = 0.05        # optional default for parts, relative, in [0, 1)
//! power = "250m"          # optional default rating for parts, watts
//!
//! [[part]]
//! value = "4k7"           # ohms: a number or engineering text
//! tolerance = 0.01        # optional, overrides the default
//! power = 0.5             # optional, watts, overrides the default
//! ```
//!
//! Every part needs a tolerance, its own or the default. Values are sorted
//! ascending. A value listed more than once (equal within
//! [`RELATIVE_SLACK`]), as a distributor's export lists one value at several
//! tolerances and ratings, is kept once: the entry of the tightest
//! tolerance (on a tie the highest rating, then the first in the file). Any
//! design that the looser entries allow, the tightest allows too: its
//! tolerance extremes lie inside theirs. Parts are numbered from 1 in
//! messages, in file order.

use serde::Deserialize;
use toml::Spanned;

use super::{Catalog, CatalogError, Part, RELATIVE_SLACK};
use crate::lines::LineIndex;
use crate::units::{parse_quantity, Quantity};

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStock {
    name: Option<Spanned<String>>,
    tolerance: Option<Spanned<toml::Value>>,
    power: Option<Spanned<toml::Value>>,
    part: Option<Vec<RawPart>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPart {
    value: Spanned<toml::Value>,
    tolerance: Option<Spanned<toml::Value>>,
    power: Option<Spanned<toml::Value>>,
}

/// One `[[part]]` table read on its own (see [`by_part`]).
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct OnePart {
    part: Vec<RawPart>,
}

/// Reads fields against the source text so errors quote it and give lines
/// (the line index is built on the first error).
struct Reader<'a> {
    text: &'a str,
    lines: std::cell::OnceCell<LineIndex<'a>>,
}

impl<'a> Reader<'a> {
    fn new(text: &'a str) -> Self {
        Reader {
            text,
            lines: std::cell::OnceCell::new(),
        }
    }

    fn line(&self, at: usize) -> usize {
        self.lines
            .get_or_init(|| LineIndex::new(self.text))
            .line(at)
    }

    fn error<T>(&self, field: &str, raw: &Spanned<T>, rule: &str) -> CatalogError {
        let span = raw.span();
        let value = self
            .text
            .get(span.clone())
            .unwrap_or("?")
            .trim()
            .to_string();
        CatalogError::Invalid {
            field: field.to_string(),
            value,
            rule: rule.to_string(),
            line: Some(self.line(span.start)),
        }
    }

    /// A number or engineering text of quantity `q`, finite and greater
    /// than 0, in `unit`.
    fn positive(
        &self,
        field: &str,
        raw: &Spanned<toml::Value>,
        q: Quantity,
        unit: &str,
    ) -> Result<f64, CatalogError> {
        let v = match raw.get_ref() {
            toml::Value::Float(f) => *f,
            toml::Value::Integer(i) => *i as f64,
            toml::Value::String(s) => parse_quantity(s, q).map_err(|e| {
                let rule = if e.wrong_unit {
                    e.reason
                } else {
                    format!(
                        "is not engineering notation ({}); write e.g. \"4k7\", \"2.2M\" or 470",
                        e.reason
                    )
                };
                self.error(field, raw, &rule)
            })?,
            _ => {
                return Err(self.error(
                    field,
                    raw,
                    &format!("must be a number of {unit} or text such as \"4k7\""),
                ))
            }
        };
        if !(v.is_finite() && v > 0.0) {
            return Err(self.error(
                field,
                raw,
                &format!("must be a finite number greater than 0 {unit}"),
            ));
        }
        Ok(v)
    }

    /// A relative tolerance in `[0, 1)`.
    fn tolerance(&self, field: &str, raw: &Spanned<toml::Value>) -> Result<f64, CatalogError> {
        let v = match raw.get_ref() {
            toml::Value::Float(f) => Some(*f),
            toml::Value::Integer(i) => Some(*i as f64),
            _ => None,
        };
        match v {
            Some(t) if (0.0..1.0).contains(&t) => Ok(t),
            _ => Err(self.error(
                field,
                raw,
                "must be a fraction in [0, 1), e.g. 0.05 for ±5 %",
            )),
        }
    }
}

/// Parse a stock list (TOML text, schema in the module docs) into a
/// [`Catalog`] sorted by ascending resistance (ohms), with per-part
/// tolerances (relative) and power ratings (watts).
///
/// Errors name the field, the value as written, the rule and the line: a
/// TOML syntax error, an unknown key, no `[[part]]` at all, a value that is
/// not a finite resistance above 0 ohms, a tolerance outside `[0, 1)` or
/// missing, or a power rating not above 0 watts.
pub fn parse(text: &str) -> Result<Catalog, CatalogError> {
    match by_part(text) {
        Some(c) => Ok(c),
        None => whole(text),
    }
}

/// The stock list read one `[[part]]` table at a time, for long lists: a
/// TOML document tree of a million parts takes over a gigabyte, one part's
/// a few hundred bytes. The text is cut before every line that is a
/// `[[part]]` header; the part before the first is the top-level table.
/// `None` when any piece does not read as exactly that (a header inside a
/// multi-line string leaves a piece with an unterminated string, a
/// sub-table or another header an unknown key, a bad value its error):
/// the whole document is read then, which gives the same catalog where
/// this one succeeds and the error, with its line, where it fails.
fn by_part(text: &str) -> Option<Catalog> {
    let starts = part_headers(text);
    let first = *starts.first()?;
    let top = text.get(..first)?;
    let head: RawStock = toml::from_str(top).ok()?;
    if head.part.is_some() {
        return None;
    }
    let (name, default_tol, default_power) = top_level(&Reader::new(top), &head).ok()?;
    let mut parts: Vec<Part> = Vec::with_capacity(starts.len());
    for (i, &at) in starts.iter().enumerate() {
        let end = starts.get(i + 1).copied().unwrap_or(text.len());
        let piece = text.get(at..end)?;
        let one: OnePart = toml::from_str(piece).ok()?;
        let [raw] = one.part.as_slice() else {
            return None;
        };
        let r = Reader::new(piece);
        parts.push(part(&r, i + 1, raw, default_tol, default_power).ok()?);
    }
    Some(finish(name, parts))
}

/// Byte offsets of the lines that are a `[[part]]` header (spaces inside
/// the brackets, a quoted key and a comment after it allowed).
fn part_headers(text: &str) -> Vec<usize> {
    let mut out = Vec::new();
    let mut at = 0;
    for line in text.split_inclusive('\n') {
        if is_part_header(line) {
            out.push(at);
        }
        at += line.len();
    }
    out
}

fn is_part_header(line: &str) -> bool {
    let Some(rest) = line.trim_start().strip_prefix("[[") else {
        return false;
    };
    let Some((key, after)) = rest.split_once("]]") else {
        return false;
    };
    let after = after.trim_start();
    matches!(key.trim(), "part" | "\"part\"" | "'part'")
        && (after.is_empty() || after.starts_with('#'))
}

/// The stock list read as one TOML document.
fn whole(text: &str) -> Result<Catalog, CatalogError> {
    let lines = LineIndex::new(text);
    let raw: RawStock = toml::from_str(text).map_err(|e| {
        let (line, column) = e.span().map_or((1, 1), |s| lines.line_col(s.start));
        CatalogError::Syntax {
            line,
            column,
            // One line per error, for terminals and JSON alike.
            message: e.message().trim().replace('\n', "; "),
        }
    })?;
    let r = Reader {
        text,
        lines: std::cell::OnceCell::from(lines),
    };
    let (name, default_tol, default_power) = top_level(&r, &raw)?;
    let raw_parts = raw.part.as_deref().unwrap_or_default();
    if raw_parts.is_empty() {
        return Err(CatalogError::Invalid {
            field: "part".to_string(),
            value: "(none)".to_string(),
            rule: "a stock list needs at least one [[part]] with a `value`".to_string(),
            line: None,
        });
    }
    let mut parts: Vec<Part> = Vec::with_capacity(raw_parts.len());
    for (i, p) in raw_parts.iter().enumerate() {
        parts.push(part(&r, i + 1, p, default_tol, default_power)?);
    }
    Ok(finish(name, parts))
}

/// The list's name, default tolerance and default power rating (watts).
fn top_level(
    r: &Reader<'_>,
    raw: &RawStock,
) -> Result<(String, Option<f64>, Option<f64>), CatalogError> {
    let name = match &raw.name {
        None => "stock".to_string(),
        Some(n) if n.get_ref().trim().is_empty() => {
            return Err(r.error("name", n, "must not be empty"))
        }
        Some(n) => n.get_ref().trim().to_string(),
    };
    let default_tol = raw
        .tolerance
        .as_ref()
        .map(|t| r.tolerance("tolerance", t))
        .transpose()?;
    let default_power = raw
        .power
        .as_ref()
        .map(|p| r.positive("power", p, Quantity::Power, "watts"))
        .transpose()?;
    Ok((name, default_tol, default_power))
}

/// Part `n` (from 1, in file order), checked.
fn part(
    r: &Reader<'_>,
    n: usize,
    p: &RawPart,
    default_tol: Option<f64>,
    default_power: Option<f64>,
) -> Result<Part, CatalogError> {
    let ohms = r.positive(
        &format!("part[{n}].value"),
        &p.value,
        Quantity::Resistance,
        "ohms",
    )?;
    let tolerance = match &p.tolerance {
        Some(t) => r.tolerance(&format!("part[{n}].tolerance"), t)?,
        None => default_tol.ok_or_else(|| CatalogError::Invalid {
            field: format!("part[{n}].tolerance"),
            value: "(missing)".to_string(),
            rule: "give the part a `tolerance` or set a top-level `tolerance` default".to_string(),
            line: Some(r.line(p.value.span().start)),
        })?,
    };
    let power_w = match &p.power {
        Some(w) => Some(r.positive(&format!("part[{n}].power"), w, Quantity::Power, "watts")?),
        None => default_power,
    };
    Ok(Part {
        ohms,
        tolerance,
        power_w,
    })
}

/// The catalog of `parts`: sorted ascending (a stable sort, so equal
/// values keep file order and a tie between entries goes to the first
/// listed), one part per value.
fn finish(name: String, mut parts: Vec<Part>) -> Catalog {
    parts.sort_by(|a, b| a.ohms.total_cmp(&b.ohms));
    Catalog {
        name,
        parts: merge_repeats(parts),
    }
}

/// One part per value of `sorted` (ascending by resistance): of the
/// entries equal within [`RELATIVE_SLACK`] of a run's first, the tightest
/// tolerance, then the highest rating (none counts lowest), then the first.
fn merge_repeats(sorted: Vec<Part>) -> Vec<Part> {
    let better = |a: &Part, b: &Part| {
        a.tolerance < b.tolerance
            || (a.tolerance == b.tolerance && a.power_w.unwrap_or(0.0) > b.power_w.unwrap_or(0.0))
    };
    let mut out: Vec<Part> = Vec::with_capacity(sorted.len());
    let mut run_start = f64::NAN;
    for p in sorted {
        match out.last_mut() {
            Some(last) if p.ohms <= run_start * (1.0 + RELATIVE_SLACK) => {
                if better(&p, last) {
                    *last = Part {
                        ohms: last.ohms,
                        ..p
                    };
                }
            }
            _ => {
                run_start = p.ohms;
                out.push(p);
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn err(text: &str) -> String {
        parse(text).unwrap_err().to_string()
    }

    #[test]
    fn shipped_example_parses_sorted() {
        let c = parse(include_str!("../../catalogs/stock-example.toml")).unwrap();
        assert_eq!(c.name, "bench drawer");
        assert_eq!(c.parts.len(), 31);
        assert!(c.parts.windows(2).all(|w| w[0].ohms < w[1].ohms));
    }

    // Engineering notation as written on schematics: common practice.
    #[test]
    fn reads_numbers_text_defaults_and_overrides() {
        let c = parse(
            "name = \"drawer\"\ntolerance = 0.05\npower = \"250m\"\n\
             [[part]]\nvalue = \"4k7\"\n\
             [[part]]\nvalue = 470\ntolerance = 0.01\npower = 0.5\n\
             [[part]]\nvalue = 2.2e6\ntolerance = 0\n",
        )
        .unwrap();
        let got: Vec<(f64, f64, Option<f64>)> = c
            .parts
            .iter()
            .map(|p| (p.ohms, p.tolerance, p.power_w))
            .collect();
        assert_eq!(
            got,
            [
                (470.0, 0.01, Some(0.5)),
                (4700.0, 0.05, Some(0.25)),
                (2.2e6, 0.0, Some(0.25)),
            ]
        );
        let c = parse("[[part]]\nvalue = 10\ntolerance = 0.1\n").unwrap();
        assert_eq!(c.name, "stock");
        assert_eq!(c.parts[0].power_w, None);
    }

    #[test]
    fn rejects_bad_values_with_line_field_and_rule() {
        let head = "tolerance = 0.05\n[[part]]\nvalue = 100\n[[part]]\n";
        assert_eq!(
            err(&format!("{head}value = \"-4k7\"\n")),
            "line 5: `part[2].value` = \"-4k7\": must be a finite number greater than 0 ohms"
        );
        assert_eq!(
            err(&format!("{head}value = 0\n")),
            "line 5: `part[2].value` = 0: must be a finite number greater than 0 ohms"
        );
        assert_eq!(
            err(&format!("{head}value = nan\n")),
            "line 5: `part[2].value` = nan: must be a finite number greater than 0 ohms"
        );
        assert_eq!(
            err(&format!("{head}value = inf\n")),
            "line 5: `part[2].value` = inf: must be a finite number greater than 0 ohms"
        );
        assert_eq!(
            err(&format!("{head}value = \"4x7\"\n")),
            "line 5: `part[2].value` = \"4x7\": is not engineering notation (unknown scale letter `x`); write e.g. \"4k7\", \"2.2M\" or 470"
        );
        assert_eq!(
            err(&format!("{head}value = true\n")),
            "line 5: `part[2].value` = true: must be a number of ohms or text such as \"4k7\""
        );
    }

    #[test]
    fn rejects_bad_tolerance_and_power() {
        assert_eq!(
            err("[[part]]\nvalue = 100\ntolerance = 1.0\n"),
            "line 3: `part[1].tolerance` = 1.0: must be a fraction in [0, 1), e.g. 0.05 for ±5 %"
        );
        assert_eq!(
            err("tolerance = -0.01\n[[part]]\nvalue = 100\n"),
            "line 1: `tolerance` = -0.01: must be a fraction in [0, 1), e.g. 0.05 for ±5 %"
        );
        assert_eq!(
            err("[[part]]\nvalue = 100\ntolerance = \"5%\"\n"),
            "line 3: `part[1].tolerance` = \"5%\": must be a fraction in [0, 1), e.g. 0.05 for ±5 %"
        );
        assert_eq!(
            err("tolerance = 0.05\n[[part]]\nvalue = 100\npower = 0\n"),
            "line 4: `part[1].power` = 0: must be a finite number greater than 0 watts"
        );
        assert_eq!(
            err("tolerance = 0.05\npower = \"-1\"\n[[part]]\nvalue = 100\n"),
            "line 2: `power` = \"-1\": must be a finite number greater than 0 watts"
        );
        assert_eq!(
            err("[[part]]\nvalue = 100\n"),
            "line 2: `part[1].tolerance` = (missing): give the part a `tolerance` or set a top-level `tolerance` default"
        );
    }

    #[test]
    fn rejects_empty_lists_unknown_keys_and_syntax() {
        assert_eq!(
            err("name = \"empty\"\ntolerance = 0.05\n"),
            "`part` = (none): a stock list needs at least one [[part]] with a `value`"
        );
        assert_eq!(
            err("tolerance = 0.05\npart = []\n"),
            "`part` = (none): a stock list needs at least one [[part]] with a `value`"
        );
        assert_eq!(
            err("name = \"x\"\ntolerence = 0.05\n[[part]]\nvalue = 1\n"),
            "line 2, column 1: unknown field `tolerence`, expected one of `name`, `tolerance`, `power`, `part`"
        );
        assert_eq!(
            err("tolerance = 0.05\n[[part]]\nvalue = 1\nwatts = 2\n"),
            "line 4, column 1: unknown field `watts`, expected one of `value`, `tolerance`, `power`"
        );
        assert_eq!(
            err("tolerance = 0.05\n[[part]]\ntolerance = 0.01\n"),
            "line 2, column 1: missing field `value`"
        );
        assert_eq!(
            err("tolerance = 0.05\n[[part]]\nvalue = \n"),
            "line 3, column 9: invalid string; expected `\"`, `'`"
        );
        assert_eq!(
            err("name = \"  \"\n[[part]]\nvalue = 1\ntolerance = 0\n"),
            "line 1: `name` = \"  \": must not be empty"
        );
    }

    /// Reading part by part gives the whole document's catalog, or gives
    /// up (and the whole document is read) wherever the cut could change
    /// the meaning.
    #[test]
    fn reading_part_by_part_agrees_with_the_whole_document() {
        let same = [
            "name = \"d\"\ntolerance = 0.05\n[[part]]\nvalue = \"4k7\"\n[[part]]\nvalue = 100\ntolerance = 0.01\n",
            "tolerance = 0.05 # default\n  [[ part ]] # first\r\nvalue = 10\r\n[[\"part\"]]\nvalue = 20\n[['part']]\nvalue = 20\ntolerance = 0\n",
            "[[part]]\nvalue = 1\ntolerance = 0.1\npower = \"250m\"\n",
        ];
        for text in same {
            let piecewise = by_part(text).expect("read part by part");
            assert_eq!(Ok(piecewise), whole(text), "{text:?}");
        }
        let whole_only = [
            // A header line inside a multi-line string.
            "name = \"\"\"a\n[[part]]\nvalue = 1\n\"\"\"\ntolerance = 0.1\n[[part]]\nvalue = 2\n",
            // A sub-table, another table, an unknown key, a bad value.
            "tolerance = 0.1\n[[part]]\nvalue = 1\n[part.extra]\nx = 1\n",
            "tolerance = 0.1\n[[part]]\nvalue = 1\n[other]\nx = 1\n",
            "tolerance = 0.1\n[[part]]\nvalue = 1\nwatts = 2\n",
            "tolerance = 0.1\n[[part]]\nvalue = -1\n",
            "part = [{ value = 1, tolerance = 0.1 }]\n[[part]]\nvalue = 2\n",
            "tolerance = 0.1\n",
        ];
        for text in whole_only {
            assert_eq!(by_part(text), None, "{text:?}");
        }
        // The first parses whole (the header is text of the name).
        assert_eq!(parse(whole_only[0]).unwrap().parts.len(), 1);
    }

    #[test]
    fn repeated_values_keep_the_tightest_tolerance_then_the_highest_rating() {
        let text = "tolerance = 0.05\n\
                    [[part]]\nvalue = \"4k7\"\n\
                    [[part]]\nvalue = 1000\n\
                    [[part]]\nvalue = 4700\ntolerance = 0.01\npower = 0.25\n\
                    [[part]]\nvalue = 4.7e3\ntolerance = 0.01\npower = 0.5\n\
                    [[part]]\nvalue = \"4.7k\"\ntolerance = 0.01\npower = 0.5\n\
                    [[part]]\nvalue = 1000.0000001\ntolerance = 0.1\n";
        let got: Vec<(f64, f64, Option<f64>)> = parse(text)
            .unwrap()
            .parts
            .iter()
            .map(|p| (p.ohms, p.tolerance, p.power_w))
            .collect();
        assert_eq!(got, [(1000.0, 0.05, None), (4700.0, 0.01, Some(0.5))]);
    }
}
