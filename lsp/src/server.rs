//! The protocol side: the document store, change handling, analysis scheduling and dispatch to
//! the feature modules.
//!
//! Ordering: the transport runs several handlers at once, so a handler that awaits lets later
//! messages overtake it. Every `didOpen`/`didChange`/`didClose` is therefore applied to the
//! store synchronously, in the handler's first poll, before any `.await`; the store's lock is a
//! `std::sync::Mutex` that is never held across an `.await`.
//!
//! Analysis: each change bumps the document's generation and spawns a task that (after a short
//! debounce for edits, none for the first open) checks the generation is still current, then
//! runs two stages in `spawn_blocking`, cheapest first: the checker (parse, names, units), whose
//! diagnostics are published at once, and then the analysis (modes, responses, corners), after
//! which the whole set is published. A finished stage is kept only if no newer change arrived
//! meanwhile; requests wait (bounded) for a snapshot at least as new as the text they were asked
//! about, so they never answer from a stale text. Features without physics (completion,
//! navigation, tokens, symbols) need only the first stage; the others wait for the second.
//!
//! Inlay hints on a slow model: when the client can be asked to refresh its hints, a hint request
//! waits only briefly for the analysis; if it is not done, it answers with what the checker knows
//! (evaluated values) and the server sends `workspace/inlayHint/refresh` once the analysis lands.
//! Clients that cannot refresh wait for the analysis.

use std::collections::HashMap;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::{Arc, Mutex, MutexGuard};
use std::time::Duration;

use sprung_syntax::Encoding;
use tokio::sync::watch;
use tower_lsp_server::jsonrpc::{Error, Result};
use tower_lsp_server::ls_types::*;
use tower_lsp_server::{Client, LanguageServer};

use crate::document::Document;
use crate::formatting;
use crate::snapshot::{Base, Snapshot};
use crate::{actions, completion, diagnostics, hints, hover, lens, navigation, outline, semantic};

/// Settings of the server.
#[derive(Clone, Debug)]
pub struct ServerConfig {
    /// How long an edit waits for the next one before its analysis starts. The first open is
    /// never delayed.
    pub debounce: Duration,
    /// How long a request waits for the analysis of the text it is about.
    pub request_timeout: Duration,
    /// How long an inlay-hint request waits for the analysis before it answers with the
    /// checker's hints, when the client supports `workspace/inlayHint/refresh`.
    pub hint_patience: Duration,
    /// Makes every read-only feature panic, to test that a panic becomes an internal error.
    #[doc(hidden)]
    pub panic_in_features: bool,
    /// Delays every analysis (the second stage), to test the first stage alone.
    #[doc(hidden)]
    pub analysis_delay: Duration,
}

impl Default for ServerConfig {
    fn default() -> Self {
        ServerConfig {
            debounce: Duration::from_millis(3),
            request_timeout: Duration::from_secs(10),
            hint_patience: Duration::from_millis(60),
            panic_in_features: false,
            analysis_delay: Duration::ZERO,
        }
    }
}

/// The language server. Cheap to clone; every clone shares one state.
#[derive(Clone, Debug)]
pub struct Server {
    inner: Arc<Inner>,
}

#[derive(Debug)]
struct Inner {
    client: Client,
    config: ServerConfig,
    store: Mutex<Store>,
    encoding: Mutex<Encoding>,
    /// Whether the client supports `workspace/inlayHint/refresh`.
    hint_refresh: AtomicBool,
    generation: AtomicU64,
    /// Serializes publishing, so an older result can never be sent after a newer one.
    publish: tokio::sync::Mutex<()>,
}

#[derive(Debug, Default)]
struct Store {
    docs: HashMap<String, DocState>,
}

#[derive(Debug)]
struct DocState {
    uri: Uri,
    doc: Document,
    generation: u64,
    latest: watch::Sender<Option<Arc<Snapshot>>>,
    /// The diagnostics last published for this document.
    published: Option<Vec<Diagnostic>>,
    /// The checker's part of them (what the first stage compares against).
    published_checker: Option<Vec<Diagnostic>>,
    /// Inlay hints were answered for this generation before its analysis was done.
    partial_hints: bool,
    /// The semantic tokens last sent, for `semanticTokens/full/delta`.
    tokens: Option<(String, Vec<SemanticToken>)>,
}

