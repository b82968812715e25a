//! The explorer tested without a terminal: keys sent to the state machine, and every
//! screen drawn on ratatui's TestBackend at 80×24 and at 160×48, compared with insta
//! snapshots (src/tui/snapshots/). The demo "reporter" persona is the fixture.

use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Instant;

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use telltale::decisions::Decisions;
use telltale::plan::{Budget, Method, Progress, Status, StopReason, solve_with_progress};
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::text::display_width;
use telltale::whatif::Session;

use super::app::{App, Effect, ExportFormat, Goal, Overlay, PlanState, Screen};
use super::theme::Theme;
use super::view;

fn session() -> Session {
    persona("reporter")
}

/// A demo persona's session, with no saved decisions.
pub(super) fn persona(name: &str) -> Session {
    let mut priors = load_priors(None).unwrap();
    let input = ScanInput {
        archive: std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("demo-exports")
            .join(name),
        ..ScanInput::default()
    };
    let scan = Scan::run(&input, &mut priors).unwrap();
    let fp = scan.footprint.fingerprint.clone();
    Session::open(scan, priors, &Decisions::new(&fp))
}

/// A demo persona's session judged by the alert levels alone (no rule for rare
/// values): the teacher's plan is then proven smallest within the test's budget even
/// on a loaded machine. The rarity rule's plans are checked in tests/alert_rule.rs.
fn persona_one_level(name: &str) -> Session {
    let mut s = persona(name);
    s.priors.rarity = telltale::alert::Rarity::OFF;
    s
}

fn app() -> App {
    App::new(session())
}

fn key(c: char) -> KeyEvent {
    KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE)
}

fn code(c: KeyCode) -> KeyEvent {
    KeyEvent::new(c, KeyModifiers::NONE)
}

pub(super) fn press(app: &mut App, keys: &str) -> Vec<Effect> {
    keys.chars().flat_map(|c| app.handle_key(key(c))).collect()
}

/// The plan the effects ask for.
fn asked(effects: &[Effect]) -> telltale::whatif::PlanAsk {
    effects
        .iter()
        .find_map(|e| match e {
            Effect::StartPlan(a) => Some(a.clone()),
            _ => None,
        })
        .expect("a plan was requested")
}

/// Run a requested plan synchronously with the request the loop's worker builds, but
/// with a node budget instead of a clock (so the answer does not depend on the
/// machine); `stopped` sets the cancel flag first, as Esc does.
/// Run the plan the effects asked for, within `nodes` search nodes. With `stopped`, the
/// search is told to stop at its first progress report, as Esc does while it runs: by
/// then the greedy warm start has given a plan, so what comes back does not depend on
/// how fast this machine is.
fn finish_plan_with(app: &mut App, effects: &[Effect], nodes: u64, stopped: bool) {
    let ask = asked(effects);
    let cancel = Arc::new(AtomicBool::new(false));
    let mut req = ask.request(&app.session, Arc::clone(&cancel));
    req.budget = Budget {
        node_limit: nodes,
        deadline: None,
        cancel: Some(Arc::clone(&cancel)),
    };
    let outcome = solve_with_progress(app.session.exposure(), &req, &mut |_| {
        if stopped {
            cancel.store(true, Ordering::Relaxed);
        }
    });
    app.plan_finished(ask, outcome);
}

pub(super) fn finish_plan(app: &mut App, effects: &[Effect]) {
    finish_plan_with(app, effects, 20_000, false);
}

fn draw(app: &App, w: u16, h: u16) -> String {
    let mut t = Terminal::new(TestBackend::new(w, h)).unwrap();
    t.draw(|f| view::render(app, f, Theme::plain())).unwrap();
    let buf = t.backend().buffer().clone();
    let mut out = String::new();
    for y in 0..h {
        let mut line = String::new();
        let mut skip = 0;
        for x in 0..w {
            if skip > 0 {
                skip -= 1;
                continue;
            }
            let sym = buf[(x, y)].symbol();
            skip = display_width(sym).saturating_sub(1);
            line.push_str(sym);
        }
        out.push_str(line.trim_end());
        out.push('\n');
    }
    out
}

