//! The HTML report's sections after the item table, the same as the text and Markdown
//! reports give: items no source recognises, the evidence sources, the special
//! categories of personal data (GDPR Article 9) and the friend list. Long lists sit in
//! a `<details>` element, so the page opens short, and are cut as in every format
//! (`super::cut`).

use std::io::{self, Write};

use super::build::ScanReport;
use super::html::escape;
use crate::reading::{count, percent};

/// Write every section that has something to say.
pub(super) fn write_after_items(r: &ScanReport, top: usize, out: &mut dyn Write) -> io::Result<()> {
    if !r.unmatched.is_empty() {
        writeln!(
            out,
            "<p class=\"note\">{}.</p>",
            escape(&r.unmatched_sentence())
        )?;
    }
    write_sources(r, out)?;
    write_special(r, top, out)?;
    write_friends(r, out)
}

fn write_sources(r: &ScanReport, out: &mut dyn Write) -> io::Result<()> {
    if r.sources.is_empty() {
        return Ok(());
    }
    writeln!(out, "<h2>Evidence sources</h2>")?;
    writeln!(
        out,
        "<div class=\"scroll wide\"><table>\n<thead><tr><th>Source</th><th class=\"n\">Pieces</th><th class=\"n\">Items</th>\
         <th class=\"n\">Bits toward the guesses</th><th>Provenance</th></tr></thead>\n<tbody>"
    )?;
    for s in &r.sources {
        writeln!(
            out,
            "<tr><td>{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td><td class=\"n\">{:+.2}</td><td>{}</td></tr>",
            escape(&s.label),
            s.pieces,
            if s.id == "friends" {
                "friend list".to_string()
            } else {
                s.subjects.to_string()
            },
            s.bits_toward_guesses,
            escape(&s.provenance)
        )?;
    }
    writeln!(out, "</tbody></table></div>")?;
    let notes: Vec<_> = r
        .sources
        .iter()
        .flat_map(|s| s.notes.iter().map(move |n| (s, n)))
        .collect();
    if !notes.is_empty() {
        writeln!(out, "<ul>")?;
        for (s, n) in notes {
            writeln!(out, "<li><b>{}:</b> {}</li>", escape(&s.label), escape(n))?;
        }
        writeln!(out, "</ul>")?;
    }
    Ok(())
}

fn write_special(r: &ScanReport, top: usize, out: &mut dyn Write) -> io::Result<()> {
    let Some(sp) = &r.special_categories else {
        return Ok(());
    };
    writeln!(
        out,
        "<h2>Special categories of personal data (GDPR Article 9)</h2>\n<ul>"
    )?;
    for c in &sp.counts {
        writeln!(
            out,
            "<li>{}: {}</li>",
            escape(&c.category),
            count(c.items, "item", "items")
        )?;
    }
    writeln!(out, "</ul>")?;
    let (shown, more) = super::cut_list(sp.items.len(), top, super::text::SPECIAL_ITEM);
    writeln!(
        out,
        "<details><summary>The {}</summary>\n<div class=\"scroll\"><table>\n\
         <thead><tr><th>Item</th><th>Kind</th><th>Categories</th><th>Words</th></tr></thead>\n<tbody>",
        count(sp.items.len(), "item", "items")
    )?;
    for i in &sp.items[..shown] {
        writeln!(
            out,
            "<tr><td class=\"name\">{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            escape(&i.name),
            escape(&i.kind),
            escape(&i.categories.join(", ")),
            escape(&i.terms.join(", "))
        )?;
    }
    writeln!(out, "</tbody></table></div>")?;
    if let Some(more) = more {
        writeln!(out, "<p class=\"key\">{}</p>", escape(&more))?;
    }
    writeln!(out, "</details>")?;
    writeln!(
        out,
        "<p class=\"key\">These items touch data the law treats with special care, whether or not they change a guess above.</p>"
    )
}

fn write_friends(r: &ScanReport, out: &mut dyn Write) -> io::Result<()> {
    let Some(f) = &r.friends else {
        return Ok(());
    };
    writeln!(out, "<h2>Friends</h2>")?;
    writeln!(
        out,
        "<p>{} (names are never shown). {}</p>",
        count(f.total, "friend", "friends"),
        if f.hidden {
            "The friend list is treated as private; the last column shows it visible again."
        } else {
            "The last column shows the guesses with the friend list private."
        }
    )?;
    writeln!(
        out,
        "<div class=\"scroll\"><table>\n<thead><tr><th>Attribute</th><th class=\"n\">Friends known</th>\
         <th>Best guess now</th><th>If toggled</th></tr></thead>\n<tbody>"
    )?;
    for a in &f.attributes {
        writeln!(
            out,
            "<tr><td>{}</td><td class=\"n\">{} ({})</td><td>{} {}</td><td>{} {}</td></tr>",
            escape(&r.attribute_label(&a.attribute)),
            a.known,
            percent(a.share_known),
            escape(&r.value_label(&a.attribute, &a.best_guess)),
            percent(a.probability),
            escape(&r.value_label(&a.attribute, &a.best_guess_if_toggled)),
            percent(a.probability_if_toggled)
        )?;
    }
    writeln!(out, "</tbody></table></div>")
}
