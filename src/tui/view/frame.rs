//! The whole screen: a tab line on top, the current screen, and a footer with the
//! keys for this screen (generated from the key table) or the latest message.

use std::time::Duration;

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::text::display_width;

use super::widgets::{fit, wrap};
use super::{detail, items, overlays, overview, plan, values};
use crate::tui::app::{App, Screen};
use crate::tui::keys::hints;
use crate::tui::run::Stage;
use crate::tui::theme::Theme;

/// Smallest usable size; below it the screen says so instead of drawing garbage.
pub const MIN_WIDTH: u16 = 40;
pub const MIN_HEIGHT: u16 = 10;

/// Draw the explorer.
pub fn render(app: &App, frame: &mut Frame, theme: Theme) {
    let area = frame.area();
    if area.width < MIN_WIDTH || area.height < MIN_HEIGHT {
        let msg = format!(
            "The window is too small ({}×{}); telltale needs at least {MIN_WIDTH}×{MIN_HEIGHT}. q quits.",
            area.width, area.height
        );
        let lines: Vec<Line> = wrap(&msg, area.width.max(1) as usize)
            .into_iter()
            .map(Line::raw)
            .collect();
        frame.render_widget(Paragraph::new(lines), area);
        return;
    }
    let [top, body, foot] = Layout::vertical([
        Constraint::Length(1),
        Constraint::Min(1),
        Constraint::Length(1),
    ])
    .areas(area);
    frame.render_widget(Paragraph::new(header(app, top.width, theme)), top);
    match app.screen {
        Screen::Overview => overview::render(app, frame, body, theme),
        Screen::Items => items::render(app, frame, body, theme),
        Screen::Detail(s) => detail::render(app, s, frame, body, theme),
        Screen::Plan => plan::render(app, frame, body, theme),
        Screen::Values => values::render(app, frame, body, theme),
    }
    frame.render_widget(Paragraph::new(footer(app, foot.width, theme)), foot);
    if let Some(o) = &app.overlay {
        overlays::render(app, o, frame, area, theme);
    }
}

fn header(app: &App, width: u16, theme: Theme) -> Line<'static> {
    let w = width as usize;
    let mut spans = Vec::new();
    for (i, (screen, name)) in Screen::TABS.iter().enumerate() {
        let active = app.screen.tab() == screen.tab();
        let text = if w >= 70 {
            format!(" {} {name} ", i + 1)
        } else {
            format!(" {} ", i + 1)
        };
        spans.push(Span::styled(
            text,
            if active {
                theme.tab_active()
            } else {
                theme.dim()
            },
        ));
    }
    let used: usize = spans.iter().map(|s| display_width(&s.content)).sum();
    let s = &app.session;
    let mut right = format!("{} · {} hidden", s.scan.archive_name, s.hidden_count());
    if s.kept_count() > 0 {
        right.push_str(&format!(" · {} kept", s.kept_count()));
    }
    let room = w.saturating_sub(used + 2);
    let right = telltale::text::truncate_to_width(&right, room);
    let pad = w.saturating_sub(used + display_width(&right) + 1);
    spans.push(Span::raw(" ".repeat(pad)));
    spans.push(Span::styled(right, theme.title()));
    fit(Line::from(spans), w)
}

fn footer(app: &App, width: u16, theme: Theme) -> Line<'static> {
    let w = width as usize;
    if let Some(msg) = &app.status {
        return fit(Line::styled(format!(" {msg}"), theme.warning()), w);
    }
    if app.searching {
        return fit(
            Line::styled(
                " Type to search · Enter keeps the search · Esc clears it".to_string(),
                theme.dim(),
            ),
            w,
        );
    }
    // Screen keys first, but "? help" and "q quit" always show.
    let all = hints(app.screen.place());
    let always: Vec<_> = all
        .iter()
        .filter(|(_, h)| matches!(*h, "help" | "quit"))
        .cloned()
        .collect();
    let width_of = |(k, h): &(String, &str)| display_width(k) + 1 + display_width(h) + 2;
    let reserved: usize = always.iter().map(width_of).sum();
    let mut chosen = Vec::new();
    let mut used = 1 + reserved;
    for pair in all.iter().filter(|(_, h)| !matches!(*h, "help" | "quit")) {
        if used + width_of(pair) > w {
            break;
        }
        used += width_of(pair);
        chosen.push(pair.clone());
    }
    chosen.extend(always);
    let mut spans = vec![Span::raw(" ")];
    for (key, hint) in chosen {
        spans.push(Span::styled(key, theme.key()));
        spans.push(Span::raw(format!(" {hint}  ")));
    }
    Line::from(spans)
}

