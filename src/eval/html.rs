//! The evaluation as one standalone HTML page (inline CSS and SVG, no script).

use std::io::{self, Write};

use super::report::EvalReport;
use super::svg::{self, escape};
use super::text::{BEST_HEADS, MIX_HEADS, best_possible, by_mix, summary};
use crate::reading::percent;

pub fn write_html(r: &EvalReport, out: &mut dyn Write) -> io::Result<()> {
    writeln!(
        out,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>telltale evaluation</title><style>body{{font-family:sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#222}}table{{border-collapse:collapse;margin:1rem 0}}td,th{{border:1px solid #ccc;padding:.3rem .6rem}}td.n{{text-align:right}}figure{{display:inline-block;margin:.5rem}}</style></head><body>"
    )?;
    writeln!(out, "<h1>Evaluation of the observer model</h1>")?;
    writeln!(out, "<p>{}</p>", escape(&summary(r)))?;
    writeln!(
        out,
        "<h2>Accuracy and calibration</h2><table><tr><th>attribute</th><th>values</th><th>members</th><th>accuracy</th><th>most common value</th><th>uniform guess</th><th>log loss</th><th>ECE naive Bayes</th><th>ECE temperature</th><th>ECE calibrated</th></tr>"
    )?;
    for a in &r.attributes {
        writeln!(
            out,
            "<tr><td>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{}</td><td class=n>{:.3}</td><td class=n>{:.3}</td><td class=n>{:.3}</td><td class=n>{:.3}</td></tr>",
            escape(&a.label),
            a.values,
            a.members,
            percent(a.accuracy),
            percent(a.majority_rate),
            percent(a.uniform_rate),
            a.log_loss,
            a.ece_naive,
            a.ece_temperature,
            a.ece_calibrated
        )?;
    }
    writeln!(out, "</table>")?;
    if let Some((sentence, rows)) = best_possible(r) {
        writeln!(
            out,
            "<h2>Against the best possible</h2><p>{}</p><table><tr>",
            escape(&sentence)
        )?;
        for h in BEST_HEADS {
            write!(out, "<th>{h}</th>")?;
        }
        writeln!(out, "</tr>")?;
        for [label, acc, best, ratio, ece] in rows {
            writeln!(
                out,
                "<tr><td>{}</td><td class=n>{acc}</td><td class=n>{best}</td><td class=n>{ratio}</td><td class=n>{ece}</td></tr>",
                escape(&label)
            )?;
        }
        writeln!(out, "</table>")?;
    }
    if let Some((sentence, rows)) = by_mix(r) {
        writeln!(
            out,
            "<h2>By evidence mix</h2><p>{}</p><table><tr>",
            escape(&sentence)
        )?;
        for h in MIX_HEADS {
            write!(out, "<th>{h}</th>")?;
        }
        writeln!(out, "</tr>")?;
        for [label, mix, n, acc, ece] in rows {
            writeln!(
                out,
                "<tr><td>{}</td><td>{}</td><td class=n>{n}</td><td class=n>{acc}</td><td class=n>{ece}</td></tr>",
                escape(&label),
                escape(&mix)
            )?;
        }
        writeln!(out, "</table>")?;
    }
    writeln!(
        out,
        "<figure>{}</figure>",
        svg::accuracy_bars(&r.attributes)
    )?;
    writeln!(
        out,
        "<p>Expected calibration error (ECE) is the gap between how confident the best guess is and how often it is right, averaged over 10 confidence bins (0 is perfect).</p>"
    )?;
    for a in &r.attributes {
        writeln!(out, "<figure>{}</figure>", svg::reliability(a))?;
    }
    if !r.public_share.is_empty() {
        writeln!(
            out,
            "<h2>When fewer members' attributes are public</h2><table><tr><th>public share</th>"
        )?;
        for a in &r.attributes {
            write!(out, "<th>{}</th>", escape(&a.label))?;
        }
        writeln!(out, "</tr>")?;
        for row in &r.public_share {
            write!(out, "<tr><td class=n>{}</td>", percent(row.share))?;
            for acc in &row.accuracy {
                write!(out, "<td class=n>{}</td>", percent(*acc))?;
            }
            writeln!(out, "</tr>")?;
        }
        writeln!(out, "</table><figure>{}</figure>", svg::share_lines(r))?;
    }
    writeln!(out, "</body></html>")
}
