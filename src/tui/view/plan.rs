//! The hiding plan: the goal and method, what the planner could prove (smallest,
//! best found when stopped, impossible, or a quick greedy suggestion), each attribute
//! now and with the plan, then — scrolling with PgUp/PgDn — the items to hide with why,
//! what the usual coarse moves would do, and what stands in the way when no plan
//! exists. Everything shown comes from the library planner's outcome and report.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::plan::{Method, PlanReport, Status, StopReason};
use telltale::reading::{Level, assess, percent};
use telltale::whatif::PLAN_TIME_LIMIT;

use super::widgets::{cell, cell_right, fit, wrap};
use crate::tui::app::{App, Goal, PlanResult, PlanState};
use crate::tui::theme::{Theme, level_tag};

const SPINNER: [char; 4] = ['|', '/', '-', '\\'];

fn count(n: f64) -> String {
    let n = n.ceil().max(0.0) as usize;
    telltale::reading::count(n, "item", "items")
}

/// The status lines: what is known about the plan, in words.
fn status_lines(app: &App, w: usize, theme: Theme) -> Vec<Line<'static>> {
    let (text, style) = match &app.plan {
        PlanState::Stale => ("Working out a plan…".to_string(), theme.dim()),
        PlanState::Running {
            started,
            ask,
            progress,
            stopping,
        } => {
            let secs = started.elapsed().as_secs_f64();
            let spin = SPINNER[((secs * 8.0) as usize) % SPINNER.len()];
            let what = match ask.method {
                Method::Exact => "Searching for the smallest plan",
                Method::Greedy => "Finding a quick plan (greedy)",
            };
            let mut t = format!(
                "{spin} {what}: {secs:.1} s (at most {} s). {}",
                PLAN_TIME_LIMIT.as_secs(),
                if *stopping {
                    "Stopping…"
                } else {
                    "Esc stops and keeps the best found."
                }
            );
            if let Some(p) = progress {
                let mut line = p.best_cost.map_or("No plan yet".to_string(), |b| {
                    format!("Best so far {}", count(b))
                });
                if p.lower_bound > 0.0 {
                    line.push_str(&format!("; at least {} needed", count(p.lower_bound)));
                }
                line.push_str(&format!(" ({} search steps).", p.nodes));
                t = format!("{t}\n{line}");
            }
            (t, theme.dim())
        }
        PlanState::Failed { message, .. } => (message.clone(), theme.warning()),
        PlanState::Ready { result, .. } => ready_words(result, theme),
    };
    text.lines()
        .flat_map(|para| wrap(para, w.saturating_sub(4)))
        .map(|l| Line::styled(format!("  {l}"), style))
        .collect()
}

fn ready_words(r: &PlanResult, theme: Theme) -> (String, ratatui::style::Style) {
    let o = &r.outcome;
    let n = o.plan.as_ref().map_or(0, |p| p.len());
    let t = match (o.method, o.status) {
        (_, Status::Optimal) if n == 0 => {
            "✓ Nothing needs hiding: every attribute is already under its alert level.".into()
        }
        (Method::Exact, Status::Optimal) => {
            format!(
                "✓ Proven smallest: no set of fewer than {} does it.",
                telltale::reading::count(n, "item", "items")
            )
        }
        (Method::Exact, Status::Feasible) => {
            let mut t = match o.stopped {
                Some(reason) => {
                    let why = match reason {
                        StopReason::Cancelled => "you stopped the search",
                        StopReason::Deadline => "the time limit was reached",
                        StopReason::NodeLimit => "the search limit was reached",
                    };
                    format!("◆ Best found when stopped ({why}): a smaller set may exist")
                }
                None => "◆ Best found, not proven smallest: the proof does not cover this priors file's fitted (logistic) calibration, so a smaller set may exist".into(),
            };
            if let Some(lb) = o.lower_bound {
                t.push_str(&format!("; at least {} needed", count(lb)));
            }
            t.push('.');
            t
        }
        (Method::Greedy, Status::Feasible | Status::Optimal) => {
            "◆ Quick greedy suggestion, not proven smallest. m runs the exact search.".into()
        }
        (_, Status::Infeasible) => {
            "▲ Impossible: no set of items you allow hidden meets every alert level; why is below."
                .into()
        }
        (Method::Exact, Status::Unknown) => format!(
            "▲ No plan found within {} s, and none proven impossible (see below).",
            PLAN_TIME_LIMIT.as_secs()
        ),
        // Out of time, or stuck (nothing left that moves the guesses).
        (Method::Greedy, _) if o.greedy.seconds >= 0.99 * PLAN_TIME_LIMIT.as_secs_f64() => {
            format!(
                "▲ The quick greedy method found no plan within {} s. m runs the exact search.",
                PLAN_TIME_LIMIT.as_secs()
            )
        }
        (Method::Greedy, _) => {
            "▲ The quick greedy method found no plan. m runs the exact search.".into()
        }
    };
    let style = match o.status {
        Status::Optimal => theme.title(),
        _ => theme.warning(),
    };
    (t, style)
}

