//! The text report: readable at 80 columns, coloured only when asked (the caller
//! decides from the terminal and `NO_COLOR`), and meaningful without colour (levels are
//! also written as words).

use std::io::{self, Write};

use super::build::ScanReport;
use crate::cautions::TITLE;
use crate::reading::{count, percent, rarity_note};
use crate::text::{display_width, pad_to_width, truncate_to_width, wrap_words};

/// How to render text.
#[derive(Debug, Clone, Copy)]
pub struct TextOptions {
    /// Use ANSI colours and bold.
    pub colour: bool,
    /// How many item rows to show.
    pub top: usize,
}

impl Default for TextOptions {
    fn default() -> Self {
        TextOptions {
            colour: false,
            top: 15,
        }
    }
}

struct Paint(bool);

impl Paint {
    fn wrap(&self, code: &str, s: &str) -> String {
        if self.0 {
            format!("\x1b[{code}m{s}\x1b[0m")
        } else {
            s.to_string()
        }
    }
    fn bold(&self, s: &str) -> String {
        self.wrap("1", s)
    }
    fn dim(&self, s: &str) -> String {
        self.wrap("2", s)
    }
    fn level(&self, level: &str) -> String {
        let code = match level {
            "exposed" => "1;31",
            "leaning" => "33",
            _ => "32",
        };
        self.wrap(code, &level.to_uppercase())
    }
}

/// A bar of `width` cells: filled to `p`, with a `|` at the base rate.
fn bar(p: f64, base: f64, width: usize) -> String {
    let filled = (p.clamp(0.0, 1.0) * width as f64).round() as usize;
    let mark = ((base.clamp(0.0, 1.0) * width as f64).round() as usize).min(width - 1);
    (0..width)
        .map(|i| {
            if i == mark {
                '|'
            } else if i < filled {
                '█'
            } else {
                '·'
            }
        })
        .collect()
}

