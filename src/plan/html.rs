//! The plan as a section of the HTML report page (the explorer's export): the
//! one-sentence answer, the items to hide and why, each protected attribute before and
//! after as an inline SVG chart with the alert level marked, what the usual coarse
//! moves would do and, when there is no plan, what stands in the way. It uses the scan
//! page's style sheet and, like the page, no scripts and nothing from outside the file.
//! A privately stated value is never named, only its probability.

use std::io::{self, Write};

use super::render::{figure_or, state_words, verdict, why, withheld};
use super::report::{AttrReport, PlanReport};
use crate::reading::percent;
use crate::report::escape_html as escape;
use crate::report::{ScanReport, write_html_with};

/// Items listed in the scan part of the page (the explorer's export and
/// `telltale plan --format html` make the same page).
pub const PAGE_TOP: usize = 25;

/// The whole page: the scan report of `scan` (its first `top` items) with the plan's
/// section after the item table, or without one when `plan` is `None`.
pub fn write_html_page(
    scan: &ScanReport,
    top: usize,
    plan: Option<&PlanReport>,
    out: &mut dyn Write,
) -> io::Result<()> {
    write_html_with(scan, top, out, &mut |w| match plan {
        Some(p) => write_html_section(p, w),
        None => Ok(()),
    })
}

/// Write the section (an `<h2>` and what follows it).
pub fn write_html_section(r: &PlanReport, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "<h2>Hiding plan</h2>")?;
    if let Some(w) = &r.warning {
        writeln!(
            out,
            "<p class=\"private\"><strong>{}</strong></p>",
            escape(w)
        )?;
    }
    writeln!(out, "<p class=\"note\">{}</p>", escape(&r.summary))?;
    if let Some(plan) = &r.plan
        && !plan.items.is_empty()
    {
        writeln!(
            out,
            "<div class=\"scroll\"><table>\n<thead><tr><th class=\"n\">#</th><th>Item to hide</th><th>Kind</th><th>Why (what it was feeding)</th></tr></thead>\n<tbody>"
        )?;
        for (i, item) in plan.items.iter().enumerate() {
            writeln!(
                out,
                "<tr><td class=\"n\">{}</td><td class=\"name\">{}</td><td>{}</td><td>{}</td></tr>",
                i + 1,
                escape(&item.name),
                escape(&item.kind),
                escape(&why(r, i))
            )?;
        }
        writeln!(out, "</tbody></table></div>")?;
    }
    writeln!(
        out,
        "<p class=\"key\">Each chart shows the watched probability now (top bar) and with the plan applied \
         (bottom bar) — the best guess's, or your own value's where you stated it — and the alert level \
         (dashed line).</p>"
    )?;
    writeln!(out, "<div class=\"cards\">")?;
    for a in &r.attributes {
        write_attribute(r, a, out)?;
    }
    writeln!(out, "</div>")?;
    if !r.coarse_moves.is_empty() {
        writeln!(out, "<h3>What the usual advice would do</h3>")?;
        writeln!(
            out,
            "<div class=\"scroll\"><table>\n<thead><tr><th>Move</th><th class=\"n\">Hidden</th><th class=\"n\">Attributes under the alert level</th></tr></thead>\n<tbody>"
        )?;
        for m in &r.coarse_moves {
            writeln!(
                out,
                "<tr><td>{}</td><td class=\"n\">{}</td><td class=\"n\">{} of {}</td></tr>",
                escape(&m.description),
                m.hides,
                m.attributes_met,
                m.after.len()
            )?;
        }
        writeln!(out, "</tbody></table></div>")?;
    }
    if let Some(inf) = r.infeasible.as_ref().filter(|i| !i.is_empty()) {
        writeln!(out, "<h3>What stands in the way</h3>\n<ul>")?;
        for b in &inf.blocked {
            let kept: Vec<String> = b
                .kept_items
                .iter()
                .take(5)
                .map(|(n, _)| n.clone())
                .collect();
            let mut line = format!(
                "{}: {} at {} with everything you allow hidden (alert level {}; with nothing visible {})",
                b.attribute_label,
                b.value_label,
                figure_or(b.probability, "over it"),
                percent(b.threshold),
                figure_or(b.prior_probability, "not shown")
            );
            if !kept.is_empty() {
                line.push_str(&format!("; kept items giving it away: {}", kept.join(", ")));
            }
            writeln!(out, "<li>{}.</li>", escape(&line))?;
        }
        for (x, y) in &inf.conflicts {
            writeln!(
                out,
                "<li>{} and {} can each be met alone, but not together.</li>",
                escape(x),
                escape(y)
            )?;
        }
        writeln!(out, "</ul>")?;
    }
    Ok(())
}

fn watched(s: &super::report::StateReport) -> f64 {
    s.true_value_probability.unwrap_or(s.probability)
}

