//! Windows over the screens: help (generated from the key table), the cautions, the
//! export dialog and the real-value picker.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Paragraph};
use telltale::cautions::{CAUTIONS, TITLE};

use super::widgets::{cell, fit, wrap};
use crate::tui::app::{App, ExportFormat, Overlay};
use crate::tui::keys::help_sections;
use crate::tui::theme::Theme;

/// A centred rectangle at most `w`×`h`, inside `area`.
fn centred(area: Rect, w: u16, h: u16) -> Rect {
    let w = w.min(area.width);
    let h = h.min(area.height);
    Rect {
        x: area.x + (area.width - w) / 2,
        y: area.y + (area.height - h) / 2,
        width: w,
        height: h,
    }
}

fn boxed(frame: &mut Frame, rect: Rect, title: &str, lines: Vec<Line<'static>>, scroll: u16) {
    frame.render_widget(Clear, rect);
    let block = Block::default()
        .borders(Borders::ALL)
        .title(format!(" {title} "));
    frame.render_widget(Paragraph::new(lines).block(block).scroll((scroll, 0)), rect);
}

pub fn render(app: &App, overlay: &Overlay, frame: &mut Frame, area: Rect, theme: Theme) {
    match overlay {
        Overlay::Help { scroll } => {
            let rect = centred(area, 76, area.height.saturating_sub(2).max(8));
            let inner_w = rect.width.saturating_sub(2) as usize;
            let mut lines = Vec::new();
            for (title, rows) in help_sections() {
                lines.push(Line::styled(title.to_string(), theme.title()));
                for (keys, help) in rows {
                    let key_w = 14.min(inner_w / 3);
                    let text = wrap(help, inner_w.saturating_sub(key_w + 3));
                    for (k, t) in text.into_iter().enumerate() {
                        let key = if k == 0 { keys.clone() } else { String::new() };
                        lines.push(fit(
                            Line::from(vec![
                                Span::raw("  "),
                                cell(&key, key_w, theme.key()),
                                Span::raw(" "),
                                Span::raw(t),
                            ]),
                            inner_w,
                        ));
                    }
                }
                lines.push(Line::raw(""));
            }
            lines.push(Line::styled(
                "↑↓ scroll · any other key closes".to_string(),
                theme.dim(),
            ));
            let max = lines
                .len()
                .saturating_sub(rect.height.saturating_sub(2) as usize)
                as u16;
            boxed(frame, rect, "Keys", lines, (*scroll).min(max));
        }
        Overlay::Cautions { first_run } => {
            let width = 74.min(area.width);
            let inner_w = width.saturating_sub(4) as usize;
            let mut lines = Vec::new();
            for c in CAUTIONS {
                for (k, l) in wrap(c, inner_w).into_iter().enumerate() {
                    lines.push(Line::raw(format!(
                        "{}{l}",
                        if k == 0 { "• " } else { "  " }
                    )));
                }
            }
            lines.push(Line::raw(""));
            lines.push(Line::styled(
                if *first_run {
                    " Shown once on first use; c shows it again. Press any key to start."
                } else {
                    " Press any key to close."
                }
                .to_string(),
                theme.dim(),
            ));
            let rect = centred(area, width, lines.len() as u16 + 2);
            boxed(frame, rect, TITLE, lines, 0);
        }
        Overlay::Export { format, path } => {
            let rect = centred(area, 72, 11);
            let inner_w = rect.width.saturating_sub(2) as usize;
            let choice = |f: ExportFormat| {
                let on = f == *format;
                Span::styled(
                    format!(" {} {} ", if on { "(•)" } else { "( )" }, f.label()),
                    if on { theme.title() } else { theme.dim() },
                )
            };
            let lines = vec![
                Line::raw("Write a report of what you see now (hidden items count as hidden)."),
                Line::raw(""),
                Line::from(vec![
                    choice(ExportFormat::Html),
                    choice(ExportFormat::Markdown),
                ]),
                Line::raw(""),
                Line::styled("File:".to_string(), theme.dim()),
                fit(
                    Line::from(vec![
                        Span::styled(path.clone(), theme.title()),
                        Span::styled("▏", theme.title()),
                    ]),
                    inner_w,
                ),
                Line::raw(""),
                Line::styled(
                    "Tab format · Enter write (readable by you only) · Esc cancel".to_string(),
                    theme.dim(),
                ),
                Line::styled(
                    "Friends' names and your real values are left out.".to_string(),
                    theme.dim(),
                ),
            ];
            boxed(frame, rect, "Export a report", lines, 0);
        }
        Overlay::PickValue { attribute, cursor } => {
            let attr = &app.session.priors.attributes[*attribute];
            let rect = centred(
                area,
                44,
                (attr.values.len() as u16 + 4).min(area.height.saturating_sub(2)),
            );
            let inner_w = rect.width.saturating_sub(2) as usize;
            let room = rect.height.saturating_sub(3) as usize;
            let mut rows: Vec<String> = vec!["(not stated)".into()];
            rows.extend(attr.values.iter().map(|v| v.label.clone()));
            let offset = if *cursor >= room {
                cursor + 1 - room
            } else {
                0
            };
            let mut lines: Vec<Line<'static>> = rows
                .iter()
                .enumerate()
                .skip(offset)
                .take(room)
                .map(|(i, r)| {
                    let l = Line::raw(format!(" {r}"));
                    if i == *cursor {
                        fit(l, inner_w).style(theme.selected())
                    } else {
                        fit(l, inner_w)
                    }
                })
                .collect();
            lines.push(Line::styled(
                "Enter choose · letter jumps · Esc cancel".to_string(),
                theme.dim(),
            ));
            boxed(
                frame,
                rect,
                &format!("Your real {}", attr.label.to_lowercase()),
                lines,
                0,
            );
        }
    }
}