/// Every line of a drawn screen fits the width (in display cells).
fn assert_fits(screen: &str, w: u16) {
    for l in screen.lines() {
        assert!(display_width(l) <= w as usize, "too wide: {l:?}");
    }
}

#[test]
fn hiding_an_item_updates_the_overview_and_undo_restores_it() {
    let mut app = app();
    let before = app.session.posterior(0).probability;
    press(&mut app, "2");
    assert_eq!(app.screen, Screen::Items);
    // Most revealing first: the first row adds at least as much as any other.
    let first = app.rows[0].clone();
    assert!(
        app.rows
            .iter()
            .all(|r| r.contribution_bits <= first.contribution_bits)
    );
    let fx = press(&mut app, "x");
    assert!(fx.contains(&Effect::SaveDecisions));
    assert!(app.session.is_hidden(first.subject));
    let attr = first.attribute.unwrap();
    let base = app.session.baseline(attr).probability;
    assert!(app.session.posterior(attr).probability < base);
    assert!(app.status.as_deref().unwrap().starts_with("Hidden"));
    press(&mut app, "u");
    assert!(!app.session.is_hidden(first.subject));
    assert!((app.session.posterior(0).probability - before).abs() < 1e-12);
    press(&mut app, "r");
    assert!(app.session.is_hidden(first.subject));
}

#[test]
fn a_new_order_or_filter_starts_at_the_top() {
    // Each order and filter shows a different list: the cursor starts on its first
    // row (it used to land wherever the old list's first row now was).
    let mut app = app();
    press(&mut app, "2jjjj");
    let mut moved_top = false;
    for keys in ["o", "o", "o", "o", "a", "a", "t"] {
        let before = app.rows[0].subject;
        press(&mut app, keys);
        assert_eq!(app.item_cursor, 0, "after '{keys}'");
        assert_eq!(app.current_subject(), Some(app.rows[0].subject));
        moved_top |= app.rows[0].subject != before;
        press(&mut app, "jj");
    }
    assert!(
        moved_top,
        "no key changed the first row: the test checks nothing"
    );
}

#[test]
fn search_filters_as_you_type_and_esc_clears() {
    let mut app = app();
    press(&mut app, "2");
    let all = app.rows.len();
    let word: String = telltale::whatif::subject_name(app.session.footprint(), app.rows[0].subject)
        .split_whitespace()
        .next()
        .unwrap()
        .chars()
        .take(4)
        .collect();
    press(&mut app, "/");
    assert!(app.searching);
    let mut last = all;
    for c in word.chars() {
        app.handle_key(key(c));
        assert!(app.rows.len() <= last);
        last = app.rows.len();
    }
    assert!(last < all && last > 0);
    // Keys typed into the search are text, not commands ('x' does not hide).
    app.handle_key(key('x'));
    assert_eq!(app.session.hidden_count(), 0);
    app.handle_key(code(KeyCode::Esc));
    assert!(!app.searching);
    assert_eq!(app.rows.len(), all);
}

#[test]
fn filters_cycle_and_clear() {
    let mut app = app();
    press(&mut app, "2");
    let all = app.rows.len();
    press(&mut app, "a");
    assert_eq!(app.query.attribute, Some(0));
    assert!(app.rows.iter().all(|r| r.attribute == Some(0)));
    press(&mut app, "t");
    assert!(app.rows.iter().all(|r| r.kind == "like"));
    press(&mut app, "o");
    assert_eq!(app.query.sort, telltale::whatif::SortBy::Information);
    press(&mut app, "0");
    assert_eq!(app.rows.len(), all);
    // Esc on a filtered list clears the filters first, then goes to the overview.
    press(&mut app, "a");
    app.handle_key(code(KeyCode::Esc));
    assert_eq!(app.screen, Screen::Items);
    assert_eq!(app.query.attribute, None);
    app.handle_key(code(KeyCode::Esc));
    assert_eq!(app.screen, Screen::Overview);
}

