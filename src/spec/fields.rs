//! Reading typed values out of the raw tree, one table at a time, with
//! errors that carry the dotted field, the value and the line.

use super::error::SpecError;
use super::raw::{Entry, Node};
use super::validate::{QUANTITIES, SECTIONS};
use crate::units::{parse_quantity, parse_value, Quantity};

/// One table of the specification and where it sits.
pub(crate) struct Section<'a> {
    /// Dotted path of the table (`""` at the top level, `device.idss` for
    /// an inline parameter table).
    pub path: String,
    /// Line of the table's key, when it has one.
    pub line: Option<usize>,
    /// Its entries.
    pub entries: &'a [Entry],
}

/// A number read from a key, with what is needed to complain about it.
pub(crate) struct Num<'a> {
    /// The value in SI units.
    pub v: f64,
    /// Dotted path of the key.
    pub field: String,
    /// The entry it came from.
    pub entry: &'a Entry,
}

impl Num<'_> {
    /// `Ok` when `ok`, else an error stating `rule` for this value.
    pub fn check(&self, ok: bool, rule: &str) -> Result<(), SpecError> {
        if ok {
            Ok(())
        } else {
            Err(self.fail(rule))
        }
    }

    /// The error for this value breaking `rule`.
    pub fn fail(&self, rule: &str) -> SpecError {
        SpecError::Invalid {
            field: self.field.clone(),
            value: self.entry.value.to_string(),
            line: self.entry.line,
            rule: rule.to_string(),
        }
    }
}

/// The best did-you-mean candidate for a misspelt `word`, by
/// Damerau–Levenshtein edit distance (a transposition such as `gian` for
/// `gain` counts as one edit, the commonest typing slip). Short words get a
/// stricter threshold so that unrelated short keys are not suggested.
pub(crate) fn closest<'c>(word: &str, candidates: &[&'c str]) -> Option<&'c str> {
    let len = word.chars().count();
    let limit = match len {
        0..=3 => 1,
        4..=6 => 2,
        _ => 3,
    };
    candidates
        .iter()
        .map(|c| (strsim::damerau_levenshtein(word, c), *c))
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

/// The quantity of the numeric key at dotted path `field` (an inline range
/// table's `min`, `typ` and `max` take their parameter's), `None` for a key
/// the table does not list.
pub(crate) fn quantity_of(field: &str) -> Option<Quantity> {
    let find = |path: &str| match path.strip_prefix("device.") {
        Some(param) => crate::device::input::quantity(param),
        None => QUANTITIES.iter().find(|(p, _)| *p == path).map(|(_, q)| *q),
    };
    find(field).or_else(|| find(field.rsplit_once('.')?.0))
}

/// A number from a TOML integer, float or engineering string of quantity
/// `q` (any unit when `None`), or the rule it breaks.
pub(crate) fn number_of(node: &Node, q: Option<Quantity>) -> Result<f64, String> {
    let v = match node {
        Node::Int(i) => *i as f64,
        Node::Float(x) => *x,
        Node::Str(s) => match q {
            Some(q) => parse_quantity(s, q),
            None => parse_value(s),
        }
        .map_err(|e| {
            if e.wrong_unit {
                e.reason
            } else {
                format!(
                    "not a number ({}); write a number or engineering notation such as \"4k7\", \
                     \"2.2M\", \"100n\"",
                    e.reason
                )
            }
        })?,
        other => {
            return Err(format!(
                "must be a number or an engineering string such as \"4k7\", not {}",
                other.kind()
            ))
        }
    };
    if v.is_finite() {
        Ok(v)
    } else {
        Err("must be a finite number (NaN and infinity are not values)".to_string())
    }
}

fn known_keys(path: &str) -> Option<&'static [&'static str]> {
    SECTIONS.iter().find(|(p, _)| *p == path).map(|(_, k)| *k)
}

impl<'a> Section<'a> {
    /// The top-level table.
    pub fn root(entries: &'a [Entry]) -> Self {
        Section {
            path: String::new(),
            line: None,
            entries,
        }
    }

    /// Dotted path of `key` in this table.
    pub fn field(&self, key: &str) -> String {
        if self.path.is_empty() {
            key.to_string()
        } else {
            format!("{}.{key}", self.path)
        }
    }

    /// The quantity of `key` in this table (see [`quantity_of`]).
    pub fn quantity(&self, key: &str) -> Option<Quantity> {
        quantity_of(&self.field(key))
    }

