//! The item list: most revealing first, with a compact overview on top so the effect
//! of hiding an item shows at once.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::decisions::Mark;
use telltale::reading::{count, percent};
use telltale::whatif::overview;

use super::widgets::{cell, cell_right, fit};
use crate::tui::app::App;
use crate::tui::theme::Theme;

/// Lines the strip of attribute summaries takes at this width.
fn strip_columns(width: u16) -> usize {
    if width >= 150 { 4 } else { 2 }
}

/// The compact overview: "Age band  35–44  62% ▲".
pub fn strip(app: &App, width: u16, theme: Theme) -> Vec<Line<'static>> {
    let cols = strip_columns(width);
    let col_w = (width as usize / cols).max(10);
    let mut lines = Vec::new();
    let summaries = overview(&app.session);
    for chunk in summaries.chunks(cols) {
        let mut spans = Vec::new();
        for s in chunk {
            let mark = match s.level {
                telltale::reading::Level::Exposed => "▲",
                telltale::reading::Level::Leaning => "◆",
                telltale::reading::Level::Quiet => "○",
            };
            let num = format!(" {:>4} {mark} ", percent(s.probability));
            let label_w = (col_w / 4).min(10);
            let guess_w = col_w.saturating_sub(label_w + 1 + num.chars().count());
            spans.push(cell(short_label(&s.label), label_w, theme.dim()));
            spans.push(Span::raw(" "));
            spans.push(cell(&s.guess_label, guess_w, theme.title()));
            spans.push(Span::styled(num, theme.level(s.level)));
        }
        lines.push(fit(Line::from(spans), width as usize));
    }
    lines
}