#[test]
fn overview_enter_lists_that_attributes_items_and_detail_round_trips() {
    let mut app = app();
    press(&mut app, "j");
    app.handle_key(code(KeyCode::Enter));
    assert_eq!(app.screen, Screen::Items);
    assert_eq!(app.query.attribute, Some(1));
    let s = app.rows[0].subject;
    app.handle_key(code(KeyCode::Enter));
    assert_eq!(app.screen, Screen::Detail(s));
    press(&mut app, "x");
    assert!(app.session.is_hidden(s));
    press(&mut app, "m");
    assert!(app.session.is_kept(s) && !app.session.is_hidden(s));
    app.handle_key(code(KeyCode::Esc));
    assert_eq!(app.screen, Screen::Items);
}

#[test]
fn real_value_and_plan_accept_all_is_one_undo_step() {
    let mut app = App::new(persona_one_level("teacher"));
    press(&mut app, "4");
    app.handle_key(code(KeyCode::Enter));
    assert!(matches!(app.overlay, Some(Overlay::PickValue { .. })));
    press(&mut app, "j");
    let fx = app.handle_key(code(KeyCode::Enter));
    assert!(fx.contains(&Effect::SaveDecisions));
    assert_eq!(app.session.real_value(0), Some(0));

    let fx = press(&mut app, "3");
    assert!(matches!(app.plan, PlanState::Running { .. }));
    finish_plan(&mut app, &fx);
    let result = app.current_plan().expect("plan ready").clone();
    // Optimal, or feasible when the search's node budget runs out first.
    assert!(
        matches!(result.outcome.status, Status::Optimal | Status::Feasible),
        "{:?}",
        result.outcome.status
    );
    let hide = result.outcome.plan.as_ref().unwrap().subjects();
    assert!(!hide.is_empty(), "the demo teacher is exposed somewhere");
    let fx = app.handle_key(code(KeyCode::Enter));
    assert!(fx.contains(&Effect::SaveDecisions));
    assert_eq!(app.session.hidden_count(), hide.len());
    assert!(hide.iter().all(|&s| app.session.is_hidden(s)));
    // After accepting, a new plan is asked for (the state changed) and, re-planned,
    // nothing more needs hiding (the accepted set meets every alert level).
    finish_plan(&mut app, &fx);
    let again = app.current_plan().unwrap();
    assert_eq!(again.outcome.status, Status::Optimal);
    assert!(again.outcome.plan.as_ref().unwrap().is_empty());
    press(&mut app, "u");
    assert_eq!(app.session.hidden_count(), 0);

    // The goal switches to the real value once one is stated.
    let fx = press(&mut app, "g");
    assert_eq!(app.goal, Goal::RealValue);
    assert_eq!(asked(&fx).true_values[0], Some(0));
}

#[test]
fn goal_switch_needs_a_real_value() {
    let mut app = app();
    press(&mut app, "3");
    press(&mut app, "g");
    assert_eq!(app.goal, Goal::BestGuess);
    assert!(app.status.as_deref().unwrap().contains("real value"));
}

#[test]
fn alert_level_keys_change_the_target_and_save() {
    let mut app = app();
    press(&mut app, "3");
    let t = app.session.target(0);
    let fx = press(&mut app, "+");
    assert!(fx.contains(&Effect::SaveDecisions));
    assert!((app.session.target(0) - (t + 0.05)).abs() < 1e-9);
    press(&mut app, "--");
    assert!((app.session.target(0) - (t - 0.05)).abs() < 1e-9);
}

