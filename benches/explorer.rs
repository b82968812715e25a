//! The explorer on the large archive (issue 9; figures in docs/performance.md): what a
//! person waits for once the scan is done, and what one key press costs up to the
//! redrawn frame, at 110,000 items. The explorer's own code (`src/tui/`) is compiled
//! into this bench, so the figures include the state machine and the drawing of a
//! 120×40 frame (on ratatui's test backend, so no terminal output is timed).
//!
//! ```sh
//! telltale synth large /tmp/telltale-perf/large.zip
//! TELLTALE_LARGE=/tmp/telltale-perf/large.zip cargo bench --bench explorer
//! ```
//!
//! Without `TELLTALE_LARGE` it says so and does nothing. The archive is scored against
//! the bundled demo priors, as `telltale explore` does by default.

#[allow(dead_code, unused_imports)]
#[path = "../src/tui/mod.rs"]
mod tui;

use std::hint::black_box;
use std::path::PathBuf;
use std::time::Instant;

use criterion::{BatchSize, Criterion};
use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use telltale::decisions::Decisions;
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::whatif::Session;

use tui::app::App;
use tui::theme::Theme;

const THEME: Theme = Theme { colour: false };

fn key(c: char) -> KeyEvent {
    KeyEvent::new(KeyCode::Char(c), KeyModifiers::NONE)
}

fn frame(terminal: &mut Terminal<TestBackend>, app: &App) {
    terminal
        .draw(|f| tui::view::render(app, f, THEME))
        .expect("the test backend draws");
}

/// One key press as the event loop handles it: the state machine, the decisions it
/// asks to save (built, not written), and the frame.
fn press(terminal: &mut Terminal<TestBackend>, app: &mut App, c: char) {
    let effects = app.handle_key(key(c));
    if !effects.is_empty() {
        black_box(app.session.decisions());
    }
    frame(terminal, app);
}

fn main() {
    let Some(archive) = std::env::var_os("TELLTALE_LARGE").map(PathBuf::from) else {
        println!("explorer: set TELLTALE_LARGE to an archive made by `telltale synth large`");
        return;
    };
    let mut priors = load_priors(None).expect("the bundled priors load");
    let input = ScanInput {
        archive,
        ..ScanInput::default()
    };
    let t = Instant::now();
    let scan = match Scan::run(&input, &mut priors) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("explorer: {e}");
            return;
        }
    };
    println!(
        "explorer: scan of {} items in {:.2} s (not part of the figures below)",
        scan.footprint.items.len(),
        t.elapsed().as_secs_f64()
    );
    let fingerprint = scan.footprint.fingerprint.clone();
    let mut c = Criterion::default().configure_from_args();
    let mut terminal = Terminal::new(TestBackend::new(120, 40)).expect("a test terminal");

    c.bench_function("explorer 110k: scan done -> first overview frame", |b| {
        b.iter_batched(
            || (scan.clone(), priors.clone()),
            |(scan, priors)| {
                let session = Session::open(scan, priors, &Decisions::new(&fingerprint));
                let app = App::new(session);
                frame(&mut terminal, &app);
                app
            },
            BatchSize::LargeInput,
        )
    });

    let session = Session::open(scan, priors, &Decisions::new(&fingerprint));
    let mut app = App::new(session);
    // The item list, most revealing first: x hides the item under the cursor, the next
    // x shows it again.
    app.handle_key(key('2'));
    c.bench_function("explorer 110k: x on the item list -> frame", |b| {
        b.iter(|| press(&mut terminal, &mut app, 'x'))
    });
    c.bench_function(
        "explorer 110k: x on the item list, state only (no frame)",
        |b| b.iter(|| black_box(app.handle_key(key('x')))),
    );
    c.bench_function("explorer 110k: m (keep) on the item list -> frame", |b| {
        b.iter(|| press(&mut terminal, &mut app, 'm'))
    });
    c.bench_function(
        "explorer 110k: cursor down on the item list -> frame",
        |b| b.iter(|| press(&mut terminal, &mut app, 'j')),
    );
    c.bench_function(
        "explorer 110k: o (next order) on the item list -> frame",
        |b| b.iter(|| press(&mut terminal, &mut app, 'o')),
    );
    // Typing into the search: one letter, then Backspace (each a full filter).
    app.handle_key(key('0'));
    app.handle_key(key('/'));
    app.handle_key(key('e'));
    c.bench_function(
        "explorer 110k: a letter typed into the search, frame, Backspace",
        |b| {
            b.iter(|| {
                press(&mut terminal, &mut app, 'a');
                let back = KeyEvent::new(KeyCode::Backspace, KeyModifiers::NONE);
                app.handle_key(back);
            })
        },
    );
    app.handle_key(KeyEvent::new(KeyCode::Esc, KeyModifiers::NONE));
    // The same toggle seen from the item's detail, then the overview redrawn.
    app.handle_key(KeyEvent::new(KeyCode::Enter, KeyModifiers::NONE));
    c.bench_function("explorer 110k: x on an item's detail -> frame", |b| {
        b.iter(|| press(&mut terminal, &mut app, 'x'))
    });
    app.handle_key(key('1'));
    c.bench_function("explorer 110k: overview redrawn", |b| {
        b.iter(|| frame(&mut terminal, &app))
    });
    c.final_summary();
}
