//! Turning command-line paths into model texts: folder expansion and bounded, checked reading.
//!
//! Folders are searched recursively for `*.sprung` files; the files of each folder argument
//! are sorted by path so runs are deterministic. Symbolic links to folders are not followed
//! (no loops); symbolic links to files are. A file named explicitly is read whatever its
//! extension.

use std::fmt;
use std::fs;
use std::io::{self, Read};
use std::path::{Path, PathBuf};

/// The largest model file the tools accept (language.md; catalogue code SP106).
pub const MAX_FILE_BYTES: u64 = 8 * 1024 * 1024;

/// The extension of model files.
pub const EXTENSION: &str = "sprung";

/// A path argument that cannot be turned into files: a usage error (exit status 2).
#[derive(Debug)]
pub enum PathError {
    Missing(PathBuf),
    NoModels(PathBuf),
    Unreadable(PathBuf, io::Error),
}

impl fmt::Display for PathError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            PathError::Missing(p) => write!(f, "`{}`: no such file or folder", p.display()),
            PathError::NoModels(p) => write!(
                f,
                "`{}` is a folder with no `.{EXTENSION}` files in it or below it",
                p.display()
            ),
            PathError::Unreadable(p, err) => {
                write!(f, "cannot list the folder `{}`: {err}", p.display())
            }
        }
    }
}

/// Expands files and folders into the list of files to check, in order, without duplicates.
pub fn expand(paths: &[PathBuf]) -> Result<Vec<PathBuf>, PathError> {
    let mut out: Vec<PathBuf> = Vec::new();
    for path in paths {
        let meta = match fs::metadata(path) {
            Ok(meta) => meta,
            Err(err) if err.kind() == io::ErrorKind::NotFound => {
                return Err(PathError::Missing(path.clone()));
            }
            Err(err) => return Err(PathError::Unreadable(path.clone(), err)),
        };
        let found = if meta.is_dir() {
            let mut found = models_below(path)?;
            if found.is_empty() {
                return Err(PathError::NoModels(path.clone()));
            }
            found.sort();
            found
        } else {
            vec![path.clone()]
        };
        for file in found {
            if !out.contains(&file) {
                out.push(file);
            }
        }
    }
    Ok(out)
}

/// Every `*.sprung` file in `root` or below it, unsorted.
fn models_below(root: &Path) -> Result<Vec<PathBuf>, PathError> {
    let mut found = Vec::new();
    let mut pending = vec![root.to_path_buf()];
    while let Some(dir) = pending.pop() {
        let entries = fs::read_dir(&dir).map_err(|err| PathError::Unreadable(dir.clone(), err))?;
        for entry in entries {
            let entry = entry.map_err(|err| PathError::Unreadable(dir.clone(), err))?;
            let path = entry.path();
            let kind = entry
                .file_type()
                .map_err(|err| PathError::Unreadable(path.clone(), err))?;
            if kind.is_dir() {
                pending.push(path);
            } else if path.extension().is_some_and(|ext| ext == EXTENSION)
                && (kind.is_file() || (kind.is_symlink() && path.is_file()))
            {
                found.push(path);
            }
        }
    }
    Ok(found)
}

/// A file that cannot be checked (exit status 2).
#[derive(Debug)]
pub enum ReadError {
    Io(io::Error),
    /// Over the limit; the size when the file system told it.
    TooLarge {
        bytes: Option<u64>,
    },
    NotUtf8 {
        offset: usize,
        line: usize,
        column: usize,
    },
}

impl fmt::Display for ReadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ReadError::Io(err) => write!(f, "cannot read it: {err}"),
            ReadError::TooLarge { bytes } => {
                write!(f, "refused [SP106]: the file is ")?;
                if let Some(bytes) = bytes {
                    write!(f, "{bytes} bytes, ")?;
                }
                write!(
                    f,
                    "over the limit of 8 MiB ({MAX_FILE_BYTES} bytes); lumped models are far \
                     smaller"
                )
            }
            ReadError::NotUtf8 {
                offset,
                line,
                column,
            } => write!(
                f,
                "not valid UTF-8 text: the first bad byte is at byte offset {offset} \
                 (line {line}, column {column}); save the file as UTF-8"
            ),
        }
    }
}

/// Reads a model file: at most [`MAX_FILE_BYTES`], and only if it is UTF-8. An empty file is
/// returned as an empty text (the engine reports that there is nothing to check).
pub fn read_model(path: &Path) -> Result<String, ReadError> {
    let file = fs::File::open(path).map_err(ReadError::Io)?;
    if let Ok(meta) = file.metadata()
        && meta.len() > MAX_FILE_BYTES
    {
        return Err(ReadError::TooLarge {
            bytes: Some(meta.len()),
        });
    }
    // The size on disk may change or lie (pipes, special files): bound the read itself too.
    let mut bytes = Vec::new();
    file.take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(ReadError::Io)?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Err(ReadError::TooLarge { bytes: None });
    }
    String::from_utf8(bytes).map_err(|err| {
        let valid = &err.as_bytes()[..err.utf8_error().valid_up_to()];
        not_utf8_at(valid)
    })
}

/// Locates the first bad byte from the valid text before it: 1-based line, and the column
/// counted in characters, as every other column this tool prints.
fn not_utf8_at(valid: &[u8]) -> ReadError {
    // `valid` is UTF-8 by construction; the fallback only keeps this total.
    let text = std::str::from_utf8(valid).unwrap_or_default();
    let line_start = text.rfind('\n').map_or(0, |i| i + 1);
    ReadError::NotUtf8 {
        offset: valid.len(),
        line: text.matches('\n').count() + 1,
        column: text[line_start..].chars().count() + 1,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_byte_is_located_in_characters() {
        let mut bytes = "ab\nµx".as_bytes().to_vec();
        let valid_len = bytes.len();
        bytes.push(0xFF);
        match String::from_utf8(bytes) {
            Err(err) => {
                let valid = &err.as_bytes()[..err.utf8_error().valid_up_to()];
                assert_eq!(valid.len(), valid_len);
                match not_utf8_at(valid) {
                    ReadError::NotUtf8 {
                        offset,
                        line,
                        column,
                    } => assert_eq!((offset, line, column), (6, 2, 3)),
                    other => panic!("unexpected {other:?}"),
                }
            }
            Ok(_) => panic!("0xFF is never valid UTF-8"),
        }
    }
}