impl DocState {
    fn new(uri: Uri, doc: Document, generation: u64) -> DocState {
        let (latest, _) = watch::channel(None);
        DocState {
            uri,
            doc,
            generation,
            latest,
            published: None,
            // Nothing published reads as no diagnostics: a clean first stage says nothing new.
            published_checker: Some(Vec::new()),
            partial_hints: false,
            tokens: None,
        }
    }
}

/// What a request needs of a snapshot.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Need {
    /// The checker's result (parse, names, values).
    Checked,
    /// The analysis as well (modes, responses, verdicts).
    Analysis,
}

fn key(uri: &Uri) -> String {
    uri.as_str().to_string()
}

impl Server {
    pub fn new(client: Client) -> Self {
        Server::with_config(client, ServerConfig::default())
    }

    pub fn with_config(client: Client, config: ServerConfig) -> Self {
        Server {
            inner: Arc::new(Inner {
                client,
                config,
                store: Mutex::new(Store::default()),
                encoding: Mutex::new(Encoding::Utf16),
                hint_refresh: AtomicBool::new(false),
                generation: AtomicU64::new(0),
                publish: tokio::sync::Mutex::new(()),
            }),
        }
    }

    /// The text the server holds for a document, if it holds one (for tests).
    pub fn document_text(&self, uri: &Uri) -> Option<String> {
        self.inner
            .store()
            .docs
            .get(&key(uri))
            .map(|d| d.doc.text.clone())
    }

    /// The negotiated position encoding.
    pub fn encoding(&self) -> Encoding {
        self.inner.encoding()
    }

    /// Waits for the analysis of the document's current text (for tests and benchmarks).
    pub async fn analyzed(&self, uri: &Uri) -> Option<Arc<Snapshot>> {
        self.inner.snapshot(uri, Need::Analysis).await
    }
}