#[test]
fn export_dialog_switches_format_and_asks_for_the_write() {
    let mut app = app();
    press(&mut app, "e");
    let Some(Overlay::Export { format, path }) = app.overlay.clone() else {
        panic!("no export dialog");
    };
    assert_eq!(format, ExportFormat::Html);
    assert_eq!(path, "telltale-reporter.html");
    app.handle_key(code(KeyCode::Tab));
    let fx = app.handle_key(code(KeyCode::Enter));
    assert_eq!(
        fx,
        vec![Effect::Export {
            format: ExportFormat::Markdown,
            path: "telltale-reporter.md".into()
        }]
    );
    assert!(app.overlay.is_none());
}

#[test]
fn cautions_first_run_and_help() {
    let mut app = app();
    app.show_cautions_first();
    // Any key closes the first-run cautions and remembers they were shown; q does
    // not quit from there (a first-time user may press it to dismiss).
    let fx = press(&mut app, "q");
    assert_eq!(fx, vec![Effect::MarkCautionsSeen]);
    assert!(!app.quit && app.overlay.is_none());
    press(&mut app, "?");
    assert!(matches!(app.overlay, Some(Overlay::Help { .. })));
    press(&mut app, "z");
    assert!(app.overlay.is_none());
    press(&mut app, "c");
    assert!(matches!(
        app.overlay,
        Some(Overlay::Cautions { first_run: false })
    ));
    press(&mut app, " ");
    press(&mut app, "q");
    assert!(app.quit);
}

#[test]
fn wide_and_long_names_are_cut_by_grapheme_and_width() {
    let mut s = session();
    let names = [
        "北京读书会 · 每周三晚上在图书馆三楼见面，欢迎所有热爱文学的朋友加入我们的讨论",
        "👨‍👩‍👧‍👦 Family hikes 🏔️🌲 every weekend around the valley and beyond the ridge",
        "Cafe\u{301} society of combining marks e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}e\u{301}",
    ];
    for (i, n) in names.iter().enumerate() {
        s.scan.footprint.items[i].name = (*n).into();
    }
    let mut app = App::new(s);
    press(&mut app, "2o");
    press(&mut app, "oooo"); // back to most revealing after a full cycle
    for (w, h) in [(80, 24), (160, 48)] {
        let screen = draw(&app, w, h);
        assert_fits(&screen, w);
    }
    // The names are in the list in some order; each drawn prefix is whole graphemes.
    press(&mut app, "/北京");
    let screen = draw(&app, 80, 24);
    assert!(screen.contains("北京读书会"), "{screen}");
    assert!(screen.contains('…'));
    insta::assert_snapshot!("items_wide_names_80x24", screen);
}

#[test]
fn tiny_window_says_so() {
    let app = app();
    let screen = draw(&app, 30, 8);
    assert!(screen.contains("too small"));
}

// Snapshots of every screen at 80×24 and 160×48.

fn snap_all(name: &str, app: &App) {
    for (w, h) in [(80u16, 24u16), (160, 48)] {
        let screen = draw(app, w, h);
        assert_fits(&screen, w);
        insta::assert_snapshot!(format!("{name}_{w}x{h}"), screen);
    }
}

#[test]
fn snapshot_overview() {
    snap_all("overview", &app());
}

#[test]
fn snapshot_overview_after_hiding() {
    let mut app = app();
    press(&mut app, "2xjx1");
    snap_all("overview_after_hiding", &app);
}

#[test]
fn snapshot_items() {
    let mut app = app();
    press(&mut app, "2jjx");
    snap_all("items", &app);
}

#[test]
fn snapshot_items_filtered() {
    let mut app = app();
    press(&mut app, "2aat/e");
    snap_all("items_filtered", &app);
}

#[test]
fn snapshot_detail() {
    let mut app = app();
    press(&mut app, "2");
    app.handle_key(code(KeyCode::Enter));
    snap_all("detail", &app);
}

