//! `sprung fmt` end to end, on scratch copies: in-place rewriting, `--check` (diff, exit 1,
//! nothing written), files with syntax errors (reported with their position, left untouched,
//! exit 1), usage errors (exit 2) and standard input.

mod common;

use std::io::Write;
use std::process::{Command, Stdio};

use common::{code, repo, scratch, sprung, stderr, stdout, write};

const MESSY: &str = "# Torsional pump drive, written in a hurry.\n\
system  drive{ inertia motor=0.12 kg*m^2 inertia pump = 0.4 kg·m^2   # impeller and coupling\n\
spring shaft between motor and pump=12 kN*m/rad\n\
\n\
\n\
damper loss between motor and pump = 2*0.02*sqrt( shaft*pump )}\n";

const CANONICAL: &str = "# Torsional pump drive, written in a hurry.\n\
system drive {\n  inertia motor = 0.12 kg*m^2\n  inertia pump = 0.4 kg*m^2 # impeller and coupling\n  \
spring shaft between motor and pump = 12 kN*m/rad\n\n  \
damper loss between motor and pump = 2 * 0.02 * sqrt(shaft * pump)\n}\n";

const BROKEN: &str =
    "system rack {\n  mass shelf = 12 kg\n  spring legs between shelf = 40 kN/m\n}\n";

fn read(path: &std::path::Path) -> String {
    std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

#[test]
fn formats_in_place_and_then_finds_nothing_to_do() {
    let dir = scratch("fmt_in_place");
    let file = dir.join("drive.sprung");
    write(&file, MESSY);
    let run = sprung(["fmt".as_ref(), file.as_os_str()]);
    assert_eq!(code(&run), 0, "{}", stderr(&run));
    assert_eq!(read(&file), CANONICAL);
    assert!(stdout(&run).contains("formatted"), "{}", stdout(&run));
    assert!(
        stdout(&run).contains("1 file formatted, 0 already formatted"),
        "{}",
        stdout(&run)
    );
    let again = sprung(["fmt".as_ref(), file.as_os_str()]);
    assert_eq!(code(&again), 0);
    assert!(
        stdout(&again).contains("0 files formatted, 1 already formatted"),
        "{}",
        stdout(&again)
    );
    assert_eq!(read(&file), CANONICAL);
}

#[test]
fn check_lists_the_change_with_a_diff_writes_nothing_and_exits_1() {
    let dir = scratch("fmt_check");
    let file = dir.join("drive.sprung");
    write(&file, MESSY);
    let run = sprung(["fmt".as_ref(), "--check".as_ref(), file.as_os_str()]);
    assert_eq!(code(&run), 1, "{}", stderr(&run));
    let out = stdout(&run);
    assert!(out.contains("would format"), "{out}");
    assert!(
        out.contains("-spring shaft between motor and pump=12 kN*m/rad"),
        "{out}"
    );
    assert!(
        out.contains("+  spring shaft between motor and pump = 12 kN*m/rad"),
        "{out}"
    );
    assert!(out.contains("1 file would be formatted"), "{out}");
    assert_eq!(read(&file), MESSY, "--check must not write");
}

#[test]
fn the_examples_pass_the_check() {
    let run = sprung([
        "fmt".as_ref(),
        "--check".as_ref(),
        repo().join("examples").as_os_str(),
    ]);
    assert_eq!(code(&run), 0, "{}{}", stdout(&run), stderr(&run));
    assert!(
        stdout(&run).contains("0 files would be formatted"),
        "{}",
        stdout(&run)
    );
}

#[test]
fn a_file_with_syntax_errors_is_reported_and_left_untouched() {
    let dir = scratch("fmt_broken");
    let broken = dir.join("rack.sprung");
    let messy = dir.join("drive.sprung");
    write(&broken, BROKEN);
    write(&messy, MESSY);
    let run = sprung(["fmt".as_ref(), dir.as_os_str()]);
    assert_eq!(code(&run), 1, "{}", stderr(&run));
    let err = stderr(&run);
    // `=` where `and` was expected: line 3, column 29 (1-based, characters).
    assert!(err.contains("rack.sprung:3:29"), "{err}");
    assert!(err.contains("expected `and` between the two ends"), "{err}");
    assert!(err.contains("was not formatted"), "{err}");
    assert_eq!(read(&broken), BROKEN);
    // The other file of the folder is still formatted.
    assert_eq!(read(&messy), CANONICAL);
    assert!(
        stdout(&run).contains("1 file not formatted (syntax errors)"),
        "{}",
        stdout(&run)
    );
}

#[test]
fn crlf_files_keep_crlf() {
    let dir = scratch("fmt_crlf");
    let file = dir.join("drive.sprung");
    write(&file, MESSY.replace('\n', "\r\n"));
    let run = sprung(["fmt".as_ref(), file.as_os_str()]);
    assert_eq!(code(&run), 0, "{}", stderr(&run));
    assert_eq!(read(&file), CANONICAL.replace('\n', "\r\n"));
}

#[test]
fn usage_errors_exit_2() {
    let dir = scratch("fmt_usage");
    let missing = dir.join("nowhere.sprung");
    let run = sprung(["fmt".as_ref(), missing.as_os_str()]);
    assert_eq!(code(&run), 2);
    assert!(
        stderr(&run).contains("no such file or folder"),
        "{}",
        stderr(&run)
    );
    assert_eq!(code(&sprung(["fmt"])), 2, "no path is a usage error");
    assert_eq!(code(&sprung(["fmt", "-", "x.sprung"])), 2);
    let bad = dir.join("latin1.sprung");
    write(&bad, b"let a = 1 # caf\xe9\n");
    let run = sprung(["fmt".as_ref(), bad.as_os_str()]);
    assert_eq!(code(&run), 2);
    assert!(stderr(&run).contains("not valid UTF-8"), "{}", stderr(&run));
}

fn with_stdin(args: &[&str], input: &str) -> std::process::Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_sprung"))
        .args(args)
        .env("NO_COLOR", "1")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap_or_else(|e| panic!("could not run sprung: {e}"));
    if let Some(mut pipe) = child.stdin.take() {
        pipe.write_all(input.as_bytes())
            .unwrap_or_else(|e| panic!("cannot write stdin: {e}"));
    }
    child
        .wait_with_output()
        .unwrap_or_else(|e| panic!("sprung did not finish: {e}"))
}

#[test]
fn standard_input_to_standard_output() {
    let run = with_stdin(&["fmt", "-"], MESSY);
    assert_eq!(code(&run), 0, "{}", stderr(&run));
    assert_eq!(stdout(&run), CANONICAL);
    let run = with_stdin(&["fmt", "--check", "-"], CANONICAL);
    assert_eq!(code(&run), 0);
    assert_eq!(stdout(&run), "");
    let run = with_stdin(&["fmt", "--check", "-"], MESSY);
    assert_eq!(code(&run), 1);
    assert!(stdout(&run).contains("+system drive {"), "{}", stdout(&run));
    let run = with_stdin(&["fmt", "-"], BROKEN);
    assert_eq!(code(&run), 1);
    assert!(stderr(&run).contains("<stdin>:3:29"), "{}", stderr(&run));
}