/// Write the text report.
pub fn write_text(r: &ScanReport, opts: TextOptions, out: &mut dyn Write) -> io::Result<()> {
    let p = Paint(opts.colour);
    if let Some(w) = &r.warning {
        writeln!(out, "{}\n", p.bold(&wrap_words(w, 78, "")))?;
    }
    writeln!(out, "{}", p.bold("telltale: what your archive gives away"))?;
    writeln!(
        out,
        "Archive    {} · {} · {}",
        r.archive.name,
        r.archive.items_phrase(),
        count(r.archive.friends, "friend", "friends")
    )?;
    writeln!(
        out,
        "Reference  {} · {}{} · {} of {} matched",
        r.priors.name,
        r.priors.source,
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
            "Hidden     {} treated as hidden",
            count(r.archive.hidden, "item", "items")
        )?;
    }
    writeln!(out)?;

    writeln!(out, "{}", p.bold("WHAT AN OBSERVER COULD GUESS"))?;
    for a in &r.attributes {
        writeln!(
            out,
            "  {} {} {:>4}  {}  {}",
            pad_to_width(&a.label, 18),
            pad_to_width(&a.best_guess_label, 16),
            percent(a.probability),
            bar(a.probability, a.base_rate, 20),
            p.level(&a.level),
        )?;
        let detail = format!(
            "population rate {} · alert level {} · {}",
            percent(a.base_rate),
            percent(a.threshold),
            crate::reading::fed_by(a.feeding)
        );
        writeln!(out, "{}", p.dim(&format!("    {detail}")))?;
        writeln!(out, "{}", wrap_words(&a.reading, 74, "    "))?;
    }
    writeln!(
        out,
        "{}",
        p.dim("  (bar: █ the guess's probability, | the population rate)")
    )?;
    writeln!(out, "{}", wrap_words(&rarity_note(&r.rarity), 76, "  "))?;
    writeln!(out)?;

    let shown: Vec<_> = r
        .items
        .iter()
        .filter(|i| i.contribution_bits > 0.0)
        .take(opts.top)
        .collect();
    writeln!(out, "{}", p.bold("ITEMS THAT GIVE THE MOST AWAY"))?;
    if shown.is_empty() {
        writeln!(
            out,
            "  None of your items matched the reference statistics, so none points to a guess."
        )?;
    } else {
        writeln!(
            out,
            "{}",
            p.dim(&format!(
                "  {:>2}  {} {} {} {:>5} {:>6} {:>7}",
                "#",
                pad_to_width("Item", 28),
                pad_to_width("Kind", 7),
                pad_to_width("Points to", 22),
                "Bits",
                "Homog.",
                "Adds"
            ))
        )?;
        for (n, i) in shown.iter().enumerate() {
            let attr_label = r
                .attributes
                .iter()
                .find(|a| *a.id == *i.attribute)
                .map(|a| a.label.as_str())
                .unwrap_or(&i.attribute);
            // A name is never cut (it is what the person looks for on the platform): one
            // too long for its column gets a line of its own, the figures go below it.
            let lead = if display_width(&i.name) <= 28 {
                format!("  {:>2}  {}", n + 1, pad_to_width(&i.name, 28))
            } else {
                writeln!(out, "  {:>2}  {}", n + 1, i.name)?;
                " ".repeat(6 + 28)
            };
            writeln!(
                out,
                "{lead} {} {} {:>5.2} {:>6.2} {:>7}",
                pad_to_width(i.kind, 7),
                pad_to_width(
                    &truncate_to_width(&format!("{attr_label}: {}", i.reveals_label), 22),
                    22
                ),
                i.bits,
                i.homogeneity,
                crate::reading::signed_bits(i.contribution_bits)
            )?;
            if i.source != "priors" {
                writeln!(
                    out,
                    "{}",
                    p.dim(&format!(
                        "      ↳ {}",
                        truncate_to_width(&i.source_detail, 72)
                    ))
                )?;
            }
        }
        writeln!(
            out,
            "{}",
            p.dim(&format!(
                "{}\n  ↳ evidence from a word list or from friends rather than the reference table.",
                crate::reading::ITEM_FIGURES
                    .iter()
                    .map(|(name, meaning)| wrap_words(&format!("{name}: {meaning}."), 76, "  "))
                    .collect::<Vec<_>>()
                    .join("\n")
            ))
        )?;
    }
    if !r.unmatched.is_empty() {
        writeln!(
            out,
            "  {}{}.",
            r.unmatched_sentence(),
            if r.unmatched.len() <= 3 {
                format!(
                    ": {}",
                    r.unmatched
                        .iter()
                        .map(|u| truncate_to_width(&u.name, 30))
                        .collect::<Vec<_>>()
                        .join("; ")
                )
            } else {
                " (--format json lists them)".to_string()
            }
        )?;
    }
    writeln!(out)?;

    write_sources(r, &p, out)?;
    write_special(r, &p, opts.top, out)?;
    write_friends(r, &p, out)?;

    if !r.warnings.is_empty() {
        writeln!(
            out,
            "{}",
            p.bold(&format!("WARNINGS ({})", r.warnings.len()))
        )?;
        for w in r.warnings.iter().take(20) {
            writeln!(out, "  - {w}")?;
        }
        if r.warnings.len() > 20 {
            writeln!(
                out,
                "  … {} more (use --format json for all)",
                r.warnings.len() - 20
            )?;
        }
        writeln!(out)?;
    }

    writeln!(out, "{}", p.bold(&TITLE.to_uppercase()))?;
    for c in &r.cautions {
        writeln!(out, "{}", wrap_words(c, 76, "  "))?;
    }
    Ok(())
}

fn write_sources(r: &ScanReport, p: &Paint, out: &mut dyn Write) -> io::Result<()> {
    if r.sources.is_empty() {
        return Ok(());
    }
    writeln!(out, "{}", p.bold("EVIDENCE SOURCES"))?;
    for s in &r.sources {
        let on = if s.id == "friends" {
            "the friend list".to_string()
        } else {
            count(s.subjects, "item", "items")
        };
        writeln!(
            out,
            "  {} {:>4} {} on {}, {:+.1} bits toward the guesses",
            pad_to_width(&s.label, 22),
            s.pieces,
            if s.pieces == 1 { "piece" } else { "pieces" },
            on,
            s.bits_toward_guesses
        )?;
        writeln!(out, "{}", p.dim(&wrap_words(&s.provenance, 72, "    ")))?;
        for n in &s.notes {
            writeln!(out, "{}", wrap_words(&format!("- {n}"), 72, "    "))?;
        }
    }
    writeln!(out)?;
    Ok(())
}

