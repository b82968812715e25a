//! The Markdown report: a document a person can keep, print or open in any editor.

use std::io::{self, Write};

use super::build::ScanReport;
use crate::cautions::TITLE;
use crate::reading::{count, percent, rarity_note};

/// Escape text for a Markdown table cell or line.
fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        if matches!(
            c,
            '|' | '*' | '_' | '`' | '[' | ']' | '<' | '>' | '#' | '\\'
        ) {
            out.push('\\');
        }
        if c == '\n' {
            out.push(' ');
        } else {
            out.push(c);
        }
    }
    out
}

/// Write the Markdown report; `top` limits the item table.
pub fn write_markdown(r: &ScanReport, top: usize, out: &mut dyn Write) -> io::Result<()> {
    if let Some(w) = &r.warning {
        writeln!(out, "> **{}**\n", esc(w))?;
    }
    writeln!(out, "# What {} gives away\n", esc(&r.archive.name))?;
    writeln!(
        out,
        "Made by telltale {} on this computer. Archive fingerprint `{}`.\n",
        r.tool.version, r.archive.fingerprint
    )?;
    writeln!(
        out,
        "- **Archive:** {}, {}\n- **Reference statistics:** {} — {}{}; {} of {} matched",
        esc(&r.archive.items_phrase()),
        count(r.archive.friends, "friend", "friends"),
        esc(&r.priors.name),
        esc(&r.priors.source),
        if r.priors.synthetic {
            " (synthetic: a fictional population)"
        } else {
            ""
        },
        r.priors.items_matched,
        count(r.archive.items, "item", "items")
    )?;
    if r.archive.hidden > 0 {
        writeln!(
            out,
            "- **Treated as hidden:** {}",
            count(r.archive.hidden, "item", "items")
        )?;
    }
    writeln!(out)?;

    writeln!(out, "## What an observer could guess\n")?;
    writeln!(
        out,
        "| Attribute | Best guess | Probability | Population rate | Alert level | Status |"
    )?;
    writeln!(out, "|---|---|---:|---:|---:|---|")?;
    for a in &r.attributes {
        writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} |",
            esc(&a.label),
            esc(&a.best_guess_label),
            percent(a.probability),
            percent(a.base_rate),
            percent(a.threshold),
            a.level
        )?;
    }
    writeln!(out)?;
    for a in &r.attributes {
        writeln!(out, "- **{}:** {}", esc(&a.label), esc(&a.reading))?;
    }
    writeln!(out)?;
    writeln!(out, "{}\n", esc(&rarity_note(&r.rarity)))?;

    writeln!(out, "## Items that give the most away\n")?;
    let shown: Vec<_> = r
        .items
        .iter()
        .filter(|i| i.contribution_bits > 0.0)
        .take(top)
        .collect();
    if shown.is_empty() {
        writeln!(out, "No item matched the reference statistics.\n")?;
    } else {
        writeln!(
            out,
            "| # | Item | Kind | Points to | Bits | Homogeneity | Adds (bits) | If hidden | Source |"
        )?;
        writeln!(out, "|---:|---|---|---|---:|---:|---:|---:|---|")?;
        for (n, i) in shown.iter().enumerate() {
            let attr_label = r
                .attributes
                .iter()
                .find(|a| *a.id == *i.attribute)
                .map(|a| a.label.as_str())
                .unwrap_or(&i.attribute);
            writeln!(
                out,
                "| {} | {} | {} | {}: {} | {:.2} | {:.2} | {} | {} | {} |",
                n + 1,
                esc(&i.name),
                i.kind,
                esc(attr_label),
                esc(&i.reveals_label),
                i.bits,
                i.homogeneity,
                crate::reading::signed_bits(i.contribution_bits),
                crate::reading::hidden_change_points(i.if_hidden_drop),
                esc(&i.source_detail)
            )?;
        }
        writeln!(
            out,
            "\n{}\n",
            crate::reading::ITEM_FIGURES
                .iter()
                .map(|(name, meaning)| format!("*{name}*: {}.", esc(meaning)))
                .collect::<Vec<_>>()
                .join(" ")
        )?;
    }

    if !r.unmatched.is_empty() {
        writeln!(out, "{}.\n", r.unmatched_sentence())?;
    }
    write_sources(r, out)?;
    write_special(r, top, out)?;
    write_friends(r, out)?;

    if !r.warnings.is_empty() {
        writeln!(out, "## Warnings\n")?;
        for w in &r.warnings {
            writeln!(out, "- {}", esc(w))?;
        }
        writeln!(out)?;
    }
    writeln!(out, "## {TITLE}\n")?;
    for c in &r.cautions {
        writeln!(out, "- {}", esc(c))?;
    }
    Ok(())
}