#[test]
fn snapshot_plan() {
    // The reporter within a fixed search budget: the best plan found, not proven.
    let mut app = app();
    let fx = press(&mut app, "3");
    finish_plan(&mut app, &fx);
    let o = &app.current_plan().unwrap().outcome;
    assert_eq!(o.status, Status::Feasible);
    assert_eq!(o.stopped, Some(StopReason::NodeLimit));
    snap_all("plan", &app);
}

#[test]
fn snapshot_plan_exact() {
    // The exact search runs to its end: the screen must say "proven" only when the
    // status is Optimal.
    let mut app = App::new(persona_one_level("teacher"));
    let fx = press(&mut app, "3");
    finish_plan(&mut app, &fx);
    let status = app.current_plan().unwrap().outcome.status;
    let screen = draw(&app, 80, 24);
    match status {
        Status::Optimal => assert!(screen.contains("Proven smallest"), "{screen}"),
        Status::Feasible => assert!(
            screen.contains("not proven smallest") && !screen.contains("Proven"),
            "{screen}"
        ),
        other => panic!("the teacher has a plan: {other:?}"),
    }
    snap_all("plan_exact", &app);
    // PgDn scrolls to the usual advice (the coarse moves).
    app.handle_key(code(KeyCode::PageDown));
    let screen = draw(&app, 80, 24);
    assert!(
        screen.contains("What the usual advice would do"),
        "{screen}"
    );
    snap_all("plan_exact_scrolled", &app);
}

#[test]
fn snapshot_plan_stopped_early() {
    // Esc while searching: the search is told to stop, then shows the best found.
    let mut app = app();
    let fx = press(&mut app, "3");
    let stop = app.handle_key(code(KeyCode::Esc));
    assert_eq!(stop, vec![Effect::StopPlan]);
    assert_eq!(
        app.screen,
        Screen::Plan,
        "Esc stops the search, it does not leave"
    );
    finish_plan_with(&mut app, &fx, u64::MAX, true);
    let o = &app.current_plan().unwrap().outcome;
    assert_eq!(o.status, Status::Feasible);
    assert_eq!(o.stopped, Some(StopReason::Cancelled));
    // Which plan the search holds when told to stop depends on how far it got between
    // two looks at the clock, so on the machine's speed (27 items on a quiet machine,
    // 80 under heavy load): check the screen's shape and that it lists the plan held,
    // not a snapshot of its items.
    let n = o.plan.as_ref().map_or(0, |p| p.len());
    assert!(n > 0, "a stopped search still shows the best plan found");
    for (w, h) in [(80u16, 24u16), (160, 48)] {
        let screen = draw(&app, w, h);
        assert_fits(&screen, w);
        assert!(screen.contains("you stopped the search"), "{screen}");
        assert!(screen.contains("Best found when stopped"), "{screen}");
        assert!(
            screen.contains(&format!("Hide these {n} items")),
            "{n} items: {screen}"
        );
    }
    // Esc again (nothing running) goes back.
    app.handle_key(code(KeyCode::Esc));
    assert_eq!(app.screen, Screen::Overview);
}

#[test]
fn snapshot_plan_impossible() {
    // Political leaning has 5 values: an alert level of 15% is below 1 in 5, so no
    // plan exists (the probabilities add up to 1).
    let mut app = App::new(persona("teacher"));
    let mut fx = press(&mut app, "3jj");
    for _ in 0..7 {
        fx = press(&mut app, "-");
    }
    assert!((app.session.target(2) - 0.15).abs() < 1e-9);
    finish_plan(&mut app, &fx);
    let r = app.current_plan().unwrap();
    assert_eq!(r.outcome.status, Status::Infeasible);
    assert!(r.outcome.plan.is_none());
    let screen = draw(&app, 80, 24);
    assert!(screen.contains("Impossible"), "{screen}");
    assert!(screen.contains("What stands in the way"), "{screen}");
    snap_all("plan_impossible", &app);
    // Nothing to accept.
    app.handle_key(code(KeyCode::Enter));
    assert_eq!(app.session.hidden_count(), 0);
}

