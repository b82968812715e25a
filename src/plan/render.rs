//! Plan reports as text (plain words, 80 columns) and Markdown. Both write to any
//! `io::Write`, so they are tested in memory; JSON is `serde_json` on [`PlanReport`].

use std::io::{self, Write};

use super::report::{AttrReport, PlanReport, RealValues, StateReport, YOUR_VALUE_ID, cost_words};
use crate::cautions::TITLE;
use crate::reading::percent;
use crate::text::{display_width, pad_to_width, wrap_words};

/// Write the JSON document (pretty-printed, newline-terminated).
pub fn write_json(r: &PlanReport, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, r)?;
    writeln!(out)
}

pub(super) fn state_words(s: &StateReport) -> String {
    match s.true_value_probability {
        Some(t) => format!(
            "{} {} (your value {})",
            s.guess_label,
            percent(s.probability),
            percent(t)
        ),
        None => format!("{} {}", s.guess_label, percent(s.probability)),
    }
}

/// Whether an attribute's real value was given and is kept out of the report.
pub(super) fn withheld(r: &PlanReport, a: &AttrReport) -> bool {
    a.true_value_given && r.real_values == RealValues::Withheld
}

/// The verdict on an attribute after the plan, in a word or two.
pub(super) fn verdict(r: &PlanReport, a: &AttrReport) -> &'static str {
    if withheld(r, a) {
        "aimed at your value"
    } else if a.after.meets {
        "ok"
    } else {
        "STILL OVER"
    }
}

/// A figure, or words in its place when it was withheld (NaN: a real value's own).
pub(super) fn figure_or(p: f64, withheld: &str) -> String {
    if p.is_nan() {
        withheld.to_string()
    } else {
        percent(p)
    }
}

pub(super) fn why(r: &PlanReport, i: usize) -> String {
    let Some(plan) = &r.plan else {
        return String::new();
    };
    plan.items[i]
        .reasons
        .iter()
        .take(2)
        .map(|x| {
            crate::reading::plan_reason(
                &x.attribute_label,
                &x.value_label,
                x.bits,
                (x.needed && x.value != YOUR_VALUE_ID).then_some(x.probability_if_shown),
            )
        })
        .collect::<Vec<_>>()
        .join("; ")
}

