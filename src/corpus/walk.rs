//! The folder walk: which files under the command-line paths are read.

use super::document::{Input, Skipped, UNKNOWN_FORMAT};
use super::format::is_known_file;
use std::path::PathBuf;

/// The name of the per-folder ignore file (gitignore syntax).
pub(super) const IGNORE_FILE: &str = ".hearsayignore";

/// Walk the command-line paths. Folders are walked recursively in a stable order; files given
/// by name are always read (as text when the extension is unknown).
pub fn discover(paths: &[String]) -> (Vec<Input>, Vec<Skipped>) {
    let mut inputs = Vec::new();
    let mut skipped = Vec::new();
    for p in paths {
        if p == "-" {
            inputs.push(Input {
                path: PathBuf::from("-"),
                label: "-".into(),
            });
            continue;
        }
        let path = PathBuf::from(p);
        match std::fs::metadata(&path) {
            Err(e) => skipped.push(Skipped {
                path: p.clone(),
                reason: format!("cannot read: {e}"),
            }),
            Ok(m) if m.is_file() => inputs.push(Input {
                path: path.clone(),
                label: p.clone(),
            }),
            Ok(m) if !m.is_dir() => skipped.push(Skipped {
                path: p.clone(),
                reason: not_regular(&m.file_type()),
            }),
            Ok(_) => {
                let walker = ignore::WalkBuilder::new(&path)
                    .hidden(true)
                    .add_custom_ignore_filename(IGNORE_FILE)
                    .follow_links(false)
                    .sort_by_file_path(|a, b| a.cmp(b))
                    .build();
                for entry in walker {
                    match entry {
                        Err(e) => skipped.push(Skipped {
                            path: p.clone(),
                            reason: format!("walk error: {e}"),
                        }),
                        Ok(e) => {
                            let label = e.path().to_string_lossy().into_owned();
                            if e.path_is_symlink() {
                                // Links are not followed: a link loop must not hang the walk.
                                skipped.push(Skipped {
                                    path: label,
                                    reason: "symbolic link (not followed)".into(),
                                });
                                continue;
                            }
                            match e.file_type() {
                                Some(t) if t.is_file() => {}
                                Some(t) if !t.is_dir() => {
                                    // Opening a named pipe waits for a writer: it must be
                                    // passed over, and said so, never opened.
                                    skipped.push(Skipped {
                                        path: label,
                                        reason: not_regular(&t),
                                    });
                                    continue;
                                }
                                _ => continue,
                            }
                            if is_known_file(e.path()) {
                                inputs.push(Input {
                                    path: e.path().to_path_buf(),
                                    label,
                                });
                            } else {
                                skipped.push(Skipped {
                                    path: label,
                                    reason: UNKNOWN_FORMAT.into(),
                                });
                            }
                        }
                    }
                }
            }
        }
    }
    (inputs, skipped)
}

/// Why a path that is neither a regular file nor a folder is not read: a named pipe would block
/// the scan until something writes to it, and a device or socket holds no document.
fn not_regular(t: &std::fs::FileType) -> String {
    #[cfg(unix)]
    let (kind, hint) = {
        use std::os::unix::fs::FileTypeExt;
        if t.is_fifo() {
            (
                "a named pipe",
                " (to read a stream, pipe it to standard input and pass -)",
            )
        } else if t.is_socket() {
            ("a socket", "")
        } else if t.is_char_device() || t.is_block_device() {
            ("a device", "")
        } else {
            ("a special file", "")
        }
    };
    #[cfg(not(unix))]
    let (kind, hint) = {
        let _ = t;
        ("a special file", "")
    };
    format!("{kind}, not a regular file: not read{hint}")
}