#[test]
fn snapshot_plan_true_value_and_keep() {
    // The teacher states a real religion that is not the observer's best guess and
    // keeps the plan's first item: the plan protects that value and never hides the
    // kept item.
    let mut app = App::new(persona("teacher"));
    let fx = press(&mut app, "3");
    finish_plan(&mut app, &fx);
    let first = app
        .current_plan()
        .unwrap()
        .outcome
        .plan
        .as_ref()
        .unwrap()
        .hide[0]
        .subject;
    app.session.toggle_kept(first);
    let religion = app.session.n_attributes() - 1;
    let christian = app.session.priors.attributes[religion]
        .value_index("christian")
        .unwrap();
    app.session.set_real_value(religion, Some(christian));
    let fx = press(&mut app, "g");
    assert_eq!(app.goal, Goal::RealValue);
    let ask = asked(&fx);
    assert_eq!(ask.true_values[religion], Some(christian));
    assert!(ask.keep.contains(&first));
    finish_plan(&mut app, &fx);
    let r = app.current_plan().unwrap();
    let after = r
        .outcome
        .after
        .iter()
        .find(|a| a.attribute == religion)
        .unwrap();
    assert_eq!(after.watched, christian);
    assert!(after.meets);
    assert!(!r.outcome.plan.as_ref().unwrap().subjects().contains(&first));
    let screen = draw(&app, 80, 24);
    assert!(screen.contains("your real values"), "{screen}");
    snap_all("plan_true_value", &app);
}

#[test]
fn snapshot_plan_greedy() {
    let mut app = app();
    press(&mut app, "3");
    let fx = press(&mut app, "m");
    assert_eq!(app.method, Method::Greedy);
    assert_eq!(asked(&fx).method, Method::Greedy);
    finish_plan(&mut app, &fx);
    assert!(draw(&app, 80, 24).contains("Quick greedy suggestion"));
    snap_all("plan_greedy", &app);
}

#[test]
fn plan_progress_shows_and_old_answers_are_dropped() {
    let mut app = app();
    let fx = press(&mut app, "3");
    app.plan_progress(Progress {
        nodes: 1234,
        best_cost: Some(15.0),
        lower_bound: 8.0,
        elapsed: std::time::Duration::from_millis(1500),
    });
    let screen = draw(&app, 80, 24);
    assert!(screen.contains("Best so far 15 items"), "{screen}");
    assert!(screen.contains("at least 8 items needed"), "{screen}");
    assert!(screen.contains("Esc stops"), "{screen}");
    // The state changes before the answer arrives: the answer to the old ask is
    // dropped and the new ask is running.
    let old = asked(&fx);
    press(&mut app, "+");
    let PlanState::Running { ask, started, .. } = &app.plan else {
        panic!("not running")
    };
    assert_ne!(*ask, old);
    assert!(*started <= Instant::now());
    finish_plan(&mut app, &fx);
    assert!(matches!(app.plan, PlanState::Running { .. }));
}

/// A search that could not start ends the running state with the reason on the plan
/// screen; a note about an older ask changes nothing.
#[test]
fn a_plan_that_cannot_start_says_why() {
    let mut app = app();
    let fx = press(&mut app, "3");
    let old = asked(&fx);
    press(&mut app, "+");
    app.plan_not_started(old, "stale".into());
    assert!(matches!(app.plan, PlanState::Running { .. }));
    let PlanState::Running { ask, .. } = &app.plan else {
        panic!("not running")
    };
    let ask = ask.clone();
    app.plan_not_started(
        ask,
        "The plan search could not start: no threads left.".into(),
    );
    assert!(matches!(app.plan, PlanState::Failed { .. }));
    let screen = draw(&app, 100, 30);
    assert!(screen.contains("could not start"), "{screen}");
}

#[test]
fn snapshot_values() {
    let mut app = app();
    press(&mut app, "4j");
    app.handle_key(code(KeyCode::Enter));
    press(&mut app, "j");
    app.handle_key(code(KeyCode::Enter));
    snap_all("values", &app);
}

