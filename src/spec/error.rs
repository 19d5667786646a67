//! Errors of a specification: each names the field (dotted path), the value
//! as written, the rule and the line.

/// Why a specification was refused.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SpecError {
    /// The text is not valid TOML.
    #[error("TOML syntax error at line {line}, column {col}: {message}")]
    Syntax {
        /// 1-based line.
        line: usize,
        /// 1-based column (characters).
        col: usize,
        /// The TOML parser's description.
        message: String,
    },
    /// A value breaks a rule.
    #[error("`{field}` = {value} (line {line}): {rule}")]
    Invalid {
        /// Dotted path of the key (`target.gain`).
        field: String,
        /// The value as written, roughly (strings quoted).
        value: String,
        /// 1-based line of the key.
        line: usize,
        /// The rule, as a sentence fragment.
        rule: String,
    },
    /// A required key is absent.
    #[error("`{field}` is required{}: {hint}", at_line(*.line))]
    Missing {
        /// Dotted path of the missing key.
        field: String,
        /// Line of the enclosing section, when there is one.
        line: Option<usize>,
        /// What to give.
        hint: String,
    },
    /// A key that the specification does not know.
    #[error("unknown key `{field}` (line {line}): {hint}")]
    UnknownKey {
        /// Dotted path as written.
        field: String,
        /// 1-based line of the key.
        line: usize,
        /// A did-you-mean suggestion or the list of keys the table takes.
        hint: String,
    },
    /// Two keys that exclude each other are both given.
    #[error("`{first}` (line {first_line}) and `{second}` (line {second_line}): {rule}")]
    Conflict {
        /// Dotted path of the first key.
        first: String,
        /// Its line.
        first_line: usize,
        /// Dotted path of the second key.
        second: String,
        /// Its line.
        second_line: usize,
        /// Why they cannot go together.
        rule: String,
    },
    /// The built-in device-class catalog could not be read (a build defect,
    /// not the user's fault).
    #[error("{0}")]
    Classes(String),
}

fn at_line(line: Option<usize>) -> String {
    line.map_or(String::new(), |l| format!(" (section at line {l})"))
}

impl SpecError {
    /// The 1-based line the error points at, when it has one.
    pub fn line(&self) -> Option<usize> {
        match self {
            SpecError::Syntax { line, .. }
            | SpecError::Invalid { line, .. }
            | SpecError::UnknownKey { line, .. } => Some(*line),
            SpecError::Conflict { second_line, .. } => Some(*second_line),
            SpecError::Missing { line, .. } => *line,
            SpecError::Classes(_) => None,
        }
    }

    /// The dotted field the error is about, when it names one.
    pub fn field(&self) -> Option<&str> {
        match self {
            SpecError::Invalid { field, .. }
            | SpecError::Missing { field, .. }
            | SpecError::UnknownKey { field, .. } => Some(field),
            SpecError::Conflict { second, .. } => Some(second),
            SpecError::Syntax { .. } | SpecError::Classes(_) => None,
        }
    }
}
