//! Writing test input files that several tests share: each writer writes a file of its own
//! thread and renames it into place, so a test running in parallel never reads one half written.

use std::path::Path;

/// Writes `contents` to `path` atomically (a temporary file in the same folder, then a rename).
pub fn write(path: &Path, contents: impl AsRef<[u8]>) {
    let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("file");
    let tmp = path.with_file_name(format!(".{name}.{:?}.tmp", std::thread::current().id()));
    std::fs::write(&tmp, contents).unwrap();
    std::fs::rename(&tmp, path).unwrap();
}