pub fn render(app: &App, frame: &mut Frame, area: Rect, theme: Theme) {
    let w = area.width as usize;
    let s = &app.session;
    let mut lines: Vec<Line<'static>> = Vec::new();
    let goal = match app.goal {
        Goal::BestGuess => "no best guess above your alert level",
        Goal::RealValue => "your real values not guessable above your alert level",
    };
    let method = match app.method {
        Method::Exact => "exact",
        Method::Greedy => "quick",
    };
    lines.push(fit(
        Line::from(vec![
            Span::styled("  Goal: ", theme.dim()),
            Span::styled(goal, theme.title()),
            Span::styled(format!(" · method: {method}"), theme.dim()),
        ]),
        w,
    ));
    let ready = match &app.plan {
        PlanState::Ready { result, .. } => Some(result.as_ref()),
        _ => None,
    };
    lines.extend(status_lines(app, w, theme).into_iter().map(|l| fit(l, w)));

    let label_w = 18.min(w / 4);
    let col_w = (w.saturating_sub(label_w + 4 + 7 + 2) / 2).max(10);
    lines.push(Line::from(vec![
        Span::raw("  "),
        cell("attribute", label_w, theme.dim()),
        cell_right("alert", 6, theme.dim()),
        Span::raw("  "),
        cell("now", col_w, theme.dim()),
        cell("with the plan", col_w, theme.dim()),
    ]));
    for (a, attr) in s.priors.attributes.iter().enumerate() {
        let selected = a == app.plan_cursor;
        let protect = match app.goal {
            Goal::RealValue => s.real_value(a),
            Goal::BestGuess => None,
        };
        let target = s.target(a);
        let describe = |probs: &[f64], best: usize| -> (String, Level) {
            match protect {
                Some(v) => {
                    let p = probs[v];
                    let lv = if p > target {
                        Level::Exposed
                    } else {
                        Level::Quiet
                    };
                    (format!("yours {} {}", attr.values[v].label, percent(p)), lv)
                }
                None => {
                    let p = probs[best];
                    (
                        format!("{} {}", attr.values[best].label, percent(p)),
                        assess(attr, probs, target, &s.priors.rarity).level,
                    )
                }
            }
        };
        let tag_short = |lv| level_tag(lv).split(' ').next().unwrap_or("").to_string();
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
            cell_right(&percent(target), 6, theme.title()),
            Span::raw("  "),
            cell(
                &format!("{} {now_text}", tag_short(now_level)),
                col_w,
                theme.level(now_level),
            ),
        ];
        if let Some(after) = ready.and_then(|r| r.outcome.after.iter().find(|x| x.attribute == a)) {
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

    // The scrolling part.
    if let Some(r) = ready {
        let details = detail_lines(&r.report, w, theme);
        let room = (area.height as usize).saturating_sub(lines.len());
        let max_scroll = details.len().saturating_sub(room);
        let from = (app.plan_scroll as usize).min(max_scroll);
        let more_below = details.len() > from + room;
        let take = if more_below {
            room.saturating_sub(1)
        } else {
            room
        };
        lines.extend(details.into_iter().skip(from).take(take));
        if more_below {
            lines.push(Line::styled(
                "  … more below: PgDn".to_string(),
                theme.dim(),
            ));
        }
    }
    frame.render_widget(Paragraph::new(lines), area);
}

/// The items to hide with why, the coarse moves and the obstacles, as lines.
fn detail_lines(r: &PlanReport, w: usize, theme: Theme) -> Vec<Line<'static>> {
    let mut lines: Vec<Line<'static>> = Vec::new();
    let para = |lines: &mut Vec<Line<'static>>, text: &str, style| {
        for l in wrap(text, w.saturating_sub(4)) {
            lines.push(Line::styled(format!("  {l}"), style));
        }
    };
    if let Some(plan) = &r.plan
        && !plan.items.is_empty()
    {
        para(
            &mut lines,
            &format!(
                "Hide these {} (Enter hides them all, u undoes) — and why:",
                count(plan.count as f64)
            ),
            theme.title(),
        );
        let name_w = (w.saturating_sub(13) * 2 / 5).clamp(16, 44);
        let why_w = w.saturating_sub(4 + 7 + 1 + name_w + 1);
        for item in &plan.items {
            let why: Vec<String> = item
                .reasons
                .iter()
                .take(if why_w > 70 { 2 } else { 1 })
                .map(|x| {
                    telltale::reading::plan_reason(
                        &x.attribute_label,
                        &x.value_label,
                        x.bits,
                        (x.needed && why_w > 50).then_some(x.probability_if_shown),
                    )
                })
                .collect();
            lines.push(fit(
                Line::from(vec![
                    Span::raw("    "),
                    cell(&item.kind, 7, theme.dim()),
                    Span::raw(" "),
                    cell(&item.name, name_w, theme.title()),
                    Span::raw(" "),
                    Span::styled(why.join("; "), theme.dim()),
                ]),
                w,
            ));
        }
        lines.push(Line::raw(""));
    }
    if let Some(inf) = r.infeasible.as_ref().filter(|i| !i.is_empty()) {
        para(&mut lines, "What stands in the way:", theme.title());
        for b in &inf.blocked {
            let mut t = format!(
                "• {}: with everything you allow hidden, {} is still at {} (alert level {}).",
                b.attribute_label,
                b.value_label,
                percent(b.probability),
                percent(b.threshold)
            );
            if b.threshold * (b.values as f64) < 1.0 {
                t.push_str(&format!(
                    " With {} values some guess always has at least {}: raise the level with +.",
                    b.values,
                    percent(1.0 / b.values as f64)
                ));
            } else if b.prior_probability > b.threshold {
                t.push_str(&format!(
                    " Even with nothing visible the model gives {}: raise the level with +.",
                    percent(b.prior_probability)
                ));
            }
            if !b.kept_items.is_empty() {
                let names: Vec<&str> = b
                    .kept_items
                    .iter()
                    .take(3)
                    .map(|(n, _)| n.as_str())
                    .collect();
                t.push_str(&format!(
                    " Items you keep that give it away: {}.",
                    names.join(", ")
                ));
            }
            para(&mut lines, &t, theme.warning());
        }
        for (x, y) in &inf.conflicts {
            let label = |id: &String| {
                r.attributes
                    .iter()
                    .find(|a| &a.id == id)
                    .map_or(id.clone(), |a| a.label.clone())
            };
            para(
                &mut lines,
                &format!(
                    "• {} and {} can each be met alone, but not together.",
                    label(x),
                    label(y)
                ),
                theme.warning(),
            );
        }
        lines.push(Line::raw(""));
    }
    if !r.coarse_moves.is_empty() {
        para(&mut lines, "What the usual advice would do:", theme.title());
        let plan_n = r.plan.as_ref().map(|p| p.count);
        for m in &r.coarse_moves {
            let mut t = if m.meets_all {
                format!("• To {}: every attribute under its level", m.description)
            } else {
                format!(
                    "• To {}: {} of {} under their levels",
                    m.description,
                    m.attributes_met,
                    telltale::reading::count(m.after.len(), "attribute", "attributes")
                )
            };
            if let Some(n) = plan_n
                && n > 0
                && m.hides > 0
            {
                t.push_str(&format!(" ({} hidden against the plan's {n})", m.hides));
            }
            t.push('.');
            para(&mut lines, &t, theme.dim());
        }
        lines.push(Line::raw(""));
    }
    let mut how = format!(
        "{} with evidence considered, {} without evidence left out, {} kept by you.",
        telltale::reading::count(r.search.candidates, "item", "items"),
        r.search.pruned,
        r.search.kept
    );
    match (r.greedy.count, r.greedy.excess_over_plan) {
        (Some(n), Some(x)) if x > 1e-9 => how.push_str(&format!(
            " The quick greedy method found {}, {} more.",
            count(n as f64),
            x.round()
        )),
        (Some(n), _) => how.push_str(&format!(
            " The quick greedy method found {} too.",
            count(n as f64)
        )),
        (None, _) => how.push_str(" The quick greedy method found no plan."),
    }
    para(&mut lines, &how, theme.dim());
    lines
}
