//! The event loop: read the archive on a worker thread (showing progress), then draw,
//! wait for a key, a resize, a finished plan or a stop signal, and carry out the
//! effects the state machine asks for (saving decisions, exporting, starting plans).

use std::path::PathBuf;
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc;
use std::time::{Duration, Instant};

use anyhow::{Context, Result};
use crossterm::event::{self, Event, KeyCode, KeyEventKind, KeyModifiers};
use telltale::decisions::Store;
use telltale::plan::{self, PlanOutcome, Progress, solve_with_progress};
use telltale::report::write_markdown;
use telltale::safe_write::write_atomic;
use telltale::scan::{Scan, ScanInput, load_priors_within};
use telltale::whatif::{PlanAsk, Session};

use super::app::{App, Effect, ExportFormat};
use super::terminal::{Guard, Input, stop_flag, wait_input};
use super::theme::Theme;
use super::view;

/// Items listed in an exported report (the same page `telltale plan --format html`
/// makes).
const EXPORT_TOP: usize = plan::PAGE_TOP;

/// What the explorer needs to start.
pub struct Options {
    /// The archive, for the loading screen.
    pub archive: PathBuf,
    /// What to scan, built on the loading thread (building it reads the bundled word
    /// lists); its error ends the explorer like any load error.
    pub input: Box<dyn FnOnce() -> Result<ScanInput> + Send>,
    pub priors: Option<PathBuf>,
    /// The rarity part of the alert rule, from the command line.
    pub rarity: telltale::alert::Rarity,
    /// Workshop mode: restore nothing, save nothing, show the cautions first.
    pub no_save: bool,
    /// Save real values with the other decisions (the person asked).
    pub remember_real_values: bool,
}

/// Where the loading worker is, for the loading screen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Stage {
    /// Loading the word lists and the reference statistics (priors).
    Priors,
    /// Reading the archive's mapped files: bytes done of the total.
    Reading { done: u64, total: u64 },
    /// Every mapped file is read; matching items and working out the posteriors.
    Scoring,
    /// Restoring saved decisions and building the first screen.
    Opening,
}

/// The explorer, ready to show, and where its decisions are saved.
struct Ready {
    app: App,
    store: Result<Store, telltale::decisions::Error>,
    can_save: bool,
}

/// What the loading worker sends: where it is, then the explorer or an error message.
enum LoadMsg {
    Stage(Stage),
    Ready(Box<Ready>),
    Failed(String),
}

/// What the plan worker sends: progress now and then, and the answer at the end.
enum PlanMsg {
    Progress(Progress),
    Done(Box<(PlanAsk, Result<PlanOutcome, plan::Error>)>),
}

/// A running plan: its cancel flag and where its messages arrive.
type PlanJob = (Arc<AtomicBool>, mpsc::Receiver<PlanMsg>);

/// How often the worker reports progress at most.
const PROGRESS_EVERY: Duration = Duration::from_millis(100);

