//! `sprung-lsp`: the language server (a later issue fills it).
//!
//! It owns the document store, change handling, analysis scheduling and one small module per
//! LSP feature translating engine results to protocol types. It must not contain physics or
//! unit rules: those live in `sprung-engine`.
