//! `sprung-lsp`: the language server for `.sprung` models, as a library.
//!
//! It owns the document store, change handling and analysis scheduling ([`server`]) and one
//! small module per feature translating engine results to protocol types ([`diagnostics`],
//! [`hints`], [`hover`], [`lens`], [`actions`], [`completion`], [`navigation`], [`outline`], [`semantic`], [`formatting`]). It must
//! not contain physics or unit rules: values, modes and verdicts come from `sprung-engine`,
//! unit factors from its registry. The binary `sprung lsp` only picks the transport
//! ([`serve_stdio`]); tests drive the service in-process ([`service`]).

pub mod actions;
pub mod completion;
pub mod diagnostics;
pub mod display;
pub mod document;
pub mod drives;
pub mod formatting;
pub mod hints;
pub mod hover;
pub mod lens;
pub mod navigation;
pub mod outline;
pub mod semantic;
pub mod server;
pub mod snapshot;
pub mod symbols;

pub use server::{Server, ServerConfig};
use tower_lsp_server::{ClientSocket, LspService};

/// The service and the socket of its client side, for driving the server in-process.
pub fn service(config: ServerConfig) -> (LspService<Server>, ClientSocket) {
    LspService::new(move |client| Server::with_config(client, config))
}

/// Serves the protocol over any reader and writer until the client sends `exit`.
pub async fn run<I, O>(input: I, output: O)
where
    I: tokio::io::AsyncRead + Unpin,
    O: tokio::io::AsyncWrite,
{
    let (service, socket) = service(ServerConfig::default());
    tower_lsp_server::Server::new(input, output, socket)
        .serve(service)
        .await;
}

/// Serves the protocol over stdin and stdout until the client sends `exit`.
pub async fn serve_stdio() {
    run(tokio::io::stdin(), tokio::io::stdout()).await;
}

/// [`serve_stdio`] on a runtime of its own, for a binary that has none.
pub fn run_stdio() -> std::io::Result<()> {
    let runtime = tokio::runtime::Builder::new_multi_thread()
        .worker_threads(2)
        .enable_all()
        .build()?;
    runtime.block_on(serve_stdio());
    // Blocking analysis tasks still running must not keep the process alive after `exit`.
    runtime.shutdown_timeout(std::time::Duration::from_millis(100));
    Ok(())
}