#[test]
fn snapshot_value_picker() {
    let mut app = app();
    press(&mut app, "4");
    app.handle_key(code(KeyCode::Enter));
    snap_all("value_picker", &app);
}

#[test]
fn snapshot_help() {
    let mut app = app();
    press(&mut app, "?");
    snap_all("help", &app);
}

#[test]
fn snapshot_cautions() {
    let mut app = app();
    app.show_cautions_first();
    snap_all("cautions", &app);
}

#[test]
fn snapshot_export() {
    let mut app = app();
    press(&mut app, "e");
    snap_all("export", &app);
}

#[test]
fn export_includes_the_plan_only_when_it_answers_the_current_state() {
    let dir = tempfile::tempdir().unwrap();
    let mut app = App::new(persona("teacher"));
    let fx = press(&mut app, "3");
    finish_plan(&mut app, &fx);
    let names: Vec<String> = app
        .current_plan()
        .unwrap()
        .report
        .plan
        .as_ref()
        .unwrap()
        .items
        .iter()
        .map(|i| i.name.clone())
        .collect();
    let md = dir.path().join("r.md");
    let msg = super::run::export(&app, ExportFormat::Markdown, &md);
    assert!(msg.contains("with the hiding plan"), "{msg}");
    let text = std::fs::read_to_string(&md).unwrap();
    assert!(text.contains("## Hiding plan"));
    assert!(text.contains("### Items to hide"));
    for n in &names {
        assert!(text.contains(n.as_str()), "{n} missing");
    }
    let html = dir.path().join("r.html");
    super::run::export(&app, ExportFormat::Html, &html);
    let page = std::fs::read_to_string(&html).unwrap();
    let at = page.find("<h2>Hiding plan</h2>").expect("plan section");
    assert!(at < page.find("</main>").unwrap());
    assert!(!page.contains("<script"));
    // Change a mark: the plan no longer answers the state and is left out.
    press(&mut app, "2x");
    let msg = super::run::export(&app, ExportFormat::Markdown, &md);
    assert!(msg.contains("no hiding plan"), "{msg}");
    assert!(
        !std::fs::read_to_string(&md)
            .unwrap()
            .contains("Hiding plan")
    );
}

/// The loading screen drawn on the test backend.
fn draw_loading(stage: super::run::Stage, w: u16, h: u16) -> String {
    let mut t = Terminal::new(TestBackend::new(w, h)).unwrap();
    t.draw(|f| {
        view::render_loading(
            f,
            "big.zip",
            stage,
            std::time::Duration::from_millis(1500),
            Theme::plain(),
        )
    })
    .unwrap();
    let buf = t.backend().buffer().clone();
    (0..h)
        .map(|y| {
            let line: String = (0..w).map(|x| buf[(x, y)].symbol().to_string()).collect();
            line.trim_end().to_string() + "\n"
        })
        .collect()
}

#[test]
fn loading_screen_shows_each_step_and_the_bytes_read() {
    use super::run::Stage;
    let first = draw_loading(Stage::Priors, 80, 24);
    assert!(
        first.contains("Loading the reference statistics"),
        "{first}"
    );
    assert!(first.contains("Reading big.zip\n"), "{first}");
    assert!(first.contains("1.5 s"), "{first}");
    assert!(first.contains("q, Esc or Ctrl-C stops"), "{first}");
    // 60 of 240 MB read: a quarter, and a quarter of the 50-cell bar filled.
    let reading = draw_loading(
        Stage::Reading {
            done: 60_000_000,
            total: 240_000_000,
        },
        80,
        24,
    );
    assert!(
        reading.contains("✓ Loading the reference statistics"),
        "{reading}"
    );
    assert!(
        reading.contains("Reading big.zip: 60.0 MB of 240.0 MB (25%)"),
        "{reading}"
    );
    let bar = reading.lines().find(|l| l.contains('[')).unwrap();
    assert_eq!(bar.matches('█').count(), 13, "{bar}"); // 50 × ¼ = 12.5, rounded
    let scoring = draw_loading(Stage::Scoring, 80, 24);
    assert!(scoring.contains("✓ Reading big.zip"), "{scoring}");
    assert!(!scoring.contains('['), "{scoring}");
    let opening = draw_loading(Stage::Opening, 40, 10);
    assert!(
        opening.contains("✓ Matching the items and working out"),
        "{opening}"
    );
    assert_fits(&opening, 40);
}