impl Inner {
    fn store(&self) -> MutexGuard<'_, Store> {
        // A panic while holding the lock cannot leave the map half-updated (every update is
        // one insert or remove), so a poisoned lock is still usable.
        self.store.lock().unwrap_or_else(|p| p.into_inner())
    }

    fn encoding(&self) -> Encoding {
        *self.encoding.lock().unwrap_or_else(|p| p.into_inner())
    }

    fn next_generation(&self) -> u64 {
        self.generation.fetch_add(1, Ordering::Relaxed) + 1
    }

    fn is_current(&self, key: &str, generation: u64) -> bool {
        self.store()
            .docs
            .get(key)
            .is_some_and(|d| d.generation == generation)
    }

    /// Starts the two stages of one generation of a document.
    fn schedule(
        self: &Arc<Self>,
        key: String,
        generation: u64,
        text: String,
        version: i32,
        delay: Duration,
    ) {
        let inner = Arc::clone(self);
        let encoding = self.encoding();
        tokio::spawn(async move {
            if !delay.is_zero() {
                tokio::time::sleep(delay).await;
            }
            if !inner.is_current(&key, generation) {
                return; // superseded by a newer edit
            }
            let checked = tokio::task::spawn_blocking(move || {
                Arc::new(Base::compute(text, version, generation, encoding))
            })
            .await;
            let base = match checked {
                Ok(b) => b,
                Err(e) => return inner.log_failure(&key, e).await,
            };
            let first = Arc::new(Snapshot::checked_only(Arc::clone(&base)));
            if !inner.finish(&key, first).await {
                return;
            }
            let pause = inner.config.analysis_delay;
            if !pause.is_zero() {
                tokio::time::sleep(pause).await;
            }
            if !inner.is_current(&key, generation) {
                return;
            }
            match tokio::task::spawn_blocking(move || Snapshot::analyze(base)).await {
                Ok(s) => {
                    inner.finish(&key, Arc::new(s)).await;
                }
                Err(e) => inner.log_failure(&key, e).await,
            }
        });
    }

    async fn log_failure(&self, key: &str, e: tokio::task::JoinError) {
        let msg = format!("sprung: the analysis of {key} failed: {e}");
        self.client.log_message(MessageType::ERROR, msg).await;
    }

    /// Keeps a finished stage if it is still current, and publishes its diagnostics when they
    /// changed: the first stage only when the checker's part changed (so a failed requirement
    /// does not blink out while the analysis of an unrelated edit runs), the second whenever the
    /// whole set did. Returns whether the snapshot was current.
    async fn finish(self: &Arc<Self>, key: &str, snap: Arc<Snapshot>) -> bool {
        let _serial = self.publish.lock().await;
        let (publish, refresh) = {
            let mut store = self.store();
            let Some(state) = store.docs.get_mut(key) else {
                return false;
            };
            if state.generation != snap.generation {
                return false; // a newer edit arrived while this one was analyzed
            }
            state.latest.send_replace(Some(Arc::clone(&snap)));
            let diags = diagnostics::to_lsp(&snap, &state.uri);
            let changed = if snap.analyzed {
                state.published.as_ref() != Some(&diags)
            } else {
                let changed = state.published_checker.as_ref() != Some(&diags);
                state.published_checker = Some(diags.clone());
                changed
            };
            let refresh = snap.analyzed && std::mem::take(&mut state.partial_hints);
            if changed {
                state.published = Some(diags.clone());
                (Some((state.uri.clone(), diags, snap.version)), refresh)
            } else {
                (None, refresh)
            }
        };
        if let Some((uri, diags, version)) = publish {
            self.client
                .publish_diagnostics(uri, diags, Some(version))
                .await;
        }
        if refresh {
            // A request to the client: its answer is not ours to wait for.
            let client = self.client.clone();
            tokio::spawn(async move {
                let _ = client.inlay_hint_refresh().await;
            });
        }
        true
    }

    /// The newest snapshot at least as new as the document's current text; `None` for an
    /// unknown or closed document, or when the analysis does not finish in time.
    async fn snapshot(&self, uri: &Uri, need: Need) -> Option<Arc<Snapshot>> {
        self.snapshot_within(uri, need, self.config.request_timeout)
            .await
    }

    async fn snapshot_within(
        &self,
        uri: &Uri,
        need: Need,
        limit: Duration,
    ) -> Option<Arc<Snapshot>> {
        let (generation, mut rx) = {
            let store = self.store();
            let state = store.docs.get(&key(uri))?;
            (state.generation, state.latest.subscribe())
        };
        let wait = rx.wait_for(|s| {
            s.as_ref().is_some_and(|s| {
                s.generation >= generation && (need == Need::Checked || s.analyzed)
            })
        });
        match tokio::time::timeout(limit, wait).await {
            Ok(Ok(s)) => s.clone(),
            _ => None,
        }
    }

    /// The snapshot an inlay-hint request answers from: the analyzed one, or (when the client
    /// can refresh and the analysis takes longer than the hint patience) the checker's, with a
    /// refresh promised for when the analysis lands.
    async fn hint_snapshot(&self, uri: &Uri) -> Option<Arc<Snapshot>> {
        if !self.hint_refresh.load(Ordering::Relaxed) {
            return self.snapshot(uri, Need::Analysis).await;
        }
        let patience = self.config.hint_patience;
        if let Some(s) = self.snapshot_within(uri, Need::Analysis, patience).await {
            return Some(s);
        }
        let snap = self.snapshot(uri, Need::Checked).await?;
        if snap.analyzed {
            return Some(snap);
        }
        let mut store = self.store();
        let state = store.docs.get_mut(&key(uri))?;
        if state.generation != snap.generation {
            return None; // edited meanwhile: the client asks again
        }
        // Still running? Then promise a refresh; if it landed meanwhile, answer from it.
        let latest = state.latest.borrow().clone();
        match latest {
            Some(l) if l.generation == snap.generation && l.analyzed => Some(l),
            _ => {
                state.partial_hints = true;
                Some(snap)
            }
        }
    }

    /// Drops a document whose edit could not be applied, clears its diagnostics and logs why.
    async fn drop_document(&self, uri: Uri, why: String) {
        let _serial = self.publish.lock().await;
        let msg = format!(
            "sprung: dropped {} ({why}); reopen the document or send its whole text",
            uri.as_str()
        );
        self.client.log_message(MessageType::WARNING, msg).await;
        self.client.publish_diagnostics(uri, Vec::new(), None).await;
    }

    /// Runs a read-only feature on the document's snapshot off the runtime. A panic in the
    /// feature becomes an internal error; an unknown document an empty answer.
    async fn read<T, F>(&self, uri: &Uri, need: Need, f: F) -> Result<Option<T>>
    where
        T: Send + 'static,
        F: FnOnce(&Snapshot) -> Option<T> + Send + 'static,
    {
        let snap = self.snapshot(uri, need).await;
        self.run(snap, f).await
    }

    /// Runs a feature on a snapshot (see [`Inner::read`]).
    async fn run<T, F>(&self, snap: Option<Arc<Snapshot>>, f: F) -> Result<Option<T>>
    where
        T: Send + 'static,
        F: FnOnce(&Snapshot) -> Option<T> + Send + 'static,
    {
        let Some(snap) = snap else {
            return Ok(None);
        };
        let panic = self.config.panic_in_features;
        // `spawn_blocking` catches a panic of the feature and reports it as a `JoinError`.
        let run = move || {
            if panic {
                panic!("a feature panicked (panic_in_features is set)");
            }
            f(&snap)
        };
        match tokio::task::spawn_blocking(run).await {
            Ok(v) => Ok(v),
            Err(e) => {
                let mut err = Error::internal_error();
                err.message = format!("sprung: internal error: {e}").into();
                Err(err)
            }
        }
    }
}