/// The loading screen while a worker reads the archive: the four steps, the current
/// one with a spinner (and, while reading, the bytes read of the mapped files and a
/// bar), and the time so far.
pub fn render_loading(
    frame: &mut Frame,
    archive: &str,
    stage: Stage,
    elapsed: Duration,
    theme: Theme,
) {
    let area = frame.area();
    let w = area.width as usize;
    let spin = ['|', '/', '-', '\\'][(elapsed.as_millis() / 125) as usize % 4];
    let current = match stage {
        Stage::Priors => 0,
        Stage::Reading { .. } => 1,
        Stage::Scoring => 2,
        Stage::Opening => 3,
    };
    let reading = match stage {
        Stage::Reading { done, total } if total > 0 => format!(
            "Reading {archive}: {} of {} ({}%)",
            megabytes(done),
            megabytes(total),
            done * 100 / total
        ),
        _ => format!("Reading {archive}"),
    };
    let steps = [
        "Loading the reference statistics".to_string(),
        reading,
        "Matching the items and working out the guesses".to_string(),
        "Opening the explorer".to_string(),
    ];
    let mut lines = vec![
        Line::raw(""),
        Line::styled("  telltale".to_string(), theme.title()),
        Line::raw(""),
    ];
    for (i, step) in steps.iter().enumerate() {
        let (mark, style) = match i.cmp(&current) {
            std::cmp::Ordering::Less => ("✓".to_string(), theme.dim()),
            std::cmp::Ordering::Equal => (spin.to_string(), theme.title()),
            std::cmp::Ordering::Greater => (" ".to_string(), theme.dim()),
        };
        lines.push(Line::from(vec![
            Span::raw(format!("  {mark} ")),
            Span::styled(step.clone(), style),
        ]));
        if i == 1
            && let Stage::Reading { done, total } = stage
            && total > 0
        {
            let bar_w = w.saturating_sub(8).min(50);
            let bar = super::widgets::share_bar(done as f64 / total as f64, bar_w, '█');
            lines.push(Line::raw(format!("    [{bar}]")));
        }
    }
    lines.push(Line::raw(""));
    lines.push(Line::raw(format!("  {:.1} s", elapsed.as_secs_f64())));
    lines.push(Line::raw(""));
    lines.push(Line::styled(
        "  Everything stays on this computer. q, Esc or Ctrl-C stops.".to_string(),
        theme.dim(),
    ));
    let lines: Vec<Line> = lines.into_iter().map(|l| fit(l, w)).collect();
    frame.render_widget(Paragraph::new(lines), area);
}

/// "12.3 MB" (decimal megabytes, one decimal).
fn megabytes(bytes: u64) -> String {
    format!("{:.1} MB", bytes as f64 / 1e6)
}

/// Rows a page of the current screen holds.
pub fn page_rows(app: &App, area: Rect) -> usize {
    let body = area.height.saturating_sub(2);
    match app.screen {
        Screen::Items => items::list_rows(area.width, body, app.session.n_attributes()),
        // The plan screen pages its lower part, under the goal, status and table.
        Screen::Plan => body
            .saturating_sub(app.session.n_attributes() as u16 + 7)
            .max(1) as usize,
        _ => body.saturating_sub(2).max(1) as usize,
    }
}
