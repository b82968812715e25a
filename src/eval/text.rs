//! The evaluation as plain text, for a terminal or a script's log.

use std::io::{self, Write};

use super::report::EvalReport;
use crate::reading::percent;

/// One-paragraph description of what was evaluated.
pub fn summary(r: &EvalReport) -> String {
    let noise = match r.epsilon {
        Some(e) => format!(
            ", statistics released with the Laplace mechanism (ε = {e}) as `priors build` would"
        ),
        None => ", exact statistics (no noise)".into(),
    };
    format!(
        "{}-fold cross-validation over {} labelled members ({} archives, {} candidate items{}; at most {} items counted per member, items with fewer than {} members dropped; seed {}).{}",
        r.folds,
        r.members,
        r.archives,
        r.candidate_items,
        noise,
        r.max_items,
        r.min_members,
        r.seed,
        if r.synthetic {
            " The cohort is invented: these figures describe the generator, not real people."
        } else {
            ""
        }
    )
}

/// The best-possible section, the same words and figures in every format: a
/// sentence saying where the figures come from, then per attribute its label, the
/// observer model's accuracy, the Bayes-optimal accuracy and their ratio. `None` when
/// the cohort's generating model is not known.
pub fn best_possible(r: &EvalReport) -> Option<(String, Vec<[String; 5]>)> {
    let source = r.best_possible.as_ref()?;
    let rows = r
        .attributes
        .iter()
        .filter_map(|a| {
            let best = a.bayes_optimal?;
            Some([
                a.label.clone(),
                format!("{:.1}%", 100.0 * a.accuracy),
                format!("{:.1}%", 100.0 * best),
                a.ratio_to_best.map_or("—".into(), |x| format!("{x:.3}")),
                a.bayes_optimal_ece
                    .map_or("—".into(), |x| format!("{x:.3}")),
            ])
        })
        .collect();
    Some((
        format!(
            "Against the best possible: the Bayes-optimal accuracy is that of guessing, for each held-out member, the most probable value under {source}. The ratio is the model's accuracy over it (1 is as good as possible). The best guess's own ECE should be near 0 (a true posterior is calibrated); a larger one would say the generator's model was taken wrongly."
        ),
        rows,
    ))
}

/// The evidence-mix section, the same words and figures in every format: a sentence,
/// then per attribute and mix its label, the mix, the members, the accuracy and the
/// ECE. `None` when no mix was measured.
pub fn by_mix(r: &EvalReport) -> Option<(String, Vec<[String; 5]>)> {
    let rows: Vec<[String; 5]> = r
        .attributes
        .iter()
        .flat_map(|a| {
            a.by_mix.iter().map(|m| {
                [
                    a.label.clone(),
                    m.mix.clone(),
                    m.members.to_string(),
                    format!("{:.1}%", 100.0 * m.accuracy),
                    format!("{:.3}", m.ece),
                ]
            })
        })
        .collect();
    (!rows.is_empty()).then(|| {
        (
            "By evidence mix: the same held-out members guessed the way a scan guesses them (every source but friends on their matched items: the reference table, and the word lists on the items' names, combined with the source weights, cause groups and the rules-of-thumb ceiling), split by what the guess rested on. The calibration above was fitted on the table alone; the word lists' weights are stated, not fitted. Ages are read as of the demo network's date, since a cohort keeps no join dates.".to_string(),
            rows,
        )
    })
}

/// Column heads of the evidence-mix table.
pub const MIX_HEADS: [&str; 5] = ["attribute", "evidence", "members", "accuracy", "ECE"];

/// Column heads of the best-possible table.
pub const BEST_HEADS: [&str; 5] = ["attribute", "accuracy", "Bayes-optimal", "ratio", "its ECE"];

pub fn write_text(r: &EvalReport, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "Evaluation of the observer model")?;
    writeln!(out, "{}", summary(r))?;
    writeln!(out)?;
    writeln!(
        out,
        "  {:<20} {:>7} {:>9} {:>9} {:>9} {:>9} {:>9} {:>9}",
        "attribute", "members", "accuracy", "majority", "uniform", "ECE NB", "ECE temp", "ECE cal"
    )?;
    for a in &r.attributes {
        writeln!(
            out,
            "  {:<20} {:>7} {:>9} {:>9} {:>9} {:>9.3} {:>9.3} {:>9.3}",
            a.label,
            a.members,
            percent(a.accuracy),
            percent(a.majority_rate),
            percent(a.uniform_rate),
            a.ece_naive,
            a.ece_temperature,
            a.ece_calibrated
        )?;
    }
    if let Some((sentence, rows)) = best_possible(r) {
        writeln!(out)?;
        writeln!(out, "{sentence}")?;
        writeln!(
            out,
            "  {:<20} {:>9} {:>14} {:>7} {:>8}",
            BEST_HEADS[0], BEST_HEADS[1], BEST_HEADS[2], BEST_HEADS[3], BEST_HEADS[4]
        )?;
        for [label, acc, best, ratio, ece] in rows {
            writeln!(out, "  {label:<20} {acc:>9} {best:>14} {ratio:>7} {ece:>8}")?;
        }
    }
    if let Some((sentence, rows)) = by_mix(r) {
        writeln!(out)?;
        writeln!(out, "{sentence}")?;
        writeln!(
            out,
            "  {:<20} {:<22} {:>7} {:>9} {:>6}",
            MIX_HEADS[0], MIX_HEADS[1], MIX_HEADS[2], MIX_HEADS[3], MIX_HEADS[4]
        )?;
        for [label, mix, n, acc, ece] in rows {
            writeln!(out, "  {label:<20} {mix:<22} {n:>7} {acc:>9} {ece:>6}")?;
        }
    }
    if !r.public_share.is_empty() {
        writeln!(out)?;
        writeln!(
            out,
            "Accuracy by share of members whose attributes are public:"
        )?;
        // Each column as wide as its attribute's label, so no label is cut.
        let widths: Vec<usize> = r
            .attributes
            .iter()
            .map(|a| a.label.chars().count().max(7))
            .collect();
        write!(out, "  {:<8}", "share")?;
        for (a, w) in r.attributes.iter().zip(&widths) {
            write!(out, " {:>w$}", a.label)?;
        }
        writeln!(out)?;
        for row in &r.public_share {
            write!(out, "  {:<8}", percent(row.share))?;
            for (acc, w) in row.accuracy.iter().zip(&widths) {
                write!(out, " {:>w$}", percent(*acc))?;
            }
            writeln!(out)?;
        }
    }
    writeln!(out)?;
    writeln!(
        out,
        "ECE: expected calibration error of the best guess (10 bins; 0 is perfectly calibrated). NB: naive Bayes; temp: with the fitted temperature; cal: with the logistic calibration."
    )
}