fn write_sources(r: &ScanReport, out: &mut dyn Write) -> io::Result<()> {
    if r.sources.is_empty() {
        return Ok(());
    }
    writeln!(out, "## Evidence sources\n")?;
    writeln!(
        out,
        "| Source | Pieces | Items | Bits toward the guesses | Provenance |"
    )?;
    writeln!(out, "|---|---:|---:|---:|---|")?;
    for s in &r.sources {
        writeln!(
            out,
            "| {} | {} | {} | {:+.2} | {} |",
            esc(&s.label),
            s.pieces,
            if s.id == "friends" {
                "friend list".to_string()
            } else {
                s.subjects.to_string()
            },
            s.bits_toward_guesses,
            esc(&s.provenance)
        )?;
    }
    writeln!(out)?;
    for s in &r.sources {
        for n in &s.notes {
            writeln!(out, "- **{}:** {}", esc(&s.label), esc(n))?;
        }
    }
    writeln!(out)?;
    Ok(())
}

fn write_special(r: &ScanReport, top: usize, out: &mut dyn Write) -> io::Result<()> {
    let Some(sp) = &r.special_categories else {
        return Ok(());
    };
    writeln!(
        out,
        "## Special categories of personal data (GDPR Article 9)\n"
    )?;
    for c in &sp.counts {
        writeln!(
            out,
            "- {}: {}",
            esc(&c.category),
            count(c.items, "item", "items")
        )?;
    }
    let (shown, more) = super::cut_list(sp.items.len(), top, super::text::SPECIAL_ITEM);
    writeln!(out, "\n| Item | Kind | Categories | Words |")?;
    writeln!(out, "|---|---|---|---|")?;
    for i in &sp.items[..shown] {
        writeln!(
            out,
            "| {} | {} | {} | {} |",
            esc(&i.name),
            i.kind,
            esc(&i.categories.join(", ")),
            esc(&i.terms.join(", "))
        )?;
    }
    if let Some(more) = more {
        writeln!(out, "\n{}", esc(&more))?;
    }
    writeln!(
        out,
        "\nThese items touch data the law treats with special care, whether or not they change a guess above.\n"
    )?;
    Ok(())
}

fn write_friends(r: &ScanReport, out: &mut dyn Write) -> io::Result<()> {
    let Some(f) = &r.friends else {
        return Ok(());
    };
    writeln!(out, "## Friends\n")?;
    writeln!(
        out,
        "{} (names are never shown). {}\n",
        count(f.total, "friend", "friends"),
        if f.hidden {
            "The friend list is treated as private; the last columns show it visible again."
        } else {
            "The last columns show the guesses with the friend list private."
        }
    )?;
    writeln!(
        out,
        "| Attribute | Friends known | Best guess now | If toggled |"
    )?;
    writeln!(out, "|---|---:|---|---|")?;
    for a in &f.attributes {
        writeln!(
            out,
            "| {} | {} ({}) | {} {} | {} {} |",
            esc(&r.attribute_label(&a.attribute)),
            a.known,
            percent(a.share_known),
            esc(&r.value_label(&a.attribute, &a.best_guess)),
            percent(a.probability),
            esc(&r.value_label(&a.attribute, &a.best_guess_if_toggled)),
            percent(a.probability_if_toggled)
        )?;
    }
    writeln!(out)?;
    Ok(())
}