/// Write the text report.
pub fn write_text(r: &PlanReport, out: &mut dyn Write) -> io::Result<()> {
    if let Some(w) = &r.warning {
        writeln!(out, "{}\n", wrap_words(w, 78, ""))?;
    }
    writeln!(out, "telltale plan: what to hide")?;
    writeln!(
        out,
        "Archive    {} · reference {}{}",
        r.archive,
        r.priors,
        if r.priors_synthetic {
            " (synthetic: a fictional population)"
        } else {
            ""
        }
    )?;
    writeln!(out)?;
    writeln!(out, "{}", wrap_words(&r.summary, 78, ""))?;
    if let Some(plan) = &r.plan
        && !plan.items.is_empty()
    {
        writeln!(out, "\nITEMS TO HIDE")?;
        // Wide enough for the largest item number (plans can list thousands).
        let iw = plan.items.len().to_string().len().max(2);
        writeln!(
            out,
            "  {:>iw$}  {}  {}  Why (what it was feeding)",
            "#",
            pad_to_width("Item", 30),
            pad_to_width("Kind", 7)
        )?;
        for (i, h) in plan.items.iter().enumerate() {
            // A name is never cut (it is what the person looks for on the platform): one
            // too long for its column gets a line of its own, the rest goes below it.
            let lead = if display_width(&h.name) <= 30 {
                format!("  {:>iw$}  {}", i + 1, pad_to_width(&h.name, 30))
            } else {
                writeln!(out, "  {:>iw$}  {}", i + 1, h.name)?;
                " ".repeat(4 + iw + 30)
            };
            writeln!(out, "{lead}  {}  {}", pad_to_width(&h.kind, 7), why(r, i))?;
        }
        writeln!(
            out,
            "{}",
            wrap_words(crate::reading::PLAN_REASON_LEGEND, 78, "  ")
        )?;
    }
    writeln!(out, "\nBEFORE AND AFTER")?;
    for a in &r.attributes {
        writeln!(
            out,
            "  {}  {} → {}   alert level {}   {}",
            pad_to_width(&a.label, 18),
            state_words(&a.before),
            state_words(&a.after),
            percent(a.threshold),
            verdict(r, a)
        )?;
    }
    if !r.coarse_moves.is_empty() {
        writeln!(out, "\nWHAT THE USUAL ADVICE WOULD DO")?;
        let plan_count = r.plan.as_ref().map(|p| p.count);
        for m in &r.coarse_moves {
            let over: Vec<String> = m
                .after
                .iter()
                .filter(|(_, s)| !s.meets)
                .map(|(id, s)| {
                    let label = r
                        .attributes
                        .iter()
                        .find(|a| &a.id == id)
                        .map_or(id.as_str(), |a| a.label.as_str());
                    format!("{label} still {}", percent(s.probability))
                })
                .collect();
            let verdict = if m.meets_all {
                "every attribute under your alert levels".to_string()
            } else {
                format!(
                    "{} of {} under your alert levels ({})",
                    m.attributes_met,
                    crate::reading::count(m.after.len(), "attribute", "attributes"),
                    over.join(", ")
                )
            };
            let compare = match plan_count {
                Some(n) if n > 0 && m.hides > 0 => {
                    format!("; {} hidden against the plan's {}", m.hides, n)
                }
                _ => String::new(),
            };
            let line = format!("• To {}: {verdict}{compare}.", m.description);
            writeln!(out, "{}", wrap_words(&line, 76, "  "))?;
        }
    }
    if let Some(inf) = r.infeasible.as_ref().filter(|i| !i.is_empty()) {
        writeln!(out, "\nWHAT STANDS IN THE WAY")?;
        for b in &inf.blocked {
            let mut line = format!(
                "• {}: with everything you allow hidden, {} is at {} (alert level {}).",
                b.attribute_label,
                b.value_label,
                figure_or(b.probability, "a level over it"),
                percent(b.threshold)
            );
            if b.threshold * (b.values as f64) < 1.0 {
                line.push_str(&format!(
                    " With {} possible values some guess always has at least 1 chance in {}, so no alert level under {} can be met.",
                    b.values,
                    b.values,
                    percent(1.0 / b.values as f64)
                ));
            } else if b.prior_probability > b.threshold {
                line.push_str(&format!(
                    " Your alert level is below what the model gives with nothing visible at all ({}): raise it.",
                    percent(b.prior_probability)
                ));
            }
            if !b.kept_items.is_empty() {
                let names: Vec<String> = b
                    .kept_items
                    .iter()
                    .take(5)
                    .map(|(n, bits)| format!("{n} ({} bits)", crate::reading::signed_bits(*bits)))
                    .collect();
                line.push_str(&format!(
                    " Items you keep that give it away: {}.",
                    names.join(", ")
                ));
            }
            writeln!(out, "{}", wrap_words(&line, 76, "  "))?;
        }
        for (x, y) in &inf.conflicts {
            writeln!(
                out,
                "{}",
                wrap_words(
                    &format!(
                        "• {x} and {y} can each be met alone, but no set of hidden items meets both: hiding what helps one pushes the other over."
                    ),
                    76,
                    "  "
                )
            )?;
        }
    }
    writeln!(out, "\nHOW THIS WAS WORKED OUT")?;
    let mut lines = vec![format!(
        "{} with evidence {} considered ({} without evidence left out, {} kept visible by you).",
        crate::reading::count(r.search.candidates, "candidate", "candidates"),
        if r.search.candidates == 1 {
            "was"
        } else {
            "were"
        },
        r.search.pruned,
        r.search.kept
    )];
    match (r.greedy.count, r.greedy.excess_over_plan) {
        (Some(n), Some(x)) if x > 1e-9 => lines.push(format!(
            "The quick greedy method found a plan of {}, {} more than this one.",
            cost_words(n, r.greedy.cost.unwrap_or(n as f64)),
            if (x - x.round()).abs() < 1e-9 {
                format!("{x:.0}")
            } else {
                format!("{x:.2}")
            }
        )),
        (Some(n), _) => lines.push(format!(
            "The quick greedy method found a plan of {} as well.",
            cost_words(n, r.greedy.cost.unwrap_or(n as f64))
        )),
        (None, _) => lines.push("The quick greedy method found no plan.".into()),
    }
    if r.search.nodes > 0 {
        lines.push(format!(
            "The exact search (branch and bound) looked at {} in {:.2} s.",
            crate::reading::count(r.search.nodes as usize, "node", "nodes"),
            r.search.seconds
        ));
    }
    for l in lines {
        writeln!(out, "{}", wrap_words(&l, 76, "  "))?;
    }
    writeln!(out, "\n{}", TITLE.to_uppercase())?;
    for c in &r.cautions {
        writeln!(out, "{}", wrap_words(c, 76, "  "))?;
    }
    Ok(())
}