impl Inner {
    /// Stamps a token set with a fresh result id and keeps it for the next delta request.
    fn remember_tokens(&self, uri: &Uri, mut tokens: SemanticTokens) -> SemanticTokens {
        let id = self.next_generation().to_string();
        tokens.result_id = Some(id.clone());
        if let Some(d) = self.store().docs.get_mut(&key(uri)) {
            d.tokens = Some((id, tokens.data.clone()));
        }
        tokens
    }
}

fn negotiate_encoding(caps: &ClientCapabilities) -> Encoding {
    let offers_utf8 = caps
        .general
        .as_ref()
        .and_then(|g| g.position_encodings.as_ref())
        .is_some_and(|encs| encs.contains(&PositionEncodingKind::UTF8));
    if offers_utf8 {
        Encoding::Utf8
    } else {
        Encoding::Utf16
    }
}

impl LanguageServer for Server {
    async fn initialize(&self, params: InitializeParams) -> Result<InitializeResult> {
        let enc = negotiate_encoding(&params.capabilities);
        *self
            .inner
            .encoding
            .lock()
            .unwrap_or_else(|p| p.into_inner()) = enc;
        let refresh = params
            .capabilities
            .workspace
            .as_ref()
            .and_then(|w| w.inlay_hint.as_ref())
            .and_then(|h| h.refresh_support)
            .unwrap_or(false);
        self.inner.hint_refresh.store(refresh, Ordering::Relaxed);
        let position_encoding = match enc {
            Encoding::Utf8 => PositionEncodingKind::UTF8,
            _ => PositionEncodingKind::UTF16,
        };
        Ok(InitializeResult {
            server_info: Some(ServerInfo {
                name: "sprung".to_string(),
                version: Some(env!("CARGO_PKG_VERSION").to_string()),
            }),
            capabilities: ServerCapabilities {
                position_encoding: Some(position_encoding),
                text_document_sync: Some(TextDocumentSyncCapability::Options(
                    TextDocumentSyncOptions {
                        open_close: Some(true),
                        change: Some(TextDocumentSyncKind::INCREMENTAL),
                        ..TextDocumentSyncOptions::default()
                    },
                )),
                hover_provider: Some(HoverProviderCapability::Simple(true)),
                inlay_hint_provider: Some(OneOf::Left(true)),
                completion_provider: Some(CompletionOptions {
                    trigger_characters: Some(
                        [" ", "*", "/", "(", "^"]
                            .iter()
                            .map(|s| s.to_string())
                            .collect(),
                    ),
                    ..CompletionOptions::default()
                }),
                definition_provider: Some(OneOf::Left(true)),
                references_provider: Some(OneOf::Left(true)),
                document_highlight_provider: Some(OneOf::Left(true)),
                rename_provider: Some(OneOf::Right(RenameOptions {
                    prepare_provider: Some(true),
                    work_done_progress_options: WorkDoneProgressOptions::default(),
                })),
                document_symbol_provider: Some(OneOf::Left(true)),
                code_action_provider: Some(CodeActionProviderCapability::Simple(true)),
                code_lens_provider: Some(CodeLensOptions {
                    resolve_provider: Some(false),
                }),
                folding_range_provider: Some(FoldingRangeProviderCapability::Simple(true)),
                selection_range_provider: Some(SelectionRangeProviderCapability::Simple(true)),
                workspace_symbol_provider: Some(OneOf::Left(true)),
                document_formatting_provider: Some(OneOf::Left(true)),
                document_range_formatting_provider: Some(OneOf::Left(true)),
                semantic_tokens_provider: Some(
                    SemanticTokensServerCapabilities::SemanticTokensOptions(
                        SemanticTokensOptions {
                            legend: semantic::legend(),
                            full: Some(SemanticTokensFullOptions::Delta { delta: Some(true) }),
                            range: None,
                            work_done_progress_options: WorkDoneProgressOptions::default(),
                        },
                    ),
                ),
                ..ServerCapabilities::default()
            },
            offset_encoding: None,
        })
    }