#[test]
fn q_esc_and_ctrl_c_leave_the_loading_screen() {
    use super::run::quits_loading;
    assert!(quits_loading(&key('q')));
    assert!(quits_loading(&code(KeyCode::Esc)));
    assert!(quits_loading(&KeyEvent::new(
        KeyCode::Char('c'),
        KeyModifiers::CONTROL
    )));
    assert!(!quits_loading(&key('c')));
    assert!(!quits_loading(&key('x')));
    assert!(!quits_loading(&code(KeyCode::Enter)));
}

/// After hides, keeps, undo and redo, the item list updated in place equals a list
/// rebuilt from scratch (order, figures and marks), in every sort order.
#[test]
fn item_list_updated_in_place_equals_a_rebuild() {
    let mut app = app();
    press(&mut app, "2");
    for order in 0..5 {
        for keys in ["x", "jjx", "jm", "u", "jjjx", "r", "kkx", "jjm"] {
            press(&mut app, keys);
            let rebuilt = telltale::whatif::item_rows(&app.session, &app.query);
            assert_eq!(app.rows, rebuilt, "after {keys:?} in order {order}");
        }
        press(&mut app, "o");
        let rebuilt = telltale::whatif::item_rows(&app.session, &app.query);
        assert_eq!(app.rows, rebuilt, "re-sorted into order {}", order + 1);
    }
    assert!(app.session.hidden_count() > 0 && app.session.kept_count() > 0);
}

/// An item with two pieces of evidence about one attribute (with the home levels, the
/// reference table's and a place name's about the home region) shows the attribute's
/// figure once, with how many pieces it covers, and names the second piece's source
/// instead of repeating the figure as if it were a second, separate one.
#[test]
fn detail_gives_an_attributes_figure_once_for_several_pieces() {
    let mut priors = load_priors(None).unwrap();
    let mut input = ScanInput {
        archive: std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("demo-exports")
            .join("teacher"),
        ..ScanInput::default()
    };
    input.sources.home_levels = true;
    let scan = Scan::run(&input, &mut priors).unwrap();
    let fp = scan.footprint.fingerprint.clone();
    let session = Session::open(scan, priors, &Decisions::new(&fp));
    // The first item with two pieces about one attribute.
    let (subject, label) = session
        .subjects()
        .find_map(|s| {
            let d = telltale::whatif::item_detail(&session, s);
            d.evidence.iter().enumerate().find_map(|(i, e)| {
                d.evidence[i + 1..]
                    .iter()
                    .any(|f| f.attribute == e.attribute)
                    .then(|| (s, e.attribute_label.clone()))
            })
        })
        .expect("the teacher has an item with two pieces about one attribute");
    let mut app = App::new(session);
    app.screen = Screen::Detail(subject);
    let screen = draw(&app, 160, 80);
    let headers: Vec<&str> = screen
        .lines()
        .filter(|l| l.starts_with(&format!("  {label} — ")))
        .collect();
    assert_eq!(headers.len(), 2, "{screen}");
    assert_eq!(
        headers.iter().filter(|l| l.contains("adds")).count(),
        1,
        "the figure once: {headers:?}"
    );
    assert!(
        headers[0].contains("2 pieces of evidence together"),
        "{headers:?}"
    );
    assert!(
        headers[1].contains("counted in the figure above"),
        "{headers:?}"
    );
}
