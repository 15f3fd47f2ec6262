//! Writing a report to `-o path` without ever losing a file: [`check_target`] refuses a target
//! that is an input of the run, a symbolic link, a directory, a special file or (without
//! `--force`) an existing file, before anything is computed; [`AtomicFile`] writes the report to
//! a temporary file beside the target and renames it over the target only once every byte is
//! on disk, so a failure midway (a full disk, an error while rendering) leaves any earlier file
//! as it was.

use std::ffi::OsString;
use std::fs::{File, OpenOptions};
use std::io::{self, BufWriter, ErrorKind, Write};
use std::os::unix::fs::MetadataExt;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use anyhow::{Context, Result, bail};

/// Checks `-o path` before anything is computed. Refuses:
///
/// - a path that is one of the run's `inputs`, compared by file identity (device and inode), so
///   a hard link or a symbolic link to an input counts as the input;
/// - a dangling symbolic link, and any symbolic link: the rename that writes the report would
///   replace the link, not the file it points to, so the real path must be given;
/// - a directory, or anything else that is not a regular file (a device, a pipe);
/// - an existing file, unless `force`;
/// - a path whose folder does not exist.
///
/// # Errors
/// Each refusal says which path, what was wrong and what to do instead.
pub fn check_target(path: &Path, inputs: &[PathBuf], force: bool) -> Result<()> {
    let shown = path.display();
    if path.file_name().is_none() {
        bail!("-o {shown} names no file; give a file path such as report.html");
    }
    if let Some(input) = same_file_as_input(path, inputs) {
        bail!(
            "-o {shown} is an input of this run (the same file as {}); it is never overwritten: \
             choose another output path",
            input.display()
        );
    }
    let meta = match std::fs::symlink_metadata(path) {
        Ok(m) => m,
        Err(e) if e.kind() == ErrorKind::NotFound => return check_folder(path),
        Err(e) => bail!("-o {shown} cannot be examined ({e}); choose a path you can write"),
    };
    let kind = meta.file_type();
    if kind.is_symlink() {
        if std::fs::metadata(path).is_err() {
            bail!(
                "-o {shown} is a symbolic link to nothing (a dangling link); give the real path of a \
                 new or existing file"
            );
        }
        bail!("-o {shown} is a symbolic link; give the real path");
    }
    if kind.is_dir() {
        bail!("-o {shown} is a directory; give a file path, for example {shown}/report");
    }
    if !kind.is_file() {
        bail!("-o {shown} is not a regular file (a device, pipe or socket); give the path of a file");
    }
    if !force {
        bail!("-o {shown} exists; give --force to replace it, or choose another output path");
    }
    Ok(())
}

/// The input that is the same file as `path` (same device and inode, following links), if any.
fn same_file_as_input<'a>(path: &Path, inputs: &'a [PathBuf]) -> Option<&'a PathBuf> {
    let target = std::fs::metadata(path).ok()?;
    inputs
        .iter()
        .find(|i| std::fs::metadata(i).is_ok_and(|m| m.dev() == target.dev() && m.ino() == target.ino()))
}

/// Refuses a new file whose folder does not exist or is not a folder.
fn check_folder(path: &Path) -> Result<()> {
    let folder = folder_of(path);
    match std::fs::metadata(folder) {
        Ok(m) if m.is_dir() => Ok(()),
        Ok(_) => bail!(
            "-o {}: {} is not a folder; give a path in an existing folder",
            path.display(),
            folder.display()
        ),
        Err(e) => bail!(
            "-o {}: the folder {} cannot be used ({e}); create it first or give a path in an existing folder",
            path.display(),
            folder.display()
        ),
    }
}

/// The folder a path is in (`.` for a bare file name).
fn folder_of(path: &Path) -> &Path {
    match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    }
}

/// Distinguishes the temporary files of one process.
static COUNTER: AtomicU64 = AtomicU64::new(0);

/// A report being written: a temporary file in the target's folder (so on the same filesystem),
/// named `.{name}.retidose-tmp-{pid}-{counter}` and created with `create_new`, written through a
/// buffer. [`AtomicFile::commit`] flushes it, syncs it to disk and renames it over the target;
/// dropping an `AtomicFile` that was not committed removes the temporary file, so an error at
/// any point before the rename leaves an earlier file at the target untouched.
#[derive(Debug)]
pub struct AtomicFile {
    /// The file the report is for.
    target: PathBuf,
    /// The temporary file beside it.
    temp: PathBuf,
    /// The buffered temporary file; `None` once committed or given up.
    writer: Option<BufWriter<File>>,
}

