//! `sprung explain CODE` and `sprung explain --list`.

use std::io::{self, Write};

use sprung_engine::diagnostics::{CATALOGUE, lookup};

use crate::args::ExplainArgs;

use super::{Status, report_error};

/// The width the explanation is wrapped at.
const WIDTH: usize = 80;

pub fn run(args: &ExplainArgs) -> io::Result<Status> {
    let mut out = io::stdout().lock();
    if args.list {
        for info in CATALOGUE {
            writeln!(
                out,
                "{}  {:<7}  {}",
                info.code,
                info.severity.as_str(),
                info.title
            )?;
        }
        return Ok(Status::Passed);
    }
    let code = args.code.as_deref().unwrap_or_default();
    let Some(info) = lookup(code) else {
        report_error(&format!(
            "`{code}` is not a diagnostic code of sprung; run `sprung explain --list` to see \
             every code"
        ));
        return Ok(Status::Usage);
    };
    writeln!(out, "{}: {}", info.code, info.title)?;
    writeln!(out, "severity: {}", info.severity.as_str())?;
    writeln!(out)?;
    for line in wrap(info.explanation, WIDTH) {
        writeln!(out, "{line}")?;
    }
    Ok(Status::Passed)
}

/// Greedy word wrap; a word longer than the width stands on its own line.
fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

#[cfg(test)]
mod tests {
    use super::wrap;

    #[test]
    fn wrap_keeps_every_word_and_the_width() {
        let text = "alpha beta gamma delta epsilon zeta eta theta iota kappa";
        let lines = wrap(text, 16);
        assert_eq!(lines.join(" "), text);
        assert!(lines.iter().all(|l| l.chars().count() <= 16), "{lines:?}");
        assert_eq!(lines[0], "alpha beta gamma");
        assert_eq!(
            wrap("averyveryverylongword x", 5),
            ["averyveryverylongword", "x"]
        );
    }
}