    /// The entry for `key`.
    pub fn get(&self, key: &str) -> Option<&'a Entry> {
        self.entries.iter().find(|e| e.key == key)
    }

    /// An error for entry `e` of this table breaking `rule`.
    pub fn invalid(&self, e: &Entry, rule: &str) -> SpecError {
        SpecError::Invalid {
            field: self.field(&e.key),
            value: e.value.to_string(),
            line: e.line,
            rule: rule.to_string(),
        }
    }

    /// The error for a missing `key`.
    pub fn missing(&self, key: &str, hint: &str) -> SpecError {
        SpecError::Missing {
            field: self.field(key),
            line: self.line,
            hint: hint.to_string(),
        }
    }

    /// Refuse any key not in `SECTIONS` for this table.
    pub fn check_keys(&self) -> Result<(), SpecError> {
        let known = known_keys(&self.path).unwrap_or(&[]);
        self.check_keys_in(known)
    }

    /// Refuse any key not in `known`, with a suggestion.
    pub fn check_keys_in(&self, known: &[&str]) -> Result<(), SpecError> {
        let Some(e) = self
            .entries
            .iter()
            .find(|e| !known.contains(&e.key.as_str()))
        else {
            return Ok(());
        };
        let elsewhere = SECTIONS
            .iter()
            .filter(|(p, _)| !p.is_empty() && *p != self.path)
            .find(|(_, keys)| keys.contains(&e.key.as_str()));
        let hint = if let Some(c) = closest(&e.key, known) {
            format!("did you mean `{c}`?")
        } else if let Some((p, _)) = elsewhere.filter(|_| !self.path.contains('.')) {
            format!("`{}` belongs in `[{p}]`", e.key)
        } else {
            let list: Vec<String> = known.iter().map(|k| format!("`{k}`")).collect();
            let here = if self.path.is_empty() {
                "the top level".to_string()
            } else {
                format!("`{}`", self.path)
            };
            format!("{here} takes {}", list.join(", "))
        };
        Err(SpecError::UnknownKey {
            field: self.field(&e.key),
            line: e.line,
            hint,
        })
    }

    /// The sub-table `key`, checked for unknown keys; `None` when absent.
    pub fn section(&self, key: &str) -> Result<Option<Section<'a>>, SpecError> {
        let Some(e) = self.get(key) else {
            return Ok(None);
        };
        let Node::Table(entries) = &e.value else {
            return Err(self.invalid(e, &format!("must be a table (a `[{key}]` section)")));
        };
        let s = Section {
            path: self.field(key),
            line: Some(e.line),
            entries,
        };
        s.check_keys()?;
        Ok(Some(s))
    }

    /// As [`Section::section`], but absence is an error with `hint`.
    pub fn required_section(&self, key: &str, hint: &str) -> Result<Section<'a>, SpecError> {
        self.section(key)?
            .ok_or_else(|| self.missing(key, &format!("a `[{key}]` section with {hint}")))
    }

    /// The number at `key`, `None` when absent.
    pub fn num(&self, key: &str) -> Result<Option<Num<'a>>, SpecError> {
        let Some(e) = self.get(key) else {
            return Ok(None);
        };
        let v = number_of(&e.value, self.quantity(key)).map_err(|r| self.invalid(e, &r))?;
        Ok(Some(Num {
            v,
            field: self.field(key),
            entry: e,
        }))
    }

    /// As [`Section::num`], but absence is an error with `hint`.
    pub fn required_num(&self, key: &str, hint: &str) -> Result<Num<'a>, SpecError> {
        self.num(key)?.ok_or_else(|| self.missing(key, hint))
    }

    /// The string at `key`, `None` when absent.
    pub fn string(&self, key: &str) -> Result<Option<(String, &'a Entry)>, SpecError> {
        let Some(e) = self.get(key) else {
            return Ok(None);
        };
        match &e.value {
            Node::Str(s) => Ok(Some((s.clone(), e))),
            other => Err(self.invalid(e, &format!("must be a string, not {}", other.kind()))),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn suggestions_need_a_close_spelling() {
        assert_eq!(closest("gian", &["gain", "gain_db"]), Some("gain"));
        assert_eq!(closest("suply", &["supply", "target"]), Some("supply"));
        assert_eq!(closest("k", &["rl"]), None);
        assert_eq!(closest("frequency", &["f_low"]), None);
    }

    #[test]
    fn numbers_from_every_spelling() {
        assert_eq!(number_of(&Node::Int(3), None), Ok(3.0));
        assert_eq!(number_of(&Node::Str("4k7".into()), None), Ok(4700.0));
        assert!(number_of(&Node::Float(f64::NAN), None).is_err());
        assert!(number_of(&Node::Bool(true), None).is_err());
        let r = Some(Quantity::Resistance);
        assert_eq!(
            number_of(&Node::Str("47kV".into()), r),
            Err("a resistance takes Ω (or ohm) or no unit".to_string())
        );
    }

    // Every numeric key the specification knows has a quantity, and every
    // listed quantity is a known key (so a new key cannot be forgotten).
    #[test]
    fn every_numeric_key_has_a_quantity() {
        for (path, _) in QUANTITIES {
            let (table, key) = path.rsplit_once('.').unwrap();
            let keys = SECTIONS.iter().find(|(p, _)| *p == table).unwrap().1;
            assert!(keys.contains(&key), "{path}");
        }
        assert_eq!(quantity_of("device.idss.min"), Some(Quantity::Current));
        assert_eq!(quantity_of("device.vgs_off"), Some(Quantity::Voltage));
        let text = ["name", "polarity", "series", "family", "class"];
        for (table, keys) in SECTIONS {
            for key in keys.iter().filter(|k| !text.contains(k)) {
                let path = if table.is_empty() {
                    key.to_string()
                } else {
                    format!("{table}.{key}")
                };
                let is_table = SECTIONS.iter().any(|(p, _)| *p == path);
                assert!(
                    is_table || quantity_of(&path).is_some(),
                    "{path} has no quantity"
                );
            }
        }
    }
}
