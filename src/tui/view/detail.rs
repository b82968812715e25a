//! One item in detail: what hiding it would change, then each attribute it tells
//! about — members against everyone as a chart, homogeneity, information, source.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;
use telltale::decisions::Mark;
use telltale::evidence::Subject;
use telltale::reading::percent;
use telltale::whatif::item_detail;

use super::widgets::{cell, cell_right, date, fit, share_bar, wrap};
use crate::tui::app::App;
use crate::tui::theme::Theme;

/// Values shown per chart before "others".
const CHART_VALUES: usize = 6;

/// The detail's lines (also used to bound scrolling).
pub fn lines(app: &App, subject: Subject, width: u16, theme: Theme) -> Vec<Line<'static>> {
    let w = width as usize;
    let d = item_detail(&app.session, subject);
    let mut out: Vec<Line<'static>> = Vec::new();
    let state = match d.mark {
        Some(Mark::Hide) => ("hidden (what-if)", theme.hidden()),
        Some(Mark::Keep) => ("visible · must keep", theme.kept()),
        None => ("visible", theme.dim()),
    };
    for l in wrap(&d.name, w.saturating_sub(2)).into_iter().take(3) {
        out.push(Line::from(vec![
            Span::raw("  "),
            Span::styled(l, theme.title()),
        ]));
    }
    let mut facts = vec![d.kind.clone()];
    if let Some(c) = &d.category {
        facts.push(c.clone());
    }
    if let Some(t) = d.date {
        facts.push(date(t));
    }
    out.push(fit(
        Line::from(vec![
            Span::raw("  "),
            Span::styled(facts.join(" · "), theme.dim()),
            Span::raw("  "),
            Span::styled(format!("[{}]", state.0), state.1),
        ]),
        w,
    ));
    if let Some(o) = &d.origin {
        out.push(fit(
            Line::styled(format!("  read from {o}"), theme.dim()),
            w,
        ));
    }
    out.push(Line::raw(""));
    if d.evidence.is_empty() {
        out.push(Line::raw(
            "  This item matched nothing in the reference statistics, so it gives nothing away here.",
        ));
        return out.into_iter().map(|l| fit(l, w)).collect();
    }

    let hidden = d.mark == Some(Mark::Hide);
    out.push(Line::styled(
        if hidden {
            "  If you showed it again"
        } else {
            "  If you hid it"
        },
        theme.title(),
    ));
    let mut hardly = false;
    for c in &d.changes {
        let then = if c.then_guess == c.now_guess
            && percent(c.then_probability) == percent(c.now_probability)
        {
            hardly = true;
            format!(
                "{} {} (hardly moves)",
                c.then_guess,
                percent(c.then_probability)
            )
        } else if c.then_guess == c.now_guess {
            format!("{} {}", c.then_guess, percent(c.then_probability))
        } else {
            format!(
                "{} {} (the guess changes)",
                c.then_guess,
                percent(c.then_probability)
            )
        };
        let mut text = format!(
            "{}: {} {} → {}",
            c.label,
            c.now_guess,
            percent(c.now_probability),
            then
        );
        if let Some((label, now, then)) = &c.real {
            text.push_str(&format!(
                " · your real value {label}: {} → {}",
                percent(*now),
                percent(*then)
            ));
        }
        out.push(fit(Line::raw(format!("    {text}")), w));
    }
    if hardly {
        for l in wrap(
            "Hardly moves: other visible items say the same, so this one alone barely changes the guess.",
            w.saturating_sub(6),
        ) {
            out.push(Line::styled(format!("    {l}"), theme.dim()));
        }
    }
    let key_hide = crate::tui::keys::key_label(
        crate::tui::keys::Action::ToggleHide,
        crate::tui::keys::Place::Detail,
    )
    .unwrap_or_default();
    out.push(fit(
        Line::styled(
            format!(
                "    ({key_hide} {} it; nothing leaves this computer)",
                if hidden { "shows" } else { "hides" }
            ),
            theme.dim(),
        ),
        w,
    ));

    let label_w = 14.min(w / 5);
    let bar_w = (w.saturating_sub(label_w + 4 + 2 * 6 + 4) / 2).clamp(4, 30);
    // Most telling first. An item may hold several pieces about one attribute (the
    // reference table's and a place name's about the home region): they sit together,
    // and the figure, which is the item's for the attribute with all its pieces, is
    // given once, on the first.
    let mut evidence: Vec<_> = d.evidence.iter().collect();
    evidence.sort_by(|a, b| {
        b.contribution_bits
            .total_cmp(&a.contribution_bits)
            .then(a.attribute.cmp(&b.attribute))
    });
    let pieces_about = |a: usize| d.evidence.iter().filter(|e| e.attribute == a).count();
    let mut headed: Vec<usize> = Vec::new();
    for ev in evidence {
        out.push(Line::raw(""));
        let n = pieces_about(ev.attribute);
        let phrase = if headed.contains(&ev.attribute) {
            format!(
                "another piece of evidence about it, from {}; counted in the figure above",
                source_words(ev.source)
            )
        } else {
            headed.push(ev.attribute);
            let effect = telltale::reading::effect_phrase(&ev.leaning_label, ev.contribution_bits);
            if n > 1 {
                format!(
                    "{effect} ({} together; this one from {})",
                    telltale::reading::count(n, "piece of evidence", "pieces of evidence"),
                    source_words(ev.source)
                )
            } else {
                effect
            }
        };
        out.push(fit(
            Line::from(vec![
                Span::styled(format!("  {}", ev.attribute_label), theme.title()),
                Span::raw(format!(" — {phrase}")),
            ]),
            w,
        ));
        out.push(fit(
            Line::styled(
                format!(
                    "    homogeneity {:.2} · information {:.2} bits{}",
                    ev.homogeneity,
                    ev.info_bits,
                    support_words(ev.source, ev.support)
                ),
                theme.dim(),
            ),
            w,
        ));
        out.push(fit(
            Line::styled(
                format!("    source: {} ({})", ev.source_detail, ev.source),
                theme.dim(),
            ),
            w,
        ));
        out.push(fit(
            Line::from(vec![
                Span::raw("    "),
                cell("", label_w, theme.dim()),
                Span::raw(" "),
                cell("its members", bar_w + 6, theme.dim()),
                Span::raw(" "),
                cell("everyone", bar_w + 6, theme.dim()),
            ]),
            w,
        ));
        // Both columns on one scale: the largest share shown fills the bar.
        let scale = ev
            .bars
            .iter()
            .take(CHART_VALUES)
            .map(|b| b.members.max(b.everyone))
            .fold(0.0, f64::max)
            .max(1e-9);
        let mut others = (0.0, 0.0, 0usize);
        for (k, b) in ev.bars.iter().enumerate() {
            if k >= CHART_VALUES {
                others.0 += b.members;
                others.1 += b.everyone;
                others.2 += 1;
                continue;
            }
            out.push(fit(
                Line::from(vec![
                    Span::raw("    "),
                    cell(&b.label, label_w, ratatui::style::Style::default()),
                    Span::raw(" "),
                    Span::styled(share_bar(b.members / scale, bar_w, '█'), theme.bar()),
                    cell_right(&percent(b.members), 6, theme.title()),
                    Span::raw(" "),
                    Span::styled(share_bar(b.everyone / scale, bar_w, '▒'), theme.dim()),
                    cell_right(&percent(b.everyone), 6, theme.dim()),
                ]),
                w,
            ));
        }
        if others.2 > 0 {
            out.push(fit(
                Line::styled(
                    format!(
                        "    {}: members {}, everyone {}",
                        telltale::reading::count(others.2, "other value", "other values"),
                        percent(others.0),
                        percent(others.1)
                    ),
                    theme.dim(),
                ),
                w,
            ));
        }
    }
    out.push(Line::raw(""));
    // The reports' legend wording (one place: [`telltale::reading::ITEM_FIGURES`]).
    let legend = format!(
        "Homogeneity: {}. Information: {}. Adds: {}. Bars share one scale per chart: the \
         largest share fills it.",
        telltale::reading::item_figure("Homogeneity"),
        telltale::reading::item_figure("Bits"),
        telltale::reading::item_figure("Adds"),
    );
    for l in wrap(&legend, w.saturating_sub(4)) {
        out.push(Line::styled(format!("  {l}"), theme.dim()));
    }
    out
}

pub fn render(app: &App, subject: Subject, frame: &mut Frame, area: Rect, theme: Theme) {
    let lines = lines(app, subject, area.width, theme);
    let max_scroll = lines.len().saturating_sub(area.height as usize) as u16;
    let scroll = app.detail_scroll.min(max_scroll);
    frame.render_widget(Paragraph::new(lines).scroll((scroll, 0)), area);
}

/// Where a piece of evidence comes from, in words ("the reference table").
fn source_words(source: &str) -> &'static str {
    match source {
        "priors" => "the reference table",
        "lexicon" => "the word lists",
        "friends" => "your friend list",
        "mark" => "your own marking",
        _ => "another source",
    }
}

/// What stands behind a piece of evidence, in words: members counted in the reference
/// table, friends whose value is known; nothing for a word-list rule.
fn support_words(source: &str, support: f64) -> String {
    let n = support.round();
    let plural = if n == 1.0 { "" } else { "s" };
    match source {
        "priors" => format!(" · {n:.0} member{plural} counted"),
        "friends" => format!(" · {n:.0} friend{plural} with a known value"),
        _ => String::new(),
    }
}