    async fn shutdown(&self) -> Result<()> {
        Ok(())
    }

    async fn did_open(&self, params: DidOpenTextDocumentParams) {
        let td = params.text_document;
        let k = key(&td.uri);
        let generation = self.inner.next_generation();
        let text = td.text.clone();
        {
            let mut store = self.inner.store();
            store.docs.insert(
                k.clone(),
                DocState::new(td.uri, Document::new(td.text, td.version), generation),
            );
        }
        self.inner
            .schedule(k, generation, text, td.version, Duration::ZERO);
    }

    async fn did_change(&self, params: DidChangeTextDocumentParams) {
        let uri = params.text_document.uri;
        let version = params.text_document.version;
        let k = key(&uri);
        let enc = self.inner.encoding();
        // Applied synchronously, before any `.await`.
        let outcome: std::result::Result<(u64, String), String> = {
            let mut store = self.inner.store();
            let generation = self.inner.next_generation();
            match store.docs.get_mut(&k) {
                Some(state) => match state.doc.apply(version, params.content_changes, enc) {
                    Ok(()) => {
                        state.generation = generation;
                        Ok((generation, state.doc.text.clone()))
                    }
                    Err(e) => {
                        store.docs.remove(&k);
                        Err(e.to_string())
                    }
                },
                None => {
                    // A document dropped after a bad edit comes back with a whole text.
                    match params
                        .content_changes
                        .iter()
                        .rposition(|c| c.range.is_none())
                    {
                        Some(i) => {
                            let mut changes = params.content_changes;
                            let rest = changes.split_off(i + 1);
                            let full = changes.pop().map(|c| c.text).unwrap_or_default();
                            let mut doc = Document::new(full, i32::MIN);
                            match doc.apply(version, rest, enc) {
                                Ok(()) => {
                                    let text = doc.text.clone();
                                    store.docs.insert(
                                        k.clone(),
                                        DocState::new(uri.clone(), doc, generation),
                                    );
                                    Ok((generation, text))
                                }
                                Err(e) => Err(e.to_string()),
                            }
                        }
                        None => Err("a change to a document that is not open".to_string()),
                    }
                }
            }
        };
        match outcome {
            Ok((generation, text)) => {
                self.inner
                    .schedule(k, generation, text, version, self.inner.config.debounce);
            }
            Err(why) => self.inner.drop_document(uri, why).await,
        }
    }

