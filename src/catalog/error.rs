//! Errors from building or querying a catalog.

use thiserror::Error;

/// Why a catalog could not be built or a catalog query could not be answered.
///
/// Every message names the field, the value as given and the rule it broke;
/// errors found in a stock list also give the 1-based line number.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum CatalogError {
    /// The text is not valid TOML, or does not fit the stock-list schema
    /// (an unknown key, a value of the wrong type, a missing key).
    #[error("line {line}, column {column}: {message}")]
    Syntax {
        /// 1-based line of the offending text.
        line: usize,
        /// 1-based column (in characters) of the offending text.
        column: usize,
        /// What the TOML reader objected to.
        message: String,
    },
    /// A field was read but its value breaks a rule.
    #[error("{}`{field}` = {value}: {rule}", line_prefix(*.line))]
    Invalid {
        /// The field as a path (`part[3].tolerance`, `r_max_ohm`).
        field: String,
        /// The value exactly as given (quoted if it was text).
        value: String,
        /// The rule that was broken, phrased as what is expected.
        rule: String,
        /// 1-based line in the stock list, when the value came from one.
        line: Option<usize>,
    },
}

fn line_prefix(line: Option<usize>) -> String {
    match line {
        Some(l) => format!("line {l}: "),
        None => String::new(),
    }
}

impl CatalogError {
    /// An [`CatalogError::Invalid`] for a value that did not come from a file.
    pub(crate) fn invalid(field: &str, value: impl std::fmt::Display, rule: &str) -> Self {
        CatalogError::Invalid {
            field: field.to_string(),
            value: value.to_string(),
            rule: rule.to_string(),
            line: None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Message layout is our own convention (STYLE: field, value, rule, line).
    #[test]
    fn invalid_message_names_line_field_value_and_rule() {
        let e = CatalogError::Invalid {
            field: "part[2].value".into(),
            value: "\"-4k7\"".into(),
            rule: "must be greater than 0 ohms".into(),
            line: Some(9),
        };
        assert_eq!(
            e.to_string(),
            "line 9: `part[2].value` = \"-4k7\": must be greater than 0 ohms"
        );
        let e = CatalogError::invalid("r_min_ohm", -1.0, "must be greater than 0 ohms");
        assert_eq!(
            e.to_string(),
            "`r_min_ohm` = -1: must be greater than 0 ohms"
        );
    }
}