pub fn render(app: &App, frame: &mut Frame, area: Rect, theme: Theme) {
    let w = area.width as usize;
    let s = &app.session;
    let mut lines = strip(app, area.width, theme);
    // Filters.
    let attr = match app.query.attribute {
        Some(a) => s.priors.attributes[a].label.clone(),
        None => "all".into(),
    };
    let mut filt = vec![
        Span::styled(
            {
                // Items are counted as everywhere (footprint items, identical names
                // merged); the friend list is named beside them, never counted as one.
                let n_items = s.footprint().items.len();
                let shown = app
                    .rows
                    .iter()
                    .filter(|r| r.subject != telltale::evidence::Subject::FriendList)
                    .count();
                let friends = if shown < app.rows.len() {
                    " + friend list"
                } else {
                    ""
                };
                format!("{shown} of {}{friends} · ", count(n_items, "item", "items"))
            },
            theme.dim(),
        ),
        Span::styled("about ", theme.dim()),
        Span::raw(attr),
        Span::styled(" · ", theme.dim()),
        Span::raw(app.query.kind.label()),
        Span::styled(" · order: ", theme.dim()),
        Span::raw(app.query.sort.label()),
    ];
    if app.searching || !app.query.search.is_empty() {
        filt.push(Span::styled(" · search: ", theme.dim()));
        filt.push(Span::styled(app.query.search.clone(), theme.title()));
        if app.searching {
            filt.push(Span::styled("▏", theme.title()));
        }
    }
    lines.push(fit(Line::from(filt), w));

    // Columns: mark, kind, name, points to, [alike, date,] bits, adds (the reports'
    // names, [`telltale::reading::ITEM_FIGURES`]).
    let wide = w >= 110;
    let (mark_w, kind_w, away_w, bits_w, adds_w) = if wide {
        (5, 7, 34, 6, 7)
    } else {
        (5, 7, 20, 5, 6)
    };
    let (alike_w, date_w) = if wide { (6, 11) } else { (0, 0) };
    let extra = if wide { alike_w + date_w + 2 } else { 0 };
    let name_w = w.saturating_sub(mark_w + kind_w + away_w + bits_w + adds_w + 5 + extra);
    let wide_cells = |alike: String, date: String, style| -> Vec<Span<'static>> {
        if wide {
            vec![
                cell_right(&alike, alike_w, style),
                Span::raw(" "),
                cell_right(&date, date_w, style),
                Span::raw(" "),
            ]
        } else {
            Vec::new()
        }
    };
    let mut head = vec![
        cell("", mark_w, theme.dim()),
        Span::raw(" "),
        cell("kind", kind_w, theme.dim()),
        Span::raw(" "),
        cell("item", name_w, theme.dim()),
        Span::raw(" "),
        cell("points to", away_w, theme.dim()),
        Span::raw(" "),
    ];
    head.extend(wide_cells("alike".into(), "date".into(), theme.dim()));
    head.extend([
        cell_right("bits", bits_w, theme.dim()),
        Span::raw(" "),
        cell_right("adds", adds_w, theme.dim()),
    ]);
    lines.push(Line::from(head));
    let header_rows = lines.len();
    let room = (area.height as usize).saturating_sub(header_rows);
    if app.rows.is_empty() {
        lines.push(Line::styled(
            if app.query.search.is_empty() {
                "  Nothing to list with these filters (0 clears them)."
            } else {
                "  No item name matches the search (Esc clears it)."
            },
            theme.dim(),
        ));
    }
    let offset = if app.item_cursor >= room {
        app.item_cursor + 1 - room
    } else {
        0
    };
    for (i, r) in app.rows.iter().enumerate().skip(offset).take(room) {
        let (mark, mark_style) = match r.mark {
            Some(Mark::Hide) => ("hide", theme.hidden()),
            Some(Mark::Keep) => ("keep", theme.kept()),
            None => ("", theme.dim()),
        };
        let away = match (r.attribute, r.reveals) {
            (Some(a), Some(v)) => {
                let attr = &s.priors.attributes[a];
                format!("{}: {}", short_label(&attr.label), attr.values[v].label)
            }
            _ => "no reference match".into(),
        };
        let (bits, adds) = if r.attribute.is_some() {
            (
                format!("{:.2}", r.bits),
                telltale::reading::signed_bits(r.contribution_bits),
            )
        } else {
            (String::new(), String::new())
        };
        let name_style = if r.mark == Some(Mark::Hide) {
            theme.hidden()
        } else {
            ratatui::style::Style::default()
        };
        let (alike, when) = (
            if r.attribute.is_some() {
                format!("{:.2}", r.homogeneity)
            } else {
                String::new()
            },
            r.date.map(super::widgets::date).unwrap_or_default(),
        );
        let mut spans = vec![
            cell(mark, mark_w, mark_style),
            Span::raw(" "),
            cell(r.kind, kind_w, theme.dim()),
            Span::raw(" "),
            cell(
                telltale::whatif::subject_name(s.footprint(), r.subject),
                name_w,
                name_style,
            ),
            Span::raw(" "),
            cell(&away, away_w, ratatui::style::Style::default()),
            Span::raw(" "),
        ];
        spans.extend(wide_cells(alike, when, theme.dim()));
        spans.extend([
            cell_right(&bits, bits_w, ratatui::style::Style::default()),
            Span::raw(" "),
            cell_right(&adds, adds_w, theme.title()),
        ]);
        let line = Line::from(spans);
        let line = if i == app.item_cursor {
            line.style(theme.selected())
        } else {
            line
        };
        lines.push(fit(line, w));
    }
    frame.render_widget(Paragraph::new(lines), area);
}

/// The first word of an attribute label ("Age band" → "Age", "Home location" → "Home").
pub fn short_label(label: &str) -> &str {
    label.split_whitespace().next().unwrap_or(label)
}

/// Rows of the list that fit in an area of this height (for paging).
pub fn list_rows(width: u16, height: u16, n_attributes: usize) -> usize {
    let strip = n_attributes.div_ceil(strip_columns(width));
    (height as usize).saturating_sub(strip + 2).max(1)
}
