//! `sprung lsp`: serves the language server over stdin and stdout. The server is the
//! `sprung-lsp` library; this command only picks the transport.

use std::io;

use super::Status;

pub fn run() -> io::Result<Status> {
    sprung_lsp::run_stdio()?;
    Ok(Status::Passed)
}
