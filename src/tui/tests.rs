//! The explorer tested without a terminal: keys sent to the state machine, and every
//! screen drawn on ratatui's TestBackend at 80×24 and at 160×48, compared with insta
//! snapshots (src/tui/snapshots/). The demo "reporter" persona is the fixture.

use std::sync::Arc;
use std::sync::atomic::AtomicBool;

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use telltale::decisions::Decisions;
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::text::display_width;
use telltale::whatif::Session;

use super::app::{App, Effect, ExportFormat, Overlay, PlanState, Screen};
use super::plan_adapter::suggest;
use super::theme::Theme;
use super::view;

fn session() -> Session {
    let priors = load_priors(None).unwrap();
    let input = ScanInput {
        archive: concat!(env!("CARGO_MANIFEST_DIR"), "/demo-exports/reporter").into(),
        ..ScanInput::default()
    };
    let scan = Scan::run(&input, &priors).unwrap();
    let fp = scan.footprint.fingerprint.clone();
    Session::open(scan, priors, &Decisions::new(&fp))
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

fn press(app: &mut App, keys: &str) -> Vec<Effect> {
    keys.chars().flat_map(|c| app.handle_key(key(c))).collect()
}

/// Run a requested plan to completion synchronously (the loop does it on a worker).
fn finish_plan(app: &mut App, effects: &[Effect]) {
    let ask = effects
        .iter()
        .find_map(|e| match e {
            Effect::StartPlan(a) => Some(a.clone()),
            _ => None,
        })
        .expect("a plan was requested");
    let s = suggest(
        app.session.exposure(),
        &ask,
        &Arc::new(AtomicBool::new(false)),
    );
    app.plan_finished(ask, s);
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
    let mut app = app();
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
    let PlanState::Ready { suggestion, .. } = app.plan.clone() else {
        panic!("plan not ready");
    };
    assert!(!suggestion.proven_smallest);
    let n = suggestion.hide.len();
    assert!(n > 0, "the demo reporter is exposed somewhere");
    let fx = app.handle_key(code(KeyCode::Enter));
    assert!(fx.contains(&Effect::SaveDecisions));
    assert_eq!(app.session.hidden_count(), n);
    // After accepting, a new plan is asked for (the state changed).
    assert!(fx.iter().any(|e| matches!(e, Effect::StartPlan(_))));
    press(&mut app, "u");
    assert_eq!(app.session.hidden_count(), 0);

    // The goal switches to the real value once one is stated.
    let fx = press(&mut app, "g");
    assert_eq!(app.goal, super::app::Goal::RealValue);
    let ask = fx
        .iter()
        .find_map(|e| match e {
            Effect::StartPlan(a) => Some(a.clone()),
            _ => None,
        })
        .unwrap();
    assert_eq!(ask.protect[0], Some(0));
}

#[test]
fn goal_switch_needs_a_real_value() {
    let mut app = app();
    press(&mut app, "3");
    press(&mut app, "g");
    assert_eq!(app.goal, super::app::Goal::BestGuess);
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
        s.scan.footprint.items[i].name = n.to_string();
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
    let mut app = app();
    let fx = press(&mut app, "3");
    finish_plan(&mut app, &fx);
    snap_all("plan", &app);
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