/// Escape text for Markdown.
fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        if matches!(
            c,
            '|' | '*' | '_' | '`' | '[' | ']' | '<' | '>' | '#' | '\\'
        ) {
            out.push('\\');
        }
        out.push(if c == '\n' { ' ' } else { c });
    }
    out
}

/// Write the Markdown report.
pub fn write_markdown(r: &PlanReport, out: &mut dyn Write) -> io::Result<()> {
    if let Some(w) = &r.warning {
        writeln!(out, "> **{}**\n", esc(w))?;
    }
    writeln!(out, "# What to hide in {}\n", esc(&r.archive))?;
    write_markdown_body(r, "##", out)?;
    writeln!(out, "\n## {}\n", TITLE)?;
    for c in &r.cautions {
        writeln!(out, "- {}", esc(c))?;
    }
    Ok(())
}

/// The plan as a section to append to another Markdown document (the explorer's
/// export): a level-2 heading, level-3 subsections, no cautions (the document has
/// them).
pub fn write_markdown_section(r: &PlanReport, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "\n## Hiding plan\n")?;
    write_markdown_body(r, "###", out)
}

fn write_markdown_body(r: &PlanReport, h: &str, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "{}\n", esc(&r.summary))?;
    if let Some(plan) = &r.plan
        && !plan.items.is_empty()
    {
        writeln!(out, "{h} Items to hide\n")?;
        writeln!(out, "| # | Item | Kind | Why |")?;
        writeln!(out, "|---:|---|---|---|")?;
        for (i, item) in plan.items.iter().enumerate() {
            writeln!(
                out,
                "| {} | {} | {} | {} |",
                i + 1,
                esc(&item.name),
                item.kind,
                esc(&why(r, i))
            )?;
        }
        writeln!(out)?;
    }
    writeln!(out, "{h} Before and after\n")?;
    writeln!(out, "| Attribute | Before | After | Alert level | Met |")?;
    writeln!(out, "|---|---|---|---:|---|")?;
    for a in &r.attributes {
        writeln!(
            out,
            "| {} | {} | {} | {} | {} |",
            esc(&a.label),
            esc(&state_words(&a.before)),
            esc(&state_words(&a.after)),
            percent(a.threshold),
            match verdict(r, a) {
                "ok" => "yes",
                "STILL OVER" => "no",
                other => other,
            }
        )?;
    }
    if !r.coarse_moves.is_empty() {
        writeln!(out, "\n{h} What the usual advice would do\n")?;
        writeln!(out, "| Move | Hidden | Attributes under the alert level |")?;
        writeln!(out, "|---|---:|---:|")?;
        for m in &r.coarse_moves {
            writeln!(
                out,
                "| {} | {} | {} of {} |",
                esc(&m.description),
                m.hides,
                m.attributes_met,
                m.after.len()
            )?;
        }
    }
    if let Some(inf) = r.infeasible.as_ref().filter(|i| !i.is_empty()) {
        writeln!(out, "\n{h} What stands in the way\n")?;
        for b in &inf.blocked {
            let kept: Vec<String> = b.kept_items.iter().take(5).map(|(n, _)| esc(n)).collect();
            writeln!(
                out,
                "- {}: {} at {} with everything allowed hidden (alert level {}; with nothing visible {}){}",
                esc(&b.attribute_label),
                esc(&b.value_label),
                figure_or(b.probability, "over it"),
                percent(b.threshold),
                figure_or(b.prior_probability, "not shown"),
                if kept.is_empty() {
                    String::new()
                } else {
                    format!("; kept items giving it away: {}", kept.join(", "))
                }
            )?;
        }
        for (x, y) in &inf.conflicts {
            writeln!(out, "- {} and {} cannot be met together.", esc(x), esc(y))?;
        }
    }
    Ok(())
}