impl AtomicFile {
    /// Creates the temporary file beside `path`, with the permissions of an existing regular file
    /// at `path` when there is one.
    ///
    /// # Errors
    /// When `path` has no file name, or the temporary file cannot be created (a missing or
    /// read-only folder), naming the folder.
    pub fn create(path: &Path) -> Result<AtomicFile> {
        let Some(name) = path.file_name() else {
            bail!("-o {} names no file; give a file path such as report.html", path.display());
        };
        let folder = folder_of(path);
        let (file, temp) = create_temp(folder, name).with_context(|| {
            format!(
                "cannot create a temporary file in {} to write {}; the folder must exist and be writable",
                folder.display(),
                path.display()
            )
        })?;
        if let Some(m) = std::fs::metadata(path).ok().filter(|m| m.is_file()) {
            // Best effort: a report replacing a file keeps its mode.
            let _ = file.set_permissions(m.permissions());
        }
        Ok(AtomicFile { target: path.to_path_buf(), temp, writer: Some(BufWriter::new(file)) })
    }

    /// Flushes the buffer, syncs the temporary file to disk and renames it over the target, then
    /// syncs the folder so the rename itself is durable.
    ///
    /// # Errors
    /// When a write, the sync or the rename fails (a full disk, say); the temporary file is then
    /// removed and an earlier file at the target is unchanged.
    pub fn commit(mut self) -> Result<()> {
        let shown = self.target.display().to_string();
        let unchanged = "the earlier file, if any, is unchanged";
        let Some(writer) = self.writer.take() else {
            bail!("cannot write {shown}: the report was already given up; {unchanged}");
        };
        let file = match writer.into_inner() {
            Ok(f) => f,
            Err(e) => {
                let (err, w) = e.into_parts();
                // Close without a second flush; dropping `self` removes the temporary file.
                drop(w.into_parts());
                return Err(anyhow::Error::new(err).context(format!("cannot write {shown}; {unchanged}")));
            }
        };
        file.sync_all().with_context(|| format!("cannot write {shown} to disk; {unchanged}"))?;
        drop(file);
        std::fs::rename(&self.temp, &self.target)
            .with_context(|| format!("cannot replace {shown} with the new report; {unchanged}"))?;
        // The rename is done: nothing is left to remove.
        self.temp = PathBuf::new();
        if let Ok(folder) = File::open(folder_of(&self.target)) {
            // Best effort: some filesystems cannot sync a folder.
            let _ = folder.sync_all();
        }
        Ok(())
    }

    #[cfg(test)]
    /// The temporary file's path (for tests and messages).
    pub fn temp_path(&self) -> &Path {
        &self.temp
    }
}

/// Creates `.{name}.retidose-tmp-{pid}-{counter}` in `folder` with `create_new`, trying the next
/// counter when a stale file holds the name.
fn create_temp(folder: &Path, name: &std::ffi::OsStr) -> io::Result<(File, PathBuf)> {
    let pid = std::process::id();
    let mut last = io::Error::other("no temporary name tried");
    for _ in 0..100 {
        let n = COUNTER.fetch_add(1, Ordering::Relaxed);
        let mut temp_name = OsString::from(".");
        temp_name.push(name);
        temp_name.push(format!(".retidose-tmp-{pid}-{n}"));
        let temp = folder.join(temp_name);
        match OpenOptions::new().write(true).create_new(true).open(&temp) {
            Ok(f) => return Ok((f, temp)),
            Err(e) if e.kind() == ErrorKind::AlreadyExists => last = e,
            Err(e) => return Err(e),
        }
    }
    Err(last)
}

impl Write for AtomicFile {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        self.writer.as_mut().ok_or_else(closed)?.write(buf)
    }

    fn flush(&mut self) -> io::Result<()> {
        self.writer.as_mut().ok_or_else(closed)?.flush()
    }
}

/// The error of a write after the file was committed or given up.
fn closed() -> io::Error {
    io::Error::other("the report file is already closed")
}

impl Drop for AtomicFile {
    fn drop(&mut self) {
        if let Some(w) = self.writer.take() {
            // Close without flushing: the buffered bytes are not wanted.
            drop(w.into_parts());
        }
        if !self.temp.as_os_str().is_empty() {
            let _ = std::fs::remove_file(&self.temp);
        }
    }
}

