//! `telltale plan`: read the user's alert levels, kept items, true values and costs,
//! run the library planner and write its report.

use std::process::ExitCode;
use std::time::Duration;

use anyhow::{Context, Result, anyhow, bail};
use telltale::footprint::Footprint;
use telltale::plan::{
    Budget, Method, PAGE_TOP, PlanRequest, build_report_with, find_subject, solve, write_html_page,
    write_json, write_markdown, write_text,
};
use telltale::priors::Priors;
use telltale::report::RowCount;
use telltale::scan::Scan;

use super::args::{PlanArgs, PlanMethod, ReportFormat};
use super::output::emit;
use super::scan::input;

fn split_pair<'a>(flag: &str, s: &'a str) -> Result<(&'a str, &'a str)> {
    s.rsplit_once('=')
        .map(|(a, b)| (a.trim(), b.trim()))
        .filter(|(a, b)| !a.is_empty() && !b.is_empty())
        .ok_or_else(|| anyhow!("{flag} {s}: expected NAME=VALUE"))
}

fn attribute(priors: &Priors, flag: &str, given: &str) -> Result<usize> {
    priors
        .attributes
        .iter()
        .position(|a| a.id.eq_ignore_ascii_case(given) || a.label.eq_ignore_ascii_case(given))
        .ok_or_else(|| {
            let ids: Vec<&str> = priors.attributes.iter().map(|a| a.id.as_str()).collect();
            anyhow!(
                "{flag}: no attribute '{given}'; the priors have {}",
                ids.join(", ")
            )
        })
}

/// "0.4", "40%" → 0.4.
pub(super) fn probability(flag: &str, s: &str) -> Result<f64> {
    let (num, scale) = match s.strip_suffix('%') {
        Some(n) => (n.trim(), 100.0),
        None => (s, 1.0),
    };
    let p: f64 = num
        .parse()
        .map_err(|_| anyhow!("{flag}: '{s}' is not a probability (use 0.4 or 40%)"))?;
    let p = p / scale;
    if !(p > 0.0 && p <= 1.0) {
        bail!("{flag}: {s} must be above 0 and at most 1 (or 100%)");
    }
    Ok(p)
}

/// Turn the command-line words into a request.
fn request(args: &PlanArgs, priors: &Priors, footprint: &Footprint) -> Result<PlanRequest> {
    let mut req = PlanRequest::for_footprint(priors, footprint);
    for t in &args.thresholds {
        let (a, p) = split_pair("--threshold", t)?;
        let ai = attribute(priors, "--threshold", a)?;
        req.set_alert_level(priors, ai, probability("--threshold", p)?);
    }
    // The words given with --true are the person's real values: no message repeats
    // them (a terminal, a log or a screen share would keep them).
    for t in &args.true_values {
        let (a, v) = t
            .rsplit_once('=')
            .map(|(a, b)| (a.trim(), b.trim()))
            .filter(|(a, b)| !a.is_empty() && !b.is_empty())
            .ok_or_else(|| {
                anyhow!("--true: expected ATTRIBUTE=VALUE, e.g. --true politics=left")
            })?;
        let ai = priors
            .attributes
            .iter()
            .position(|x| x.id.eq_ignore_ascii_case(a) || x.label.eq_ignore_ascii_case(a))
            .ok_or_else(|| {
                let ids: Vec<&str> = priors.attributes.iter().map(|a| a.id.as_str()).collect();
                anyhow!(
                    "--true: no attribute by the name given; the priors have {}",
                    ids.join(", ")
                )
            })?;
        let attr = &priors.attributes[ai];
        let vi = attr.value_index(v).ok_or_else(|| {
            let ids: Vec<&str> = attr.values.iter().map(|x| x.id.as_str()).collect();
            anyhow!(
                "--true: {} has no value by the name given; its values are {}",
                attr.id,
                ids.join(", ")
            )
        })?;
        req.set_true_value(ai, vi);
    }
    for k in &args.keep {
        let s = find_subject(footprint, k).map_err(|e| anyhow!("--keep: {e}"))?;
        req.keep.insert(s);
    }
    for c in &args.costs {
        let (item, w) = split_pair("--cost", c)?;
        let s = find_subject(footprint, item).map_err(|e| anyhow!("--cost: {e}"))?;
        let w: f64 = w
            .parse()
            .ok()
            .filter(|x: &f64| x.is_finite() && *x > 0.0)
            .ok_or_else(|| anyhow!("--cost {c}: the weight must be a positive number"))?;
        req.costs.insert(s, w);
    }
    req.method = match args.method {
        PlanMethod::Exact => Method::Exact,
        PlanMethod::Greedy => Method::Greedy,
    };
    if !(args.time_limit.is_finite() && args.time_limit > 0.0) {
        bail!("--time-limit must be a positive number of seconds");
    }
    req.budget = Budget::with_time_limit(Duration::from_secs_f64(args.time_limit.min(1e6)));
    Ok(req)
}

pub fn run(args: &PlanArgs) -> Result<ExitCode> {
    let mut priors = super::scan::priors(&args.input)?;
    let input = input(args.archive.clone(), &args.input)?;
    let scan = Scan::run(&input, &mut priors)?;
    // The evidence is gathered: the parsed lexicons are not needed again.
    telltale::lexicon::release_bundled();
    let req = request(args, &priors, &scan.footprint)?;
    let outcome = solve(&scan.exposure, &req).context("cannot plan")?;
    let levels = alert_levels(&req, &priors);
    let report = build_report_with(
        &scan.archive_name,
        &scan.footprint,
        &priors,
        &outcome,
        args.show_real_values,
    );
    emit(args.output.output.as_deref(), |out| {
        match args.output.format {
            ReportFormat::Text => write_text(&report, out),
            ReportFormat::Json => write_json(&report, out),
            ReportFormat::Markdown => write_markdown(&report, out),
            // The explorer's export: the scan report, judged by the same alert levels
            // as the plan, with the plan after its item table; a plan aimed at real
            // values makes the whole page private (its warning goes first).
            ReportFormat::Html => {
                let mut page = scan.report_with(&priors, RowCount::First(PAGE_TOP));
                page.set_alert_levels(&priors, &levels);
                page.warning = report.warning.clone();
                write_html_page(&page, PAGE_TOP, Some(&report), out)
            }
        }
    })?;
    Ok(ExitCode::SUCCESS)
}

/// Each attribute's alert level in the request, in the priors' order (the priors' own
/// where the request has no target for it).
fn alert_levels(req: &PlanRequest, priors: &Priors) -> Vec<f64> {
    let mut levels: Vec<f64> = priors.attributes.iter().map(|a| a.threshold).collect();
    for t in &req.targets {
        if let Some(l) = levels.get_mut(t.attribute) {
            *l = t.threshold;
        }
    }
    levels
}
