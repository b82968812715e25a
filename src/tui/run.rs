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
use telltale::priors::Priors;
use telltale::report::{write_html_with, write_markdown};
use telltale::safe_write::write_atomic;
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::whatif::{PlanAsk, Session};

use super::app::{App, Effect, ExportFormat};
use super::terminal::{Guard, stop_flag};
use super::theme::Theme;
use super::view;

/// Items listed in an exported report.
const EXPORT_TOP: usize = 25;

/// What the explorer needs to start.
pub struct Options {
    pub input: ScanInput,
    pub priors: Option<PathBuf>,
}

type Loaded = Result<(Scan, Priors), String>;

/// What the plan worker sends: progress now and then, and the answer at the end.
enum PlanMsg {
    Progress(Progress),
    Done(Box<(PlanAsk, Result<PlanOutcome, plan::Error>)>),
}

/// A running plan: its cancel flag and where its messages arrive.
type PlanJob = (Arc<AtomicBool>, mpsc::Receiver<PlanMsg>);

/// How often the worker reports progress at most.
const PROGRESS_EVERY: Duration = Duration::from_millis(100);

/// Run the explorer until the person quits.
pub fn run(opts: Options) -> Result<()> {
    let stop = stop_flag().context("cannot watch for stop signals")?;
    let theme = Theme::from_env();
    let archive_label = opts
        .input
        .archive
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| opts.input.archive.display().to_string());

    let (tx, rx) = mpsc::channel::<Loaded>();
    let input = opts.input.clone();
    let priors_path = opts.priors.clone();
    std::thread::Builder::new()
        .name("telltale-import".into())
        .spawn(move || {
            let result = (|| -> Result<(Scan, Priors)> {
                let priors =
                    load_priors(priors_path.as_deref()).context("cannot use the priors")?;
                let scan = Scan::run(&input, &priors)?;
                Ok((scan, priors))
            })()
            .map_err(|e| format!("{e:#}"));
            let _ = tx.send(result);
        })
        .context("cannot start the import worker")?;

    let mut guard = Guard::enter().context("cannot set up the terminal")?;
    let started = Instant::now();
    // Loading: progress until the worker answers.
    let (scan, priors) = loop {
        if stop.load(Ordering::Relaxed) {
            return Ok(());
        }
        guard
            .terminal
            .draw(|f| view::render_loading(f, &archive_label, started.elapsed(), theme))?;
        match rx.recv_timeout(Duration::from_millis(100)) {
            Ok(Ok(loaded)) => break loaded,
            Ok(Err(message)) => {
                drop(guard);
                anyhow::bail!(message);
            }
            Err(mpsc::RecvTimeoutError::Timeout) => {}
            Err(mpsc::RecvTimeoutError::Disconnected) => {
                drop(guard);
                anyhow::bail!("the import stopped unexpectedly");
            }
        }
        while poll(Duration::ZERO)? {
            if let Some(Event::Key(k)) = read()?
                && k.kind == KeyEventKind::Press
                && (k.code == KeyCode::Char('q')
                    || (k.code == KeyCode::Char('c')
                        && k.modifiers.contains(KeyModifiers::CONTROL)))
            {
                return Ok(());
            }
        }
    };

    // Saved decisions.
    let store = Store::locate();
    let mut notes = Vec::new();
    let mut can_save = true;
    let fingerprint = scan.footprint.fingerprint.clone();
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
    let session = Session::open(scan, priors, &saved);
    let mut app = App::new(session);
    if let Ok(s) = &store
        && !s.cautions_seen()
    {
        app.show_cautions_first();
    }
    if restored {
        app.status = Some(format!(
            "Restored your saved decisions: {} hidden, {} kept.",
            app.session.hidden_count(),
            app.session.kept_count()
        ));
    }
    if let Some(n) = notes.first() {
        app.status = Some(n.clone());
    }

    let mut plan_job: Option<PlanJob> = None;
    let mut dirty = true;
    let mut last_tick = Instant::now();
    while !app.quit {
        if stop.load(Ordering::Relaxed) {
            break;
        }
        let size = guard.terminal.size()?;
        app.page = view::page_rows(
            &app,
            ratatui::layout::Rect::new(0, 0, size.width, size.height),
        );
        let busy = matches!(app.plan, super::app::PlanState::Running { .. });
        if dirty || (busy && last_tick.elapsed() >= Duration::from_millis(200)) {
            guard.terminal.draw(|f| view::render(&app, f, theme))?;
            dirty = false;
            last_tick = Instant::now();
            // Test hook (tests/explorer_tmux.rs): a deliberate panic once a screen is up,
            // to prove the panic hook restores the terminal.
            if std::env::var_os("TELLTALE_TEST_PANIC").is_some() {
                panic!("TELLTALE_TEST_PANIC set: a deliberate panic to test terminal restoring");
            }
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
        if !poll(Duration::from_millis(100))? {
            continue;
        }
        let effects = match read()? {
            None => continue,
            Some(Event::Key(k)) if k.kind == KeyEventKind::Press => app.handle_key(k),
            Some(Event::Resize(..)) => Vec::new(),
            _ => continue,
        };
        dirty = true;
        for effect in effects {
            match effect {
                Effect::SaveDecisions => {
                    if let (Ok(store), true) = (&store, can_save)
                        && let Err(e) = store.save(&app.session.decisions())
                    {
                        app.status = Some(e.to_string());
                    }
                }
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
                    std::thread::Builder::new()
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
                        })
                        .context("cannot start the plan worker")?;
                    plan_job = Some((cancel, prx));
                }
            }
        }
    }
    if let Some((cancel, _)) = plan_job.take() {
        cancel.store(true, Ordering::Relaxed);
    }
    // Decisions are saved on every change; save once more in case the last save failed.
    if let (Ok(store), true) = (&store, can_save) {
        let _ = store.save(&app.session.decisions());
    }
    drop(guard);
    Ok(())
}

/// Wait for input; a signal interrupting the wait is not an error (the loop then sees
/// the stop flag).
fn poll(timeout: Duration) -> std::io::Result<bool> {
    match event::poll(timeout) {
        Err(e) if e.kind() == std::io::ErrorKind::Interrupted => Ok(false),
        other => other,
    }
}

/// Read one event; `None` when a signal interrupted the read.
fn read() -> std::io::Result<Option<Event>> {
    match event::read() {
        Ok(e) => Ok(Some(e)),
        Err(e) if e.kind() == std::io::ErrorKind::Interrupted => Ok(None),
        Err(e) => Err(e),
    }
}

/// Write the report of the current state, with the hiding plan when one was worked
/// out for it; returns the message for the footer.
pub(super) fn export(app: &App, format: ExportFormat, path: &std::path::Path) -> String {
    let report = app.session.report();
    let plan = app.current_plan().map(|p| &p.report);
    let result = write_atomic(path, |w| match format {
        ExportFormat::Html => write_html_with(&report, EXPORT_TOP, w, &mut |out| match plan {
            Some(p) => plan::write_html_section(p, out),
            None => Ok(()),
        }),
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
    match result {
        Ok(()) => format!("Wrote {}{with}, readable by you only.", shown.display()),
        Err(e) => format!("Could not write {}: {e}", shown.display()),
    }
}