/// One attribute's card: before and after as two bars against the alert level.
fn write_attribute(r: &PlanReport, a: &AttrReport, out: &mut dyn Write) -> io::Result<()> {
    let verdict = if withheld(r, a) {
        ("quiet", verdict(r, a))
    } else if a.after.meets {
        ("quiet", "under")
    } else {
        ("exposed", "still over")
    };
    writeln!(out, "<section class=\"card\">")?;
    writeln!(
        out,
        "<div class=\"head\"><h3>{}</h3><span class=\"level {}\">{}</span></div>",
        escape(&a.label),
        verdict.0,
        verdict.1
    )?;
    const W: f64 = 320.0;
    const LABEL: f64 = 56.0;
    const VALUE: f64 = 40.0;
    const ROW: f64 = 22.0;
    let track = W - LABEL - VALUE;
    let h = ROW * 2.0 + 6.0;
    let summary = format!(
        "{}: now {}, with the plan {}, alert level {}",
        a.label,
        state_words(&a.before),
        state_words(&a.after),
        percent(a.threshold)
    );
    writeln!(
        out,
        "<svg viewBox=\"0 0 {W} {h}\" role=\"img\" aria-label=\"{}\"><title>{}</title>",
        escape(&summary),
        escape(&summary)
    )?;
    for (i, (label, s)) in [("now", &a.before), ("after", &a.after)]
        .into_iter()
        .enumerate()
    {
        let p = watched(s);
        let y = 3.0 + ROW * i as f64;
        let bar = (p.clamp(0.0, 1.0) * track).max(1.0);
        writeln!(
            out,
            "<text x=\"0\" y=\"{:.1}\">{label}</text>\
             <rect class=\"track\" x=\"{LABEL}\" y=\"{y:.1}\" width=\"{track:.1}\" height=\"14\" rx=\"2\"/>\
             <rect class=\"bar\" x=\"{LABEL}\" y=\"{y:.1}\" width=\"{bar:.1}\" height=\"14\" rx=\"2\"/>\
             <text x=\"{W:.1}\" y=\"{:.1}\" text-anchor=\"end\">{}</text>",
            y + 12.0,
            y + 12.0,
            percent(p)
        )?;
    }
    let limit_x = LABEL + a.threshold.clamp(0.0, 1.0) * track;
    writeln!(
        out,
        "<line class=\"limit\" x1=\"{limit_x:.1}\" x2=\"{limit_x:.1}\" y1=\"0\" y2=\"{h:.1}\"/></svg>"
    )?;
    writeln!(
        out,
        "<p>Now: {}. With the plan: {}. Alert level {}.</p>",
        escape(&state_words(&a.before)),
        escape(&state_words(&a.after)),
        percent(a.threshold)
    )?;
    writeln!(out, "</section>")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plan::{PlanRequest, build_report, solve};
    use crate::priors::Priors;
    use crate::scan::{Scan, ScanInput, load_priors};

    /// The reporter demo persona, scanned with the bundled priors.
    fn reporter() -> (Priors, Scan) {
        let mut priors = load_priors(None).unwrap();
        let input = ScanInput {
            archive: concat!(env!("CARGO_MANIFEST_DIR"), "/demo-exports/reporter").into(),
            ..ScanInput::default()
        };
        let scan = Scan::run(&input, &mut priors).unwrap();
        (priors, scan)
    }

    #[test]
    fn the_section_names_the_plan_and_never_the_true_value() {
        let (priors, scan) = reporter();
        let mut req = PlanRequest::for_footprint(&priors, &scan.footprint);
        // A value label that appears nowhere else on the page would leak if named.
        let religion = priors.attributes.len() - 1;
        let v = priors.attributes[religion].values.len() - 1;
        req.set_true_value(religion, v);
        let o = solve(&scan.exposure, &req).unwrap();
        let r = build_report(&scan.archive_name, &scan.footprint, &priors, &o);
        let mut out = Vec::new();
        write_html_section(&r, &mut out).unwrap();
        let html = String::from_utf8(out).unwrap();
        assert!(html.starts_with("<h2>Hiding plan</h2>"));
        for item in r.plan.iter().flat_map(|p| &p.items) {
            assert!(html.contains(&escape(&item.name)), "{} missing", item.name);
        }
        assert_eq!(html.matches("<svg").count(), r.attributes.len());
        assert!(!html.contains("<script") && !html.contains("http"));
        // "your value" is shown with its probability; the value itself is not named
        // unless it is also the observer's best guess.
        let a = &r.attributes[religion];
        let label = &priors.attributes[religion].values[v].label;
        if a.before.guess_label != *label && a.after.guess_label != *label {
            assert!(!html.contains(label.as_str()), "the true value was named");
        }
        assert!(html.contains("your value"));
    }

    #[test]
    fn no_obstacle_heading_when_none_was_named() {
        // A search stopped by its time limit names no obstacle: no empty heading.
        let (priors, scan) = reporter();
        let req = PlanRequest::for_footprint(&priors, &scan.footprint);
        let o = solve(&scan.exposure, &req).unwrap();
        let mut r = build_report(&scan.archive_name, &scan.footprint, &priors, &o);
        r.infeasible = Some(crate::plan::report::InfeasibleReport {
            blocked: Vec::new(),
            conflicts: Vec::new(),
        });
        let mut html = Vec::new();
        write_html_section(&r, &mut html).unwrap();
        let mut text = Vec::new();
        crate::plan::write_text(&r, &mut text).unwrap();
        let mut md = Vec::new();
        crate::plan::write_markdown(&r, &mut md).unwrap();
        let first = &r.plan.as_ref().expect("the demo has a plan").items[0].name;
        for out in [html, text, md] {
            let out = String::from_utf8(out).unwrap();
            assert!(
                out.contains(&escape(first)) || out.contains(first.as_str()),
                "{out}"
            );
            assert!(
                !out.to_lowercase().contains("what stands in the way"),
                "{out}"
            );
        }
    }
}