/// Everything between starting and the first screen, on a worker thread: the priors,
/// the import and scan (reporting bytes read), the saved decisions and the first
/// screen's state. The terminal is never touched here.
fn load(opts: Options, tx: &mpsc::Sender<LoadMsg>) -> Result<Ready> {
    let stage = |s| {
        let _ = tx.send(LoadMsg::Stage(s));
    };
    stage(Stage::Priors);
    let input = (opts.input)()?;
    let mut priors = load_priors_within(opts.priors.as_deref(), &input.limits)
        .context("cannot use the priors")?;
    priors.rarity = opts.rarity;
    let mut last: Option<(Instant, bool)> = None;
    let scan = Scan::run_with_progress(&input, &mut priors, &mut |done, total| {
        // The import reports after each file; once all bytes are in, scoring starts.
        let scoring = done >= total;
        if last.is_none_or(|(t, was)| was != scoring || t.elapsed() >= PROGRESS_EVERY) {
            last = Some((Instant::now(), scoring));
            stage(if scoring {
                Stage::Scoring
            } else {
                Stage::Reading { done, total }
            });
        }
    })?;
    // The evidence is gathered: the parsed lexicons are not needed again this session.
    telltale::lexicon::release_bundled();
    stage(Stage::Opening);
    let fingerprint = scan.footprint.fingerprint.clone();
    if opts.no_save {
        // Nothing is read from or written to the data folder: not the decisions, not
        // the note that the cautions were shown (so they open every run).
        let session = Session::open(
            scan,
            priors,
            &telltale::decisions::Decisions::new(&fingerprint),
        );
        let mut app = App::new(session);
        app.show_cautions_first();
        app.status = Some(
            "Nothing is saved in this mode (--no-save): your marks and values end when you quit."
                .into(),
        );
        return Ok(Ready {
            app,
            store: Err(telltale::decisions::Error::NoSave),
            can_save: false,
        });
    }
    let store = Store::locate();
    let mut notes = Vec::new();
    let mut can_save = true;
    let (saved, restored) = match &store {
        Ok(store) => {
            let loaded = store.load(&fingerprint);
            if let Some(w) = &loaded.warning {
                notes.push(w.clone());
                can_save = !w.contains("will not be overwritten");
            }
            (loaded.decisions, loaded.restored)
        }
        Err(e) => {
            notes.push(format!("{e}; your decisions will not be saved"));
            can_save = false;
            (telltale::decisions::Decisions::new(&fingerprint), false)
        }
    };
    let mut session = Session::open(scan, priors, &saved);
    if opts.remember_real_values {
        session.set_remember_real_values(true);
    }
    let mut app = App::new(session);
    app.restore_goal(saved.goal.as_deref());
    if let Ok(s) = &store
        && !s.cautions_seen()
    {
        app.show_cautions_first();
    }
    if restored && app.session.hidden_count() + app.session.kept_count() > 0 {
        app.status = Some(format!(
            "Restored your saved decisions: {} hidden, {} kept. (telltale forget ARCHIVE removes them.)",
            app.session.hidden_count(),
            app.session.kept_count()
        ));
    }
    if let Some(n) = notes.first() {
        app.status = Some(n.clone());
    }
    Ok(Ready {
        app,
        store,
        can_save,
    })
}

/// Whether a key asks to leave the loading screen: q, Esc or Ctrl-C.
pub(crate) fn quits_loading(k: &crossterm::event::KeyEvent) -> bool {
    k.kind == KeyEventKind::Press
        && (matches!(k.code, KeyCode::Char('q') | KeyCode::Esc)
            || (k.code == KeyCode::Char('c') && k.modifiers.contains(KeyModifiers::CONTROL)))
}

