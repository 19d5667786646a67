//! The specification as TOML gave it: a tree of values with the line of
//! every key, before any rule is applied.
//!
//! Reading into a generic tree first (rather than straight into typed
//! structs) lets validation walk the known keys of each table, report an
//! unknown key at its own line with a suggestion, and word every type error
//! with the dotted field name.

use super::error::SpecError;
use crate::lines::LineIndex;
use serde::de::{self, Deserialize, Deserializer, MapAccess, SeqAccess, Visitor};
use std::fmt;
use toml::Spanned;

/// One `key = value` pair of a table.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Entry {
    /// The key as written (one segment of a dotted path).
    pub key: String,
    /// Byte offset of the key in the text (replaced by the line in `lines`).
    pub offset: usize,
    /// 1-based line of the key.
    pub line: usize,
    /// The value.
    pub value: Node,
}

/// A TOML value.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum Node {
    Str(String),
    Int(i64),
    Float(f64),
    Bool(bool),
    Array(Vec<Node>),
    Table(Vec<Entry>),
}

/// The key TOML's deserializer uses to pass a date-time through a map; its
/// key carries no span, so reading it fails and is reported as below.
const DATETIME_KEY: &str = "$__toml_private_datetime";

impl Node {
    /// What kind of value this is, for "must be a number, not a boolean".
    pub fn kind(&self) -> &'static str {
        match self {
            Node::Str(_) => "a string",
            Node::Int(_) | Node::Float(_) => "a number",
            Node::Bool(_) => "a boolean",
            Node::Array(_) => "an array",
            Node::Table(_) => "a table",
        }
    }
}

impl fmt::Display for Node {
    /// The value written back roughly as TOML, for error messages.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Node::Str(s) => write!(f, "{s:?}"),
            Node::Int(i) => write!(f, "{i}"),
            Node::Float(x) if x.is_nan() => write!(f, "nan"),
            Node::Float(x) if x.is_infinite() => {
                write!(f, "{}", if *x > 0.0 { "inf" } else { "-inf" })
            }
            Node::Float(x) => write!(f, "{x:?}"),
            Node::Bool(b) => write!(f, "{b}"),
            Node::Array(items) => {
                write!(f, "[")?;
                for (i, it) in items.iter().enumerate() {
                    if i > 0 {
                        write!(f, ", ")?;
                    }
                    write!(f, "{it}")?;
                }
                write!(f, "]")
            }
            Node::Table(entries) => {
                write!(f, "{{ ")?;
                for (i, e) in entries.iter().enumerate() {
                    if i > 0 {
                        write!(f, ", ")?;
                    }
                    write!(f, "{} = {}", e.key, e.value)?;
                }
                write!(f, " }}")
            }
        }
    }
}

impl<'de> Deserialize<'de> for Node {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Node, D::Error> {
        d.deserialize_any(NodeVisitor)
    }
}

struct NodeVisitor;

