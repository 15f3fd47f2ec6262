//! The files a parse reads, recorded as they are opened, so that the command line can refuse to
//! write a report over any of them (`-o` compares by file identity).
//!
//! The record is per thread: [`start`] begins one, every reader of a user file calls
//! [`record`], and [`finish`] returns the paths.

use std::cell::RefCell;
use std::path::{Path, PathBuf};

thread_local! {
    static READ: RefCell<Option<Vec<PathBuf>>> = const { RefCell::new(None) };
}

/// Begins recording on this thread.
pub fn start() {
    READ.with(|r| *r.borrow_mut() = Some(Vec::new()));
}

/// Records that `path` is read (when a record is open).
pub fn record(path: &Path) {
    READ.with(|r| {
        if let Some(v) = r.borrow_mut().as_mut() {
            v.push(path.to_path_buf());
        }
    });
}

/// Ends the record and returns the paths read since [`start`].
pub fn finish() -> Vec<PathBuf> {
    READ.with(|r| r.borrow_mut().take().unwrap_or_default())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn records_only_between_start_and_finish() {
        record(Path::new("before"));
        start();
        record(Path::new("a.csv"));
        assert_eq!(finish(), vec![PathBuf::from("a.csv")]);
        record(Path::new("after"));
        assert!(finish().is_empty());
    }
}