/// Run the explorer until the person quits.
pub fn run(opts: Options) -> Result<()> {
    let stop = stop_flag().context("cannot watch for stop signals")?;
    let theme = Theme::from_env();
    let archive_label = opts
        .archive
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| opts.archive.display().to_string());

    // The terminal first, so the loading screen is the first thing on it.
    let mut guard = Guard::enter().context("cannot set up the terminal")?;
    let started = Instant::now();
    let (tx, rx) = mpsc::channel::<LoadMsg>();
    std::thread::Builder::new()
        .name("telltale-import".into())
        .spawn(move || {
            // Test hook (tests/explorer_tmux.rs): a load that takes long, to prove that
            // keys stop the explorer on the loading screen.
            if std::env::var_os("TELLTALE_TEST_SLOW_LOAD").is_some() {
                let _ = tx.send(LoadMsg::Stage(Stage::Priors));
                std::thread::sleep(Duration::from_secs(60));
            }
            let msg = match load(opts, &tx) {
                Ok(ready) => LoadMsg::Ready(Box::new(ready)),
                Err(e) => LoadMsg::Failed(format!("{e:#}")),
            };
            let _ = tx.send(msg);
        })
        .context("cannot start the import worker")?;

    // Loading: progress until the worker answers; q, Esc or Ctrl-C leave at once (the
    // worker is abandoned; it only reads).
    let mut stage = Stage::Priors;
    let Ready {
        mut app,
        store,
        can_save,
    } = loop {
        if stop.load(Ordering::Relaxed) {
            return Ok(());
        }
        // A terminal that cannot be drawn on is gone: nothing to save yet.
        if guard
            .terminal
            .draw(|f| view::render_loading(f, &archive_label, stage, started.elapsed(), theme))
            .is_err()
        {
            return Ok(());
        }
        match next_event(Duration::from_millis(100)) {
            Wait::Gone => return Ok(()),
            Wait::Event(Event::Key(k)) if quits_loading(&k) => return Ok(()),
            _ => {}
        }
        let mut ready = None;
        loop {
            match rx.try_recv() {
                Ok(LoadMsg::Stage(s)) => stage = s,
                Ok(LoadMsg::Ready(r)) => {
                    ready = Some(*r);
                    break;
                }
                Ok(LoadMsg::Failed(message)) => {
                    drop(guard);
                    anyhow::bail!(message);
                }
                Err(mpsc::TryRecvError::Empty) => break,
                Err(mpsc::TryRecvError::Disconnected) => {
                    drop(guard);
                    anyhow::bail!("the import stopped unexpectedly");
                }
            }
        }
        if let Some(r) = ready {
            break r;
        }
    };

    let mut plan_job: Option<PlanJob> = None;
    let mut dirty = true;
    // A change asked for a save: done right after the next frame is drawn, so the
    // screen answers the key first and the disk write (with its syncs) comes after.
    let mut save_pending = false;
    let mut last_tick = Instant::now();
    // A terminal error ends the loop through the save below, then is reported.
    let mut failed: Option<std::io::Error> = None;
    while !app.quit {
        if stop.load(Ordering::Relaxed) {
            break;
        }
        let size = match guard.terminal.size() {
            Ok(size) => size,
            Err(e) => {
                failed = Some(e);
                break;
            }
        };
        app.page = view::page_rows(
            &app,
            ratatui::layout::Rect::new(0, 0, size.width, size.height),
        );
        let busy = matches!(app.plan, super::app::PlanState::Running { .. });
        if dirty || (busy && last_tick.elapsed() >= Duration::from_millis(200)) {
            if let Err(e) = guard.terminal.draw(|f| view::render(&app, f, theme)) {
                failed = Some(e);
                break;
            }
            dirty = false;
            last_tick = Instant::now();
            // Test hook (tests/explorer_tmux.rs): a deliberate panic once a screen is up,
            // to prove the panic hook restores the terminal.
            if std::env::var_os("TELLTALE_TEST_PANIC").is_some() {
                panic!("TELLTALE_TEST_PANIC set: a deliberate panic to test terminal restoring");
            }
        }
        if std::mem::take(&mut save_pending)
            && let (Ok(store), true) = (&store, can_save)
            && let Err(e) = store.save(&app.decisions())
        {
            app.status = Some(e.to_string());
            dirty = true;
        }
        // Progress or a finished plan?
        if let Some((_, rx)) = &plan_job {
            let mut done = false;
            for msg in rx.try_iter() {
                match msg {
                    PlanMsg::Progress(p) => app.plan_progress(p),
                    PlanMsg::Done(done_msg) => {
                        let (ask, result) = *done_msg;
                        app.plan_finished(ask, result);
                        done = true;
                    }
                }
            }
            if done {
                plan_job = None;
                dirty = true;
            }
        }
        let effects = match next_event(Duration::from_millis(100)) {
            // Closed window, dropped connection: save and leave like a quit.
            Wait::Gone => break,
            Wait::Nothing => continue,
            Wait::Event(Event::Key(k)) if k.kind == KeyEventKind::Press => app.handle_key(k),
            Wait::Event(Event::Resize(..)) => Vec::new(),
            Wait::Event(_) => continue,
        };
        dirty = true;
        for effect in effects {
            match effect {
                Effect::SaveDecisions => save_pending = true,
                Effect::MarkCautionsSeen => {
                    if let Ok(store) = &store {
                        let _ = store.mark_cautions_seen();
                    }
                }
                Effect::Export { format, path } => {
                    app.status = Some(export(&app, format, &path));
                }
                Effect::StopPlan => {
                    if let Some((cancel, _)) = &plan_job {
                        cancel.store(true, Ordering::Relaxed);
                    }
                }
                Effect::StartPlan(ask) => {
                    if let Some((cancel, _)) = plan_job.take() {
                        cancel.store(true, Ordering::Relaxed);
                    }
                    let cancel = Arc::new(AtomicBool::new(false));
                    let request = ask.request(&app.session, Arc::clone(&cancel));
                    let exposure = app.session.exposure().clone();
                    let (ptx, prx) = mpsc::channel();
                    let asked = ask.clone();
                    let started = std::thread::Builder::new()
                        .name("telltale-plan".into())
                        .spawn(move || {
                            let mut last: Option<Instant> = None;
                            let mut report = |p: &Progress| {
                                if last.is_none_or(|t| t.elapsed() >= PROGRESS_EVERY) {
                                    last = Some(Instant::now());
                                    let _ = ptx.send(PlanMsg::Progress(*p));
                                }
                            };
                            let result = solve_with_progress(&exposure, &request, &mut report);
                            let _ = ptx.send(PlanMsg::Done(Box::new((ask, result))));
                        });
                    // No thread for the search: say so on the plan screen and go on
                    // (the decisions are still saved on the way out).
                    match started {
                        Ok(_) => plan_job = Some((cancel, prx)),
                        Err(e) => app.plan_not_started(
                            asked,
                            format!("The plan search could not start: {e}."),
                        ),
                    }
                }
            }
        }
    }
    if let Some((cancel, _)) = plan_job.take() {
        cancel.store(true, Ordering::Relaxed);
    }
    // Decisions are saved on every change; save once more in case the last save failed.
    if let (Ok(store), true) = (&store, can_save) {
        let _ = store.save(&app.decisions());
    }
    drop(guard);
    match failed {
        Some(e) => Err(e).context("the terminal failed"),
        None => Ok(()),
    }
}

