//! The overview screen: for each protected attribute, the observer's best guess, its
//! probability against the population rate as a bar, one sentence in plain words, and
//! how many items feed it.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::reading::{percent, support_phrase};
use telltale::whatif::overview;

use super::widgets::{bar, cell, fit, wrap};
use crate::tui::app::App;
use crate::tui::theme::{Theme, level_tag};

pub fn render(app: &App, frame: &mut Frame, area: Rect, theme: Theme) {
    let summaries = overview(&app.session);
    let w = area.width as usize;
    let n = summaries.len().max(1);
    // One line for the legend at the bottom.
    let per = ((area.height as usize).saturating_sub(1) / n).clamp(3, 7);
    let mut lines: Vec<Line<'static>> = Vec::new();
    for (i, s) in summaries.iter().enumerate() {
        let selected = i == app.overview_cursor;
        let pointer = if selected { "▸ " } else { "  " };
        let tag = level_tag(s.level);
        let title_style = if selected {
            theme.selected()
        } else {
            theme.title()
        };
        // Facts beside the name: what feeds it, how it changed, your real value.
        // The verb agrees with the count: "1 of 5 pieces of evidence supports it",
        // "none of the 3 pieces of evidence supports it", "no evidence".
        let label_w = 18.min(w / 4);
        let facts_w = w.saturating_sub(2 + label_w + 1 + tag.chars().count() + 1);
        let mut facts = vec![if s.only_friend_list {
            format!(
                "only your friend list {} it",
                if s.supporting == 1 {
                    "supports"
                } else {
                    "feeds"
                }
            )
        } else {
            // Pieces of evidence, not items ("80 of 151 pieces of evidence support
            // it"): one item can give several (the reference table and a place name),
            // and the friend list gives some too. Where the line is short, "of
            // evidence" is left out so that "before hiding" still fits at 80 columns.
            let long = support_phrase(s.supporting, s.feeding, true);
            let room = facts_w.saturating_sub(" · before hiding 100%".len());
            if long.chars().count() <= room {
                long
            } else {
                support_phrase(s.supporting, s.feeding, false)
            }
        }];
        if percent(s.baseline_probability) != percent(s.probability)
            || s.baseline_guess_label != s.guess_label
        {
            facts.push(format!("before hiding {}", percent(s.baseline_probability)));
        }
        if let Some((label, p)) = &s.real {
            facts.push(format!("yours, {label}: {}", percent(*p)));
        }
        lines.push(Line::from(vec![
            Span::styled(pointer, title_style),
            cell(&s.label, label_w, title_style),
            Span::raw(" "),
            cell(&facts.join(" · "), facts_w, theme.dim()),
            Span::raw(" "),
            Span::styled(tag, theme.level(s.level)),
        ]));
        // Guess, bar, numbers.
        let guess_w = 14.min(w / 5);
        let tail = format!(
            " {:>4}  population {}",
            percent(s.probability),
            percent(s.base_rate)
        );
        let bar_w = w
            .saturating_sub(2 + guess_w + 1 + tail.chars().count())
            .clamp(0, 60);
        let mut spans = vec![
            Span::raw("  "),
            cell(&s.guess_label, guess_w, theme.title()),
            Span::raw(" "),
        ];
        spans.extend(bar(
            s.probability,
            s.base_rate,
            Some(s.target),
            bar_w,
            theme,
        ));
        spans.push(Span::raw(tail));
        lines.push(fit(Line::from(spans), w));
        // Reading: as many lines as fit.
        let room = per.saturating_sub(2).max(1);
        let wrapped = wrap(&s.reading, w.saturating_sub(4));
        let shown = wrapped.len().min(room);
        for (k, l) in wrapped.iter().take(shown).enumerate() {
            let text = if k + 1 == shown && wrapped.len() > shown {
                telltale::text::truncate_to_width(&format!("{l} …"), w.saturating_sub(4))
            } else {
                l.clone()
            };
            lines.push(Line::from(vec![Span::raw("  "), Span::raw(text)]));
        }
        while lines.len() < (i + 1) * per {
            lines.push(Line::raw(""));
        }
    }
    let legend_row = area.height.saturating_sub(1) as usize;
    while lines.len() < legend_row {
        lines.push(Line::raw(""));
    }
    lines.truncate(legend_row);
    let mut legend = vec![Span::raw("  █ observer's confidence   ")];
    legend.push(Span::styled("|", theme.base_mark()));
    legend.push(Span::raw(" population rate   "));
    legend.push(Span::styled("¦", theme.title()));
    legend.push(Span::raw(" your alert level"));
    lines.push(fit(Line::from(legend), w));
    frame.render_widget(Paragraph::new(lines), area);
}
