//! The evaluation as Markdown: tables of the figures and the charts as embedded SVG
//! images (data URIs), so one file carries everything.

use std::io::{self, Write};

use super::report::EvalReport;
use super::svg;
use super::text::{BEST_HEADS, MIX_HEADS, best_possible, by_mix, summary};
use crate::reading::percent;

pub fn write_markdown(r: &EvalReport, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "# Evaluation of the observer model\n")?;
    writeln!(out, "{}\n", summary(r))?;
    writeln!(out, "## Accuracy and calibration\n")?;
    writeln!(
        out,
        "| attribute | values | members | accuracy | most common value | uniform guess | log loss | ECE naive Bayes | ECE temperature | ECE calibrated |"
    )?;
    writeln!(out, "|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|")?;
    for a in &r.attributes {
        writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} | {:.3} | {:.3} | {:.3} | {:.3} |",
            a.label,
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
    if let Some((sentence, rows)) = best_possible(r) {
        writeln!(out, "\n## Against the best possible\n\n{sentence}\n")?;
        writeln!(out, "| {} |", BEST_HEADS.join(" | "))?;
        writeln!(out, "|---|---:|---:|---:|---:|")?;
        for row in rows {
            writeln!(out, "| {} |", row.join(" | "))?;
        }
    }
    if let Some((sentence, rows)) = by_mix(r) {
        writeln!(out, "\n## By evidence mix\n\n{sentence}\n")?;
        writeln!(out, "| {} |", MIX_HEADS.join(" | "))?;
        writeln!(out, "|---|---|---:|---:|---:|")?;
        for row in rows {
            writeln!(out, "| {} |", row.join(" | "))?;
        }
    }
    writeln!(
        out,
        "\n![Accuracy per attribute beside the two baselines]({})\n",
        svg::data_uri(&svg::accuracy_bars(&r.attributes))
    )?;
    writeln!(
        out,
        "Expected calibration error (ECE) is the gap between how confident the best guess is and how often it is right, averaged over 10 confidence bins (0 is perfect).\n"
    )?;
    for a in &r.attributes {
        writeln!(
            out,
            "![Reliability of guesses about {}]({})",
            a.label,
            svg::data_uri(&svg::reliability(a))
        )?;
    }
    if !r.public_share.is_empty() {
        writeln!(out, "\n## When fewer members' attributes are public\n")?;
        write!(out, "| public share |")?;
        for a in &r.attributes {
            write!(out, " {} |", a.label)?;
        }
        writeln!(out)?;
        write!(out, "|---:|")?;
        for _ in &r.attributes {
            write!(out, "---:|")?;
        }
        writeln!(out)?;
        for row in &r.public_share {
            write!(out, "| {} |", percent(row.share))?;
            for acc in &row.accuracy {
                write!(out, " {} |", percent(*acc))?;
            }
            writeln!(out)?;
        }
        writeln!(
            out,
            "\n![Accuracy as the public share grows]({})",
            svg::data_uri(&svg::share_lines(r))
        )?;
    }
    Ok(())
}