/// What waiting for an event brought.
enum Wait {
    Event(Event),
    /// Nothing yet (timeout, a signal, or input crossterm reads next time round).
    Nothing,
    /// The terminal is gone (hangup, end of input, a persistent error): leave.
    Gone,
}

/// Wait up to `timeout` for an event. The terminal is checked for a hangup before
/// crossterm reads it (see [`wait_input`]); errors other than an interrupting signal
/// count as the terminal gone, so a repeating error never spins the loop.
fn next_event(timeout: Duration) -> Wait {
    if wait_input(Duration::ZERO) == Input::Gone {
        return Wait::Gone;
    }
    // Events crossterm already holds (several keys read at once, a resize).
    match event::poll(Duration::ZERO) {
        Ok(true) => {
            return match event::read() {
                Ok(e) => Wait::Event(e),
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => Wait::Nothing,
                Err(_) => Wait::Gone,
            };
        }
        Ok(false) => {}
        Err(e) if e.kind() == std::io::ErrorKind::Interrupted => return Wait::Nothing,
        Err(_) => return Wait::Gone,
    }
    match wait_input(timeout) {
        Input::Gone => Wait::Gone,
        // Ready: crossterm reads it on the next call, after the hangup check.
        Input::Ready | Input::Idle => Wait::Nothing,
    }
}

/// Write the report of the current state, with the hiding plan when one was worked
/// out for it; returns the message for the footer.
pub(super) fn export(app: &App, format: ExportFormat, path: &std::path::Path) -> String {
    let mut report = app
        .session
        .report(telltale::report::RowCount::First(EXPORT_TOP));
    let plan = app.current_plan().map(|p| &p.report);
    // A plan aimed at the real values makes the whole document private: its warning
    // goes first, before the scan's sections.
    report.warning = plan.and_then(|p| p.warning.clone());
    let result = write_atomic(path, |w| match format {
        ExportFormat::Html => plan::write_html_page(&report, EXPORT_TOP, plan, w),
        ExportFormat::Markdown => {
            write_markdown(&report, EXPORT_TOP, w)?;
            match plan {
                Some(p) => plan::write_markdown_section(p, w),
                None => Ok(()),
            }
        }
    });
    let shown = std::path::absolute(path).unwrap_or_else(|_| path.to_path_buf());
    let with = if plan.is_some() {
        " with the hiding plan"
    } else {
        " (no hiding plan: none worked out for the current marks; open screen 3 first)"
    };
    let private = if report.warning.is_some() {
        " It was made knowing your real values: keep it to yourself."
    } else {
        ""
    };
    match result {
        Ok(()) => format!(
            "Wrote {}{with}, readable by you only.{private}",
            shown.display()
        ),
        Err(e) => format!("Could not write {}: {e}", shown.display()),
    }
}