/// What the special-category list counts, in every format.
pub(super) const SPECIAL_ITEM: (&str, &str) = ("special-category item", "special-category items");

fn write_special(r: &ScanReport, p: &Paint, top: usize, out: &mut dyn Write) -> io::Result<()> {
    let Some(sp) = &r.special_categories else {
        return Ok(());
    };
    writeln!(
        out,
        "{}",
        p.bold("SPECIAL CATEGORIES OF PERSONAL DATA (GDPR ARTICLE 9)")
    )?;
    let counts: Vec<String> = sp
        .counts
        .iter()
        .map(|c| format!("{} {}", c.category, c.items))
        .collect();
    writeln!(out, "{}", wrap_words(&counts.join(" · "), 74, "  "))?;
    let (shown, more) = super::cut_list(sp.items.len(), top, SPECIAL_ITEM);
    for i in &sp.items[..shown] {
        writeln!(out, "  - {} ({})", truncate_to_width(&i.name, 60), i.kind)?;
        writeln!(
            out,
            "{}",
            p.dim(&format!(
                "      {}",
                truncate_to_width(
                    &format!("{}: {}", i.categories.join(", "), i.terms.join(", ")),
                    70
                )
            ))
        )?;
    }
    if let Some(more) = more {
        writeln!(out, "{}", wrap_words(&more, 74, "  "))?;
    }
    writeln!(
        out,
        "{}",
        p.dim(&wrap_words(
            "These items touch data the law treats with special care, whether or not they change a guess above.",
            74,
            "  "
        ))
    )?;
    writeln!(out)?;
    Ok(())
}

fn write_friends(r: &ScanReport, p: &Paint, out: &mut dyn Write) -> io::Result<()> {
    let Some(f) = &r.friends else {
        return Ok(());
    };
    writeln!(out, "{}", p.bold("FRIENDS"))?;
    let label = |id: &str| -> (String, Option<&super::build::AttributeReport>) {
        let a = r.attributes.iter().find(|a| a.id == id);
        (a.map(|a| a.label.clone()).unwrap_or_else(|| id.into()), a)
    };
    let value = |a: Option<&super::build::AttributeReport>, v: &str| -> String {
        a.and_then(|a| a.distribution.iter().find(|d| d.id == v))
            .map(|d| d.label.clone())
            .unwrap_or_else(|| v.into())
    };
    let known: Vec<String> = f
        .attributes
        .iter()
        .map(|a| {
            format!(
                "{} {} ({})",
                label(&a.attribute).0.to_lowercase(),
                a.known,
                percent(a.share_known)
            )
        })
        .collect();
    writeln!(
        out,
        "{}",
        wrap_words(
            &format!(
                "{}; attributes known: {}.",
                count(f.total, "friend", "friends"),
                known.join(", ")
            ),
            74,
            "  "
        )
    )?;
    writeln!(
        out,
        "  {}",
        if f.hidden {
            "Your friend list is treated as private. If you showed it again:"
        } else {
            "If you made your friend list private:"
        }
    )?;
    for a in &f.attributes {
        let (name, attr) = label(&a.attribute);
        writeln!(
            out,
            "    {} {} {} → {} {}",
            pad_to_width(&name, 18),
            pad_to_width(&value(attr, &a.best_guess), 16),
            percent(a.probability),
            value(attr, &a.best_guess_if_toggled),
            percent(a.probability_if_toggled)
        )?;
    }
    writeln!(out)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::bar;

    #[test]
    fn bar_marks_probability_and_base() {
        assert_eq!(bar(0.5, 0.1, 10), "█|███·····");
        assert_eq!(bar(0.0, 0.0, 4), "|···");
        assert_eq!(bar(1.0, 1.0, 4), "███|");
    }
}
