//! The hiding plan: the goal, each attribute now and after the suggested hiding, and
//! the suggested items; Enter accepts them all as one undoable step.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::reading::{level, percent};
use telltale::whatif::subject_name;

use super::widgets::{cell, cell_right, fit, wrap};
use crate::tui::app::{App, Goal, PlanState};
use crate::tui::theme::{Theme, level_tag};

const SPINNER: [char; 4] = ['|', '/', '-', '\\'];

pub fn render(app: &App, frame: &mut Frame, area: Rect, theme: Theme) {
    let w = area.width as usize;
    let s = &app.session;
    let mut lines: Vec<Line<'static>> = Vec::new();
    let goal = match app.goal {
        Goal::BestGuess => "no best guess above your alert level",
        Goal::RealValue => "your real values not guessable above your alert level",
    };
    lines.push(fit(
        Line::from(vec![
            Span::styled("  Goal: ", theme.dim()),
            Span::styled(goal, theme.title()),
        ]),
        w,
    ));
    let status: Line<'static> = match &app.plan {
        PlanState::Stale => Line::styled("  Working out a plan…", theme.dim()),
        PlanState::Running { started, .. } => {
            let secs = started.elapsed().as_secs_f64();
            let spin = SPINNER[((secs * 8.0) as usize) % SPINNER.len()];
            Line::styled(
                format!(
                    "  {spin} working out a plan… {secs:.1} s (keep using the other screens meanwhile)"
                ),
                theme.dim(),
            )
        }
        PlanState::Ready { suggestion, .. } => {
            let mut spans = vec![Span::styled(
                format!("  Method: {}", suggestion.method),
                if suggestion.proven_smallest {
                    theme.dim()
                } else {
                    theme.warning()
                },
            )];
            if suggestion.cancelled {
                spans.push(Span::raw(" (stopped early)"));
            }
            Line::from(spans)
        }
    };
    lines.push(fit(status, w));
    lines.push(Line::raw(""));

    let label_w = 18.min(w / 4);
    let col_w = (w.saturating_sub(label_w + 4 + 7 + 2) / 2).max(10);
    lines.push(Line::from(vec![
        Span::raw("  "),
        cell("attribute", label_w, theme.dim()),
        cell_right("alert", 6, theme.dim()),
        Span::raw("  "),
        cell("now", col_w, theme.dim()),
        cell("after the suggestion", col_w, theme.dim()),
    ]));
    let after = match &app.plan {
        PlanState::Ready { suggestion, .. } => Some(&suggestion.after),
        _ => None,
    };
    for (a, attr) in s.priors.attributes.iter().enumerate() {
        let selected = a == app.plan_cursor;
        let protect = match app.goal {
            Goal::RealValue => s.real_value(a),
            Goal::BestGuess => None,
        };
        let describe = |probs: &[f64], best: usize| -> (String, telltale::reading::Level) {
            let target = s.target(a);
            match protect {
                Some(v) => {
                    let p = probs[v];
                    let lv = if p > target {
                        telltale::reading::Level::Exposed
                    } else {
                        telltale::reading::Level::Quiet
                    };
                    (format!("yours {} {}", attr.values[v].label, percent(p)), lv)
                }
                None => {
                    let p = probs[best];
                    (
                        format!("{} {}", attr.values[best].label, percent(p)),
                        level(p, attr.base_rates[best], target),
                    )
                }
            }
        };
        let describe = |probs: &[f64], best: usize| -> (String, telltale::reading::Level) {
            let (mut text, lv) = describe(probs, best);
            if lv == telltale::reading::Level::Exposed && text.ends_with(&percent(s.target(a))) {
                text.push_str(" (just over)");
            }
            (text, lv)
        };
        let now = s.posterior(a);
        let (now_text, now_level) = describe(&now.probs, now.best);
        let mut spans = vec![
            Span::raw(if selected { "▸ " } else { "  " }),
            cell(
                &attr.label,
                label_w,
                if selected {
                    theme.selected()
                } else {
                    theme.title()
                },
            ),
            cell_right(&percent(s.target(a)), 6, theme.title()),
            Span::raw("  "),
        ];
        let tag_short = |lv| level_tag(lv).split(' ').next().unwrap_or("").to_string();
        spans.push(cell(
            &format!("{} {now_text}", tag_short(now_level)),
            col_w,
            theme.level(now_level),
        ));
        if let Some(after) = after.and_then(|v| v.get(a)) {
            let (t, lv) = describe(&after.probs, after.best);
            spans.push(cell(
                &format!("{} {t}", tag_short(lv)),
                col_w,
                theme.level(lv),
            ));
        }
        lines.push(fit(Line::from(spans), w));
    }
    lines.push(Line::raw(""));

    if let PlanState::Ready { suggestion, .. } = &app.plan {
        let n = suggestion.hide.len();
        let head = if n == 0 && suggestion.reaches_goal {
            "  Nothing needs hiding: every attribute is already under its alert level.".to_string()
        } else if n == 0 {
            "  Hiding more would not help (items marked keep stay visible).".to_string()
        } else if suggestion.reaches_goal {
            format!("  Suggested: hide these {n} item(s). Enter hides them all.")
        } else {
            format!(
                "Hiding these {n} item(s) helps but does not bring every attribute under its alert level. Raise a level with +, or take keep marks away."
            )
        };
        for l in wrap(head.trim_start(), w.saturating_sub(4)) {
            lines.push(Line::styled(format!("  {l}"), theme.title()));
        }
        let room = (area.height as usize).saturating_sub(lines.len());
        for (k, &subject) in suggestion.hide.iter().enumerate() {
            if k + 1 == room && n > room {
                lines.push(Line::styled(
                    format!("    … and {} more", n - k),
                    theme.dim(),
                ));
                break;
            }
            let kind = match subject {
                telltale::evidence::Subject::Item(i) => s.footprint().items[i].kind.as_str(),
                telltale::evidence::Subject::FriendList => "friends",
            };
            lines.push(fit(
                Line::from(vec![
                    Span::raw("    "),
                    cell(kind, 7, theme.dim()),
                    Span::raw(subject_name(s.footprint(), subject).to_string()),
                ]),
                w,
            ));
        }
    }
    frame.render_widget(Paragraph::new(lines), area);
}
