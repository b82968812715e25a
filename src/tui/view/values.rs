//! Your real values: private statements, kept only in the local decisions file, that
//! let the plan aim at "my real value must not be guessable".

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::reading::percent;

use super::widgets::{cell, fit, wrap};
use crate::tui::app::App;
use crate::tui::theme::Theme;

pub fn render(app: &App, frame: &mut Frame, area: Rect, theme: Theme) {
    let w = area.width as usize;
    let s = &app.session;
    let mut lines: Vec<Line<'static>> = Vec::new();
    let intro = "If you tell telltale your real value for an attribute, the hiding plan can aim at \
                 \"my real value must not be guessable\" (g on the plan screen) instead of only \
                 lowering the best guess. These values stay on this computer in your decisions \
                 file; they never go into a report.";
    for l in wrap(intro, w.saturating_sub(4)) {
        lines.push(Line::styled(format!("  {l}"), theme.dim()));
    }
    lines.push(Line::raw(""));
    let label_w = 18.min(w / 4);
    let value_w = 18.min(w / 4);
    for (a, attr) in s.priors.attributes.iter().enumerate() {
        let selected = a == app.values_cursor;
        let post = s.posterior(a);
        let (value, note) = match s.real_value(a) {
            Some(v) => {
                let rank = post.probs.iter().filter(|&&p| p > post.probs[v]).count() + 1;
                (
                    attr.values[v].label.clone(),
                    format!(
                        "an observer gives it {} (ranked {} of {}; best guess {} {})",
                        percent(post.probs[v]),
                        rank,
                        attr.values.len(),
                        attr.values[post.best].label,
                        percent(post.probability)
                    ),
                )
            }
            None => ("not stated".to_string(), String::new()),
        };
        let style = if selected {
            theme.selected()
        } else {
            theme.title()
        };
        lines.push(fit(
            Line::from(vec![
                Span::raw(if selected { "▸ " } else { "  " }),
                cell(&attr.label, label_w, style),
                Span::raw(" "),
                cell(&value, value_w, ratatui::style::Style::default()),
                Span::raw(" "),
                Span::styled(note, theme.dim()),
            ]),
            w,
        ));
    }
    frame.render_widget(Paragraph::new(lines), area);
}
