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

/// An error with a kind and a complete, human-readable message.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Error {
    kind: ErrorKind,
    message: String,
}

impl Error {
    /// Builds an error of the given kind.
    pub fn new(kind: ErrorKind, message: impl Into<String>) -> Self {
        Error { kind, message: message.into() }
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
        Error { kind: self.kind, message: format!("{prefix}: {}", self.message) }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for Error {}

/// The library's result type.
pub type Result<T, E = Error> = std::result::Result<T, E>;