#[cfg(test)]
/// Writes a report to `path` atomically: creates an [`AtomicFile`], lets `write` fill it and
/// commits it only when `write` succeeded; on any error the temporary file is removed and an
/// earlier file at `path` is unchanged. `write` gets a `&mut dyn Write`, so a test can wrap it in
/// a writer that fails.
///
/// # Errors
/// From [`AtomicFile::create`], from `write` (naming `path`) or from [`AtomicFile::commit`].
pub fn write_atomically<F>(path: &Path, write: F) -> Result<()>
where
    F: FnOnce(&mut dyn Write) -> io::Result<()>,
{
    let mut file = AtomicFile::create(path)?;
    write(&mut file).with_context(|| {
        format!("cannot write {}; the earlier file, if any, is unchanged", path.display())
    })?;
    file.commit()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A fresh, empty folder for one test.
    fn folder(test: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("retidose-output-{}-{test}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).unwrap();
        d
    }

    /// The names in a folder.
    fn names(d: &Path) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(d)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    /// The message of a refusal.
    fn refusal(path: &Path, inputs: &[PathBuf], force: bool) -> String {
        format!("{:#}", check_target(path, inputs, force).unwrap_err())
    }

    /// A writer that accepts `left` bytes, then fails as a full disk does.
    struct FailAfter<'a> {
        inner: &'a mut dyn Write,
        left: usize,
    }

    impl Write for FailAfter<'_> {
        fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
            if self.left == 0 {
                return Err(io::Error::new(ErrorKind::StorageFull, "no space left on device (simulated)"));
            }
            let n = self.inner.write(&buf[..buf.len().min(self.left)])?;
            self.left -= n;
            Ok(n)
        }

        fn flush(&mut self) -> io::Result<()> {
            self.inner.flush()
        }
    }

    #[test]
    fn a_new_path_in_an_existing_folder_is_accepted() {
        let d = folder("new");
        check_target(&d.join("report.csv"), &[], false).unwrap();
        let msg = refusal(Path::new(""), &[], false);
        assert!(msg.contains("names no file"), "{msg}");
        let msg = refusal(&d.join("missing/report.csv"), &[], false);
        assert!(msg.contains("missing") && msg.contains("existing folder"), "{msg}");
    }

    #[test]
    fn refuses_an_input_its_hard_link_and_its_symlink() {
        let d = folder("input");
        let input = d.join("readings.csv");
        std::fs::write(&input, "old").unwrap();
        std::fs::hard_link(&input, d.join("hard.csv")).unwrap();
        std::os::unix::fs::symlink(&input, d.join("soft.csv")).unwrap();
        for name in ["readings.csv", "hard.csv", "soft.csv"] {
            let msg = refusal(&d.join(name), std::slice::from_ref(&input), true);
            assert!(msg.contains("is an input of this run (the same file as"), "{msg}");
            assert!(msg.contains("readings.csv") && msg.contains("choose another output path"), "{msg}");
        }
        // The input given through a link is recognised as well.
        let msg = refusal(&input, &[d.join("soft.csv")], true);
        assert!(msg.contains("is an input of this run"), "{msg}");
        assert_eq!(std::fs::read_to_string(&input).unwrap(), "old");
    }

    #[test]
    fn refuses_symlinks_dangling_or_not() {
        let d = folder("links");
        std::os::unix::fs::symlink(d.join("nowhere.csv"), d.join("dangling.csv")).unwrap();
        let msg = refusal(&d.join("dangling.csv"), &[], true);
        assert!(msg.contains("dangling") && msg.contains("give the real path"), "{msg}");
        std::fs::write(d.join("real.csv"), "old").unwrap();
        std::os::unix::fs::symlink(d.join("real.csv"), d.join("link.csv")).unwrap();
        let msg = refusal(&d.join("link.csv"), &[], true);
        assert!(msg.contains("is a symbolic link; give the real path"), "{msg}");
    }

    #[test]
    fn refuses_a_directory_and_a_device() {
        let d = folder("dir");
        let msg = refusal(&d, &[], true);
        assert!(msg.contains("is a directory"), "{msg}");
        let msg = refusal(Path::new("/dev/null"), &[], true);
        assert!(msg.contains("not a regular file"), "{msg}");
    }

    #[test]
    fn refuses_an_existing_file_without_force() {
        let d = folder("exists");
        let p = d.join("report.html");
        std::fs::write(&p, "old").unwrap();
        let msg = refusal(&p, &[], false);
        assert!(msg.contains("exists; give --force to replace it"), "{msg}");
        check_target(&p, &[], true).unwrap();
    }

    #[test]
    fn commit_replaces_the_contents_and_leaves_no_temporary_file() {
        let d = folder("commit");
        let p = d.join("report.md");
        std::fs::write(&p, "old report, longer than the new one").unwrap();
        let mut f = AtomicFile::create(&p).unwrap();
        let temp = f.temp_path().to_path_buf();
        assert!(temp.file_name().unwrap().to_string_lossy().starts_with(".report.md.retidose-tmp-"));
        f.write_all(b"new").unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "old report, longer than the new one");
        f.commit().unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "new");
        assert_eq!(names(&d), ["report.md"]);
        // A new file as well.
        write_atomically(&d.join("fresh.md"), |w| w.write_all(b"fresh")).unwrap();
        assert_eq!(std::fs::read_to_string(d.join("fresh.md")).unwrap(), "fresh");
    }

    #[test]
    fn an_uncommitted_file_is_removed_and_the_old_file_kept() {
        let d = folder("drop");
        let p = d.join("report.csv");
        let old = b"shelf,column\n1,1\n\xff binary too";
        std::fs::write(&p, old).unwrap();
        {
            let mut f = AtomicFile::create(&p).unwrap();
            f.write_all(&[b'x'; 20_000]).unwrap();
        }
        assert_eq!(std::fs::read(&p).unwrap(), old);
        assert_eq!(names(&d), ["report.csv"]);
    }

    #[test]
    fn a_simulated_full_disk_midway_leaves_the_old_file_intact() {
        simulated_full_disk("full");
    }

    /// A write that fails after 10 000 bytes, in its own folder `tag` (tests run in parallel).
    fn simulated_full_disk(tag: &str) {
        let d = folder(tag);
        let p = d.join("report.html");
        std::fs::write(&p, "old").unwrap();
        let err = write_atomically(&p, |w| {
            let mut w = FailAfter { inner: w, left: 10_000 };
            for _ in 0..100 {
                w.write_all(&[b'y'; 1000])?;
            }
            Ok(())
        })
        .unwrap_err();
        let msg = format!("{err:#}");
        assert!(
            msg.contains("report.html") && msg.contains("unchanged") && msg.contains("simulated"),
            "{msg}"
        );
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
        assert_eq!(names(&d), ["report.html"]);
    }

    #[test]
    fn create_in_a_missing_folder_names_it() {
        let d = folder("nofolder");
        let msg = format!("{:#}", AtomicFile::create(&d.join("no/report.md")).unwrap_err());
        assert!(msg.contains("temporary file") && msg.contains("must exist"), "{msg}");
    }

    /// With RETIDOSE_TMPFS set to a small mounted tmpfs (at most a few MiB), a report larger
    /// than its free space fails to write or to commit, the earlier file stays as it was and no
    /// temporary file is left; without it, the same checks on a simulated failure.
    #[test]
    fn a_full_filesystem_leaves_the_old_file_intact_tmpfs_or_simulated() {
        let Some(mount) = std::env::var_os("RETIDOSE_TMPFS") else {
            eprintln!("RETIDOSE_TMPFS is not set: a simulated full disk instead of a real one");
            return simulated_full_disk("full-fallback");
        };
        let d = PathBuf::from(mount).join(format!("retidose-full-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).unwrap();
        let p = d.join("report.html");
        std::fs::write(&p, "old").unwrap();
        // 64 MiB in 64 KiB pieces: more than a small tmpfs holds.
        let piece = vec![b'z'; 64 << 10];
        let result = write_atomically(&p, |w| (0..1024).try_for_each(|_| w.write_all(&piece)));
        let msg = format!("{:#}", result.expect_err("a report larger than the filesystem must fail"));
        eprintln!("a real full filesystem at {}: {msg}", d.display());
        assert!(msg.contains("report.html") && msg.contains("unchanged"), "{msg}");
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
        assert_eq!(names(&d), ["report.html"]);
        std::fs::remove_dir_all(&d).unwrap();
    }
}