    async fn did_close(&self, params: DidCloseTextDocumentParams) {
        let uri = params.text_document.uri;
        let removed = self.inner.store().docs.remove(&key(&uri)).is_some();
        if removed {
            let _serial = self.inner.publish.lock().await;
            self.inner
                .client
                .publish_diagnostics(uri, Vec::new(), None)
                .await;
        }
    }

    async fn hover(&self, params: HoverParams) -> Result<Option<Hover>> {
        let p = params.text_document_position_params;
        self.inner
            .read(&p.text_document.uri, Need::Analysis, move |s| {
                hover::hover(s, p.position)
            })
            .await
    }

    async fn inlay_hint(&self, params: InlayHintParams) -> Result<Option<Vec<InlayHint>>> {
        let range = params.range;
        let snap = self.inner.hint_snapshot(&params.text_document.uri).await;
        self.inner
            .run(snap, move |s| Some(hints::inlay_hints(s, range)))
            .await
    }

    async fn completion(&self, params: CompletionParams) -> Result<Option<CompletionResponse>> {
        let p = params.text_document_position;
        self.inner
            .read(&p.text_document.uri, Need::Checked, move |s| {
                Some(CompletionResponse::Array(completion::complete(
                    s, p.position,
                )))
            })
            .await
    }

    async fn goto_definition(
        &self,
        params: GotoDefinitionParams,
    ) -> Result<Option<GotoDefinitionResponse>> {
        let p = params.text_document_position_params;
        let uri = p.text_document.uri.clone();
        self.inner
            .read(&p.text_document.uri, Need::Checked, move |s| {
                navigation::definition(s, p.position)
                    .map(|r| GotoDefinitionResponse::Scalar(Location::new(uri, r)))
            })
            .await
    }

    async fn references(&self, params: ReferenceParams) -> Result<Option<Vec<Location>>> {
        let p = params.text_document_position;
        let include = params.context.include_declaration;
        let uri = p.text_document.uri.clone();
        self.inner
            .read(&p.text_document.uri, Need::Checked, move |s| {
                let ranges = navigation::references(s, p.position, include)?;
                Some(
                    ranges
                        .into_iter()
                        .map(|r| Location::new(uri.clone(), r))
                        .collect(),
                )
            })
            .await
    }

    async fn document_highlight(
        &self,
        params: DocumentHighlightParams,
    ) -> Result<Option<Vec<DocumentHighlight>>> {
        let p = params.text_document_position_params;
        self.inner
            .read(&p.text_document.uri, Need::Checked, move |s| {
                navigation::highlights(s, p.position)
            })
            .await
    }

    async fn prepare_rename(
        &self,
        params: TextDocumentPositionParams,
    ) -> Result<Option<PrepareRenameResponse>> {
        let pos = params.position;
        self.inner
            .read(&params.text_document.uri, Need::Checked, move |s| {
                navigation::prepare_rename(s, pos)
            })
            .await
    }

    async fn rename(&self, params: RenameParams) -> Result<Option<WorkspaceEdit>> {
        let p = params.text_document_position;
        let uri = p.text_document.uri.clone();
        let new_name = params.new_name;
        let answer = self
            .inner
            .read(&p.text_document.uri, Need::Checked, move |s| {
                Some(navigation::rename(s, p.position, &new_name))
            })
            .await?;
        match answer {
            None | Some(Ok(None)) => Ok(None),
            Some(Ok(Some(edits))) => Ok(Some(WorkspaceEdit {
                changes: Some(HashMap::from([(uri, edits)])),
                ..WorkspaceEdit::default()
            })),
            Some(Err(why)) => Err(Error::invalid_params(why)),
        }
    }

    async fn document_symbol(
        &self,
        params: DocumentSymbolParams,
    ) -> Result<Option<DocumentSymbolResponse>> {
        self.inner
            .read(&params.text_document.uri, Need::Checked, |s| {
                Some(DocumentSymbolResponse::Nested(outline::document_symbols(s)))
            })
            .await
    }

    async fn folding_range(&self, params: FoldingRangeParams) -> Result<Option<Vec<FoldingRange>>> {
        self.inner
            .read(&params.text_document.uri, Need::Checked, |s| {
                Some(outline::folding_ranges(s))
            })
            .await
    }