impl<'de> Visitor<'de> for NodeVisitor {
    type Value = Node;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "a TOML value")
    }
    fn visit_bool<E: de::Error>(self, v: bool) -> Result<Node, E> {
        Ok(Node::Bool(v))
    }
    fn visit_i64<E: de::Error>(self, v: i64) -> Result<Node, E> {
        Ok(Node::Int(v))
    }
    fn visit_u64<E: de::Error>(self, v: u64) -> Result<Node, E> {
        // TOML integers are i64; a larger one can only be a float's worth.
        Ok(i64::try_from(v).map_or(Node::Float(v as f64), Node::Int))
    }
    fn visit_f64<E: de::Error>(self, v: f64) -> Result<Node, E> {
        Ok(Node::Float(v))
    }
    fn visit_str<E: de::Error>(self, v: &str) -> Result<Node, E> {
        Ok(Node::Str(v.to_string()))
    }
    fn visit_string<E: de::Error>(self, v: String) -> Result<Node, E> {
        Ok(Node::Str(v))
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Node, A::Error> {
        let mut items = Vec::new();
        while let Some(n) = seq.next_element::<Node>()? {
            items.push(n);
        }
        Ok(Node::Array(items))
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Node, A::Error> {
        let mut entries = Vec::new();
        while let Some(key) = map.next_key::<Spanned<String>>()? {
            let value: Node = map.next_value()?;
            entries.push(Entry {
                offset: key.span().start,
                line: 0,
                key: key.into_inner(),
                value,
            });
        }
        Ok(Node::Table(entries))
    }
}

fn set_lines(entries: &mut [Entry], lines: &LineIndex<'_>) {
    for e in entries {
        e.line = lines.line(e.offset);
        set_lines_node(&mut e.value, lines);
    }
}

fn set_lines_node(n: &mut Node, lines: &LineIndex<'_>) {
    match n {
        Node::Table(es) => set_lines(es, lines),
        Node::Array(items) => items.iter_mut().for_each(|i| set_lines_node(i, lines)),
        _ => {}
    }
}

/// Parse TOML text into the root table's entries, with lines filled in.
/// A TOML syntax error carries its line and column.
pub(crate) fn parse_document(text: &str) -> Result<Vec<Entry>, SpecError> {
    let lines = LineIndex::new(text);
    let root: Node = toml::from_str(text).map_err(|e| {
        let (line, col) = e.span().map_or((1, 1), |s| lines.line_col(s.start));
        let message = if e.message().contains(DATETIME_KEY) {
            "a date-time is not a value any key of a specification takes".to_string()
        } else {
            let mut m = e.message().trim().replace('\n', "; ");
            if let Some(word) = text.lines().nth(line - 1).and_then(bare_value) {
                m.push_str(&format!(
                    "; a value with a prefix letter is a string in TOML: write \"{word}\""
                ));
            }
            m
        };
        SpecError::Syntax { line, col, message }
    })?;
    let Node::Table(mut entries) = root else {
        return Err(SpecError::Syntax {
            line: 1,
            col: 1,
            message: "the document is not a table".to_string(),
        });
    };
    set_lines(&mut entries, &lines);
    Ok(entries)
}

/// The first unquoted word after the `=` of a TOML line that is an
/// engineering value but not a TOML number (`10k`, `4k7`, `2.2M`), the
/// likeliest cause of a syntax error on that line.
fn bare_value(line: &str) -> Option<&str> {
    let (_, value) = line.split_once('=')?;
    let value = value.split('#').next().unwrap_or("");
    if value.contains(['"', '\'']) {
        return None;
    }
    value
        .split(|c: char| c.is_whitespace() || "[]{},=".contains(c))
        .filter(|w| !w.is_empty() && w.parse::<f64>().is_err())
        .find(|w| crate::units::parse_value(w).is_ok())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keys_carry_their_lines_at_every_depth() {
        let text = "name = 'x'\n\n[device]\nfamily = 'n-jfet'\nidss = { min = 1, max = 2 }\n";
        let root = parse_document(text).unwrap();
        assert_eq!(root[0].line, 1);
        assert_eq!(root[1].key, "device");
        assert_eq!(root[1].line, 3);
        let Node::Table(dev) = &root[1].value else {
            panic!()
        };
        assert_eq!(dev[1].line, 5);
        let Node::Table(inner) = &dev[1].value else {
            panic!()
        };
        assert_eq!((inner[1].key.as_str(), inner[1].line), ("max", 5));
    }

    #[test]
    fn syntax_error_has_line_and_column() {
        let e = parse_document("a = 1\nb = = 2\n").unwrap_err();
        let SpecError::Syntax { line, col, .. } = e else {
            panic!("{e:?}")
        };
        assert_eq!((line, col), (2, 5));
    }

    #[test]
    fn an_unquoted_suffix_value_gets_a_hint() {
        // TOML 1.0 (toml.io): a bare `10k` is not a value; a string is.
        for (text, word) in [
            ("[load]\nrl = 10k\n", "10k"),
            ("[device]\nidss = [2m, 8m] # mA\n", "2m"),
            ("[device]\nidss = { min = 2m, max = 8m }\n", "2m"),
            ("[parts]\nrange = [10, 4k7]\n", "4k7"),
        ] {
            let e = parse_document(text).unwrap_err().to_string();
            assert!(e.contains(&format!("write \"{word}\"")), "{text:?}: {e}");
        }
        // No hint where the cause is elsewhere.
        for text in ["b = = 2\n", "rl = \"10k\" x\n", "d = 1979-05-27x\n"] {
            let e = parse_document(text).unwrap_err().to_string();
            assert!(!e.contains("write \""), "{text:?}: {e}");
        }
    }

    #[test]
    fn datetimes_and_values_print_back() {
        let e = parse_document("x = 1\nd = 1979-05-27\n").unwrap_err();
        assert!(e.to_string().contains("line 2"), "{e}");
        assert!(e.to_string().contains("date-time"), "{e}");
        let root = parse_document("f = nan\na = [1, '2']\n").unwrap();
        assert_eq!(root[0].value.to_string(), "nan");
        assert_eq!(root[1].value.to_string(), "[1, \"2\"]");
    }
}
