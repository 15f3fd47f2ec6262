//! The library's one error type.
//!
//! Every error says what was wrong, where (file, line, field when known) and what would be
//! right. Messages are lowercase and carry no trailing period, so callers can prefix them.

use std::fmt;

/// What went wrong, by category. The message text carries the details.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum ErrorKind {
    /// A spectrum or table file could not be read or is malformed.
    InvalidData,
    /// A value given by the user is malformed, has a missing or wrong unit, or is out of range.
    InvalidInput,
    /// A quantity was asked for outside the range the data covers.
    NotCovered,
    /// A built-in name (source, generator) is unknown.
    UnknownName,
    /// Reading a file failed at the operating-system level.
    Io,
}

/// Where in an input an error was found: the file, the key path inside it (`source[1].distance`)
/// and the line, when known. Held as fields, so no caller has to search a message for them.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Location {
    /// The file (or demo name) the input came from.
    pub file: Option<String>,
    /// The key path inside the file, tables and array entries separated by `.` and `[i]`.
    pub key: Option<String>,
    /// The 1-based line of that key, from the TOML parser's spans.
    pub line: Option<usize>,
}

/// An error with a kind, a complete, human-readable message and, for input files, where it
/// was found.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Error {
    kind: ErrorKind,
    message: String,
    location: Option<Box<Location>>,
}

impl Error {
    /// Builds an error of the given kind.
    pub fn new(kind: ErrorKind, message: impl Into<String>) -> Self {
        Error { kind, message: message.into(), location: None }
    }

    /// Shorthand for [`ErrorKind::InvalidData`].
    pub fn data(message: impl Into<String>) -> Self {
        Self::new(ErrorKind::InvalidData, message)
    }

    /// Shorthand for [`ErrorKind::InvalidInput`].
    pub fn input(message: impl Into<String>) -> Self {
        Self::new(ErrorKind::InvalidInput, message)
    }

    /// Shorthand for [`ErrorKind::NotCovered`].
    pub fn not_covered(message: impl Into<String>) -> Self {
        Self::new(ErrorKind::NotCovered, message)
    }

    /// The category of this error.
    pub fn kind(&self) -> ErrorKind {
        self.kind
    }

    /// The message without the category.
    pub fn message(&self) -> &str {
        &self.message
    }

    /// Prefixes the message with a location or context, e.g. a file name.
    #[must_use]
    pub fn context(self, prefix: impl fmt::Display) -> Self {
        Error { message: format!("{prefix}: {}", self.message), ..self }
    }

    /// Where the error was found, when known.
    pub fn location(&self) -> Option<&Location> {
        self.location.as_deref()
    }

    /// Records that the error concerns `key`, inside any key recorded before (so an outer
    /// table's name goes first: `.key("distance").key("source[1]")` is `source[1].distance`).
    #[must_use]
    pub fn key(mut self, key: &str) -> Self {
        let loc = self.location.get_or_insert_with(Box::default);
        loc.key = Some(match loc.key.take() {
            Some(inner) if inner.starts_with('[') => format!("{key}{inner}"),
            Some(inner) => format!("{key}.{inner}"),
            None => key.to_string(),
        });
        self
    }

    /// Records the file the error was found in and, from the file's `text`, the line of the
    /// recorded key (or of its nearest enclosing table). Keeps a file recorded before.
    #[must_use]
    pub fn in_file(mut self, file: &str, text: Option<&str>) -> Self {
        let loc = self.location.get_or_insert_with(Box::default);
        if loc.file.is_some() {
            return self;
        }
        loc.file = Some(file.to_string());
        if let (Some(text), Some(key), None) = (text, loc.key.as_deref(), loc.line) {
            loc.line = crate::base::toml_errors::line_of_key(text, key);
        }
        self
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if let Some(loc) = &self.location {
            match (&loc.file, loc.line) {
                (Some(file), Some(line)) => write!(f, "{file}:{line}: ")?,
                (Some(file), None) => write!(f, "{file}: ")?,
                _ => {}
            }
            if let Some(key) = &loc.key {
                write!(f, "key '{key}': ")?;
            }
        }
        f.write_str(&self.message)
    }
}

impl std::error::Error for Error {}

/// The library's result type.
pub type Result<T, E = Error> = std::result::Result<T, E>;