    async fn selection_range(
        &self,
        params: SelectionRangeParams,
    ) -> Result<Option<Vec<SelectionRange>>> {
        let positions = params.positions;
        self.inner
            .read(&params.text_document.uri, Need::Checked, move |s| {
                Some(
                    positions
                        .iter()
                        .map(|p| outline::selection_range(s, *p))
                        .collect(),
                )
            })
            .await
    }

    async fn symbol(
        &self,
        params: WorkspaceSymbolParams,
    ) -> Result<Option<WorkspaceSymbolResponse>> {
        // The newest finished snapshot of every open document, without waiting.
        let snaps: Vec<(Uri, Arc<Snapshot>)> = self
            .inner
            .store()
            .docs
            .values()
            .filter_map(|d| Some((d.uri.clone(), d.latest.borrow().clone()?)))
            .collect();
        let query = params.query;
        let run = move || {
            snaps
                .iter()
                .flat_map(|(uri, s)| outline::workspace_symbols(s, uri, &query))
                .collect::<Vec<_>>()
        };
        match tokio::task::spawn_blocking(run).await {
            Ok(v) => Ok(Some(WorkspaceSymbolResponse::Flat(v))),
            Err(_) => Err(Error::internal_error()),
        }
    }

    async fn code_action(&self, params: CodeActionParams) -> Result<Option<CodeActionResponse>> {
        let uri = params.text_document.uri.clone();
        let range = params.range;
        let only = params.context.only;
        self.inner
            .read(&params.text_document.uri, Need::Analysis, move |s| {
                Some(actions::code_actions(s, &uri, range, only.as_deref()))
            })
            .await
    }

    async fn code_lens(&self, params: CodeLensParams) -> Result<Option<Vec<CodeLens>>> {
        self.inner
            .read(&params.text_document.uri, Need::Analysis, |s| {
                Some(lens::code_lenses(s))
            })
            .await
    }

    async fn formatting(&self, params: DocumentFormattingParams) -> Result<Option<Vec<TextEdit>>> {
        self.inner
            .read(
                &params.text_document.uri,
                Need::Checked,
                formatting::document,
            )
            .await
    }

    async fn range_formatting(
        &self,
        params: DocumentRangeFormattingParams,
    ) -> Result<Option<Vec<TextEdit>>> {
        let range = params.range;
        self.inner
            .read(&params.text_document.uri, Need::Checked, move |s| {
                formatting::range(s, range)
            })
            .await
    }

    async fn semantic_tokens_full(
        &self,
        params: SemanticTokensParams,
    ) -> Result<Option<SemanticTokensResult>> {
        let uri = params.text_document.uri;
        let tokens = self
            .inner
            .read(&uri, Need::Checked, |s| Some(semantic::tokens(s)))
            .await?;
        Ok(tokens.map(|t| SemanticTokensResult::Tokens(self.inner.remember_tokens(&uri, t))))
    }

    async fn semantic_tokens_full_delta(
        &self,
        params: SemanticTokensDeltaParams,
    ) -> Result<Option<SemanticTokensFullDeltaResult>> {
        let uri = params.text_document.uri;
        let Some(tokens) = self
            .inner
            .read(&uri, Need::Checked, |s| Some(semantic::tokens(s)))
            .await?
        else {
            return Ok(None);
        };
        let previous = self.inner.store().docs.get(&key(&uri)).and_then(|d| {
            d.tokens
                .as_ref()
                .filter(|(id, _)| *id == params.previous_result_id)
                .map(|(_, data)| data.clone())
        });
        let tokens = self.inner.remember_tokens(&uri, tokens);
        Ok(Some(match previous {
            Some(old) => SemanticTokensFullDeltaResult::TokensDelta(SemanticTokensDelta {
                result_id: tokens.result_id,
                edits: semantic::delta(&old, &tokens.data),
            }),
            // An unknown previous result: the whole set, as the protocol allows.
            None => SemanticTokensFullDeltaResult::Tokens(tokens),
        }))
    }
}
