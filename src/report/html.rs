//! The HTML report: one self-contained page a person can open in any browser, offline.
//! Styles are inline, charts are inline SVG, there are no scripts, and a
//! Content-Security-Policy meta tag forbids loading anything from anywhere, so the
//! page cannot reach the network even if a name in it tried. Readable on a phone
//! (single column, tables scroll sideways) and on a desktop; follows the reader's
//! light or dark setting; levels are written as words, so colour is never the only
//! signal.

use std::io::{self, Write};

use super::build::{AttributeReport, ScanReport};
use crate::cautions::TITLE;
use crate::reading::{count, percent, rarity_note};
use crate::text::truncate_to_width;

/// The policy: nothing may load, styles only from this page.
pub const CONTENT_SECURITY_POLICY: &str = "default-src 'none'; style-src 'unsafe-inline'; img-src 'none'; base-uri 'none'; form-action 'none'";

/// Values shown per attribute chart (the most probable ones).
const CHART_VALUES: usize = 6;

const STYLE: &str = r#"
:root{--fg:#1b1b1b;--muted:#555;--bg:#fff;--card:#f4f4f1;--line:#c8c8c2;--bar:#2f5d8a;--base:#b3261e;--exposed:#a4161a;--leaning:#8a5a00;--quiet:#2e6b34;--hint:#6b3fa0}
@media (prefers-color-scheme:dark){:root{--fg:#ececec;--muted:#b0b0b0;--bg:#151515;--card:#232323;--line:#444;--bar:#7fb0e0;--base:#ff8a80;--exposed:#ff8a80;--leaning:#ffd180;--quiet:#a5d6a7;--hint:#c9a7f0}}
*{box-sizing:border-box}
body{margin:0;background:var(--bg);color:var(--fg);font:16px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif}
main{max-width:60rem;margin:0 auto;padding:1rem}
h1{font-size:1.5rem;line-height:1.25;margin:.5rem 0}
h2{font-size:1.2rem;margin:1.75rem 0 .5rem;border-bottom:1px solid var(--line)}
h3{font-size:1.05rem;margin:0}
.meta{color:var(--muted);font-size:.9rem}
.note{border-left:4px solid var(--base);padding:.25rem .75rem;background:var(--card)}
.private{border:2px solid currentColor;padding:.5rem .75rem;border-radius:.25rem}
.cards{display:grid;grid-template-columns:repeat(auto-fit,minmax(17rem,1fr));gap:1rem}
.card{background:var(--card);border-radius:.5rem;padding:.75rem 1rem}
.head{display:flex;justify-content:space-between;align-items:baseline;gap:.5rem;flex-wrap:wrap}
.level{font-weight:700;text-transform:uppercase;font-size:.8rem;letter-spacing:.05em;border:2px solid currentColor;border-radius:.25rem;padding:0 .35rem}
.exposed{color:var(--exposed)}.leaning{color:var(--leaning)}.quiet{color:var(--quiet)}
.guess{font-size:1.1rem;margin:.25rem 0}
svg{display:block;width:100%;height:auto;margin:.5rem 0}
svg text{fill:var(--fg);font:12px system-ui,sans-serif}
svg .bar{fill:var(--bar)}svg .track{fill:var(--line);opacity:.45}svg .base{stroke:var(--base);stroke-width:2.5}svg .limit{stroke:var(--fg);stroke-width:1;stroke-dasharray:3 2}
.key{font-size:.8rem;color:var(--muted)}
.scroll{overflow-x:auto;-webkit-overflow-scrolling:touch}
.wide::before{display:none}
@media (max-width:44rem){.wide::before{display:block;position:sticky;left:0;content:"Wider than this screen: scroll sideways to see every column \2192";font-size:.85rem;color:var(--muted);border-left:4px solid var(--hint);padding:.1rem .5rem;margin-bottom:.25rem}.wide table{min-width:40rem}}
table{border-collapse:collapse;width:100%;font-size:.9rem}
th,td{padding:.35rem .5rem;border-bottom:1px solid var(--line);text-align:left;vertical-align:top}
td.n,th.n{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
td.name{min-width:10rem;overflow-wrap:anywhere}
ul{padding-left:1.25rem}
"#;

/// Escape text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c if c.is_control() && c != '\n' && c != '\t' => out.push('\u{FFFD}'),
            c => out.push(c),
        }
    }
    out
}

/// Write the HTML page; `top` limits the item table.
pub fn write_html(r: &ScanReport, top: usize, out: &mut dyn Write) -> io::Result<()> {
    write_html_with(r, top, out, &mut |_| Ok(()))
}

/// [`write_html`] with more sections (`extra`, e.g. a hiding plan) written after the
/// item table, before the warnings and cautions. They share the page's style sheet
/// (`.cards`, `.card`, `.scroll`, `table`, `.key`, `.meta`, `.note` and the chart
/// classes) and must keep to its rules: no scripts, nothing loaded from anywhere.
pub fn write_html_with(
    r: &ScanReport,
    top: usize,
    out: &mut dyn Write,
    extra: &mut dyn FnMut(&mut dyn Write) -> io::Result<()>,
) -> io::Result<()> {
    let title = format!("What {} gives away", r.archive.name);
    writeln!(out, "<!doctype html>")?;
    writeln!(out, "<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">")?;
    writeln!(
        out,
        "<meta http-equiv=\"Content-Security-Policy\" content=\"{CONTENT_SECURITY_POLICY}\">"
    )?;
    writeln!(
        out,
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
    )?;
    writeln!(out, "<meta name=\"referrer\" content=\"no-referrer\">")?;
    let private = if r.warning.is_some() { "PRIVATE: " } else { "" };
    writeln!(out, "<title>{private}{}</title>", escape(&title))?;
    writeln!(out, "<style>{STYLE}</style>\n</head>\n<body>\n<main>")?;
    if let Some(w) = &r.warning {
        writeln!(
            out,
            "<p class=\"private\"><strong>{}</strong></p>",
            escape(w)
        )?;
    }
    writeln!(out, "<h1>{}</h1>", escape(&title))?;
    writeln!(
        out,
        "<p class=\"meta\">Made by telltale {} on this computer, offline. {}, {}. \
         Reference statistics: {} — {}{}; {} of {} matched. Archive fingerprint <code>{}</code>.</p>",
        escape(&r.tool.version),
        escape(&r.archive.items_phrase()),
        count(r.archive.friends, "friend", "friends"),
        escape(&r.priors.name),
        escape(&r.priors.source),
        if r.priors.synthetic {
            " (synthetic: a fictional population)"
        } else {
            ""
        },
        r.priors.items_matched,
        count(r.archive.items, "item", "items"),
        escape(&r.archive.fingerprint),
    )?;
    if r.archive.hidden > 0 {
        writeln!(
            out,
            "<p class=\"note\">This report treats {} as hidden: it shows what an observer could guess after hiding them.</p>",
            count(r.archive.hidden, "item", "items")
        )?;
    }

    writeln!(out, "<h2>What an observer could guess</h2>")?;
    writeln!(
        out,
        "<p class=\"key\">Each chart shows the observer's probabilities for the most likely values (blue bars), \
         the share of the population with that value (red mark), and your alert level (dashed line; a short dashed \
         mark on a bar is a rare value's own, lower level). {}</p>",
        escape(&rarity_note(&r.rarity))
    )?;
    writeln!(out, "<div class=\"cards\">")?;
    for a in &r.attributes {
        write_attribute(a, out)?;
    }
    writeln!(out, "</div>")?;

    write_items(r, top, out)?;
    extra(out)?;
    super::html_sections::write_after_items(r, top, out)?;

    if !r.warnings.is_empty() {
        writeln!(out, "<h2>Warnings</h2>\n<ul>")?;
        for w in &r.warnings {
            writeln!(out, "<li>{}</li>", escape(w))?;
        }
        writeln!(out, "</ul>")?;
    }
    writeln!(out, "<h2>{}</h2>\n<ul>", escape(TITLE))?;
    for c in &r.cautions {
        writeln!(out, "<li>{}</li>", escape(c))?;
    }
    writeln!(out, "</ul>\n</main>\n</body>\n</html>")
}

fn write_attribute(a: &AttributeReport, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "<section class=\"card\">")?;
    writeln!(
        out,
        "<div class=\"head\"><h3>{}</h3><span class=\"level {}\">{}</span></div>",
        escape(&a.label),
        escape(&a.level),
        escape(&a.level)
    )?;
    writeln!(
        out,
        "<p class=\"guess\">Best guess: <strong>{}</strong>, {} <span class=\"meta\">(population {})</span></p>",
        escape(&a.best_guess_label),
        percent(a.probability),
        percent(a.base_rate)
    )?;
    write_chart(a, out)?;
    writeln!(out, "<p>{}</p>", escape(&a.reading))?;
    writeln!(
        out,
        "<p class=\"meta\">{}. Alert level {}.{}</p>",
        capitalised(&crate::reading::fed_by(a.feeding)),
        percent(a.threshold),
        a.special_category
            .as_deref()
            .map(|s| format!(
                " Special category of personal data (GDPR Art. 9): {}.",
                escape(s)
            ))
            .unwrap_or_default()
    )?;
    writeln!(out, "</section>")
}

/// A horizontal bar chart of the most probable values.
fn write_chart(a: &AttributeReport, out: &mut dyn Write) -> io::Result<()> {
    let mut shown: Vec<_> = a.distribution.iter().collect();
    shown.sort_by(|x, y| y.probability.total_cmp(&x.probability));
    shown.truncate(CHART_VALUES);
    const W: f64 = 320.0;
    const LABEL: f64 = 104.0;
    const VALUE: f64 = 40.0;
    const ROW: f64 = 22.0;
    let track = W - LABEL - VALUE;
    let h = ROW * shown.len() as f64 + 6.0;
    let summary = shown
        .iter()
        .map(|v| {
            format!(
                "{} {} (population {})",
                v.label,
                percent(v.probability),
                percent(v.base_rate)
            )
        })
        .collect::<Vec<_>>()
        .join("; ");
    writeln!(
        out,
        "<svg viewBox=\"0 0 {W} {h}\" role=\"img\" aria-label=\"{}\"><title>{}</title>",
        escape(&format!("{}: {summary}", a.label)),
        escape(&format!("{}: {summary}", a.label))
    )?;
    for (i, v) in shown.iter().enumerate() {
        let y = 3.0 + ROW * i as f64;
        let label = truncate_to_width(&v.label, 16);
        let bar = (v.probability.clamp(0.0, 1.0) * track).max(1.0);
        let base_x = LABEL + v.base_rate.clamp(0.0, 1.0) * track;
        if v.alert_level < a.threshold - 1e-9 {
            // A rare value's own, lower level (the rarity rule).
            let own_x = LABEL + v.alert_level.clamp(0.0, 1.0) * track;
            writeln!(
                out,
                "<line class=\"limit\" x1=\"{own_x:.1}\" x2=\"{own_x:.1}\" y1=\"{:.1}\" y2=\"{:.1}\"/>",
                y - 2.0,
                y + 16.0
            )?;
        }
        writeln!(
            out,
            "<text x=\"0\" y=\"{:.1}\">{}</text>\
             <rect class=\"track\" x=\"{LABEL}\" y=\"{:.1}\" width=\"{track:.1}\" height=\"14\" rx=\"2\"/>\
             <rect class=\"bar\" x=\"{LABEL}\" y=\"{:.1}\" width=\"{bar:.1}\" height=\"14\" rx=\"2\"/>\
             <line class=\"base\" x1=\"{base_x:.1}\" x2=\"{base_x:.1}\" y1=\"{:.1}\" y2=\"{:.1}\"/>\
             <text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{}</text>",
            y + 12.0,
            escape(&label),
            y,
            y,
            y - 2.0,
            y + 16.0,
            W,
            y + 12.0,
            percent(v.probability)
        )?;
    }
    let limit_x = LABEL + a.threshold.clamp(0.0, 1.0) * track;
    writeln!(
        out,
        "<line class=\"limit\" x1=\"{limit_x:.1}\" x2=\"{limit_x:.1}\" y1=\"0\" y2=\"{h:.1}\"/></svg>"
    )
}

fn write_items(r: &ScanReport, top: usize, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "<h2>Items that give the most away</h2>")?;
    let shown: Vec<_> = r
        .items
        .iter()
        .filter(|i| i.contribution_bits > 0.0)
        .take(top)
        .collect();
    if shown.is_empty() {
        return writeln!(
            out,
            "<p>No visible item matched the reference statistics.</p>"
        );
    }
    writeln!(
        out,
        "<div class=\"scroll wide\"><table>\n<thead><tr><th class=\"n\">#</th><th>Item</th><th>Kind</th><th>Points to</th>\
         <th class=\"n\">Bits</th><th class=\"n\">Alike</th><th class=\"n\">Adds</th><th class=\"n\">If hidden</th></tr></thead>\n<tbody>"
    )?;
    for (n, i) in shown.iter().enumerate() {
        let attr_label = r
            .attributes
            .iter()
            .find(|a| *a.id == *i.attribute)
            .map(|a| a.label.as_str())
            .unwrap_or(&i.attribute);
        writeln!(
            out,
            "<tr><td class=\"n\">{}</td><td class=\"name\">{}</td><td>{}</td><td>{}: {}</td>\
             <td class=\"n\">{:.2}</td><td class=\"n\">{:.2}</td><td class=\"n\">{}</td><td class=\"n\">{}</td></tr>",
            n + 1,
            escape(&i.name),
            escape(i.kind),
            escape(attr_label),
            escape(&i.reveals_label),
            i.bits,
            i.homogeneity,
            crate::reading::signed_bits(i.contribution_bits),
            crate::reading::hidden_change_points(i.if_hidden_drop)
        )?;
    }
    writeln!(out, "</tbody></table></div>")?;
    writeln!(
        out,
        "<p class=\"key\">{} (<b>Alike</b> is the homogeneity.)</p>",
        crate::reading::ITEM_FIGURES
            .iter()
            .map(|(name, meaning)| format!("<b>{name}</b>: {}.", escape(meaning)))
            .collect::<Vec<_>>()
            .join(" ")
    )
}

/// The sentence with its first letter a capital ("no evidence" → "No evidence").
fn capitalised(s: &str) -> String {
    let mut chars = s.chars();
    match chars.next() {
        Some(c) => c.to_uppercase().chain(chars).collect(),
        None => String::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escaping_covers_markup_and_quotes() {
        assert_eq!(
            escape("<script>\"a\" & 'b'</script>"),
            "&lt;script&gt;&quot;a&quot; &amp; &#39;b&#39;&lt;/script&gt;"
        );
        assert_eq!(escape("bell\u{7}"), "bell\u{FFFD}");
    }
}
