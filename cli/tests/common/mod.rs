//! Helpers shared by the end-to-end tests: run the built `sprung` binary, find the repository's
//! folders, make scratch folders.

#![allow(
    dead_code,
    reason = "each test file uses its own subset of the helpers"
)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// The repository root (the workspace folder above `cli/`).
pub fn repo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .parent()
        .map_or_else(|| PathBuf::from("."), Path::to_path_buf)
}

/// Runs `sprung ARGS...` with colours switched off and returns its output.
pub fn sprung<I, S>(args: I) -> Output
where
    I: IntoIterator<Item = S>,
    S: AsRef<std::ffi::OsStr>,
{
    let result = Command::new(env!("CARGO_BIN_EXE_sprung"))
        .args(args)
        .env("NO_COLOR", "1")
        .output();
    match result {
        Ok(output) => output,
        Err(err) => panic!("could not run the sprung binary: {err}"),
    }
}

pub fn stdout(output: &Output) -> String {
    String::from_utf8_lossy(&output.stdout).into_owned()
}

pub fn stderr(output: &Output) -> String {
    String::from_utf8_lossy(&output.stderr).into_owned()
}

/// The exit code; a run killed by a signal (a crash) fails the test here.
pub fn code(output: &Output) -> i32 {
    match output.status.code() {
        Some(code) => code,
        None => panic!(
            "sprung was killed by a signal (crash?); stderr:\n{}",
            stderr(output)
        ),
    }
}

/// A fresh, empty scratch folder for one test, under Cargo's per-target temporary folder.
pub fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(name);
    let _ = std::fs::remove_dir_all(&dir);
    if let Err(err) = std::fs::create_dir_all(&dir) {
        panic!("cannot create {}: {err}", dir.display());
    }
    dir
}

pub fn write(path: &Path, bytes: impl AsRef<[u8]>) {
    if let Some(parent) = path.parent() {
        let _ = std::fs::create_dir_all(parent);
    }
    if let Err(err) = std::fs::write(path, bytes) {
        panic!("cannot write {}: {err}", path.display());
    }
}

/// The `*.sprung` files of a folder (not below it), sorted.
pub fn models_in(dir: &Path) -> Vec<PathBuf> {
    let mut found: Vec<PathBuf> = match std::fs::read_dir(dir) {
        Ok(entries) => entries
            .filter_map(Result::ok)
            .map(|e| e.path())
            .filter(|p| p.extension().is_some_and(|e| e == "sprung"))
            .collect(),
        Err(err) => panic!("cannot list {}: {err}", dir.display()),
    };
    found.sort();
    found
}

/// Parses stdout as JSON.
pub fn json(output: &Output) -> serde_json::Value {
    match serde_json::from_slice(&output.stdout) {
        Ok(value) => value,
        Err(err) => panic!("stdout is not JSON ({err}):\n{}", stdout(output)),
    }
}
