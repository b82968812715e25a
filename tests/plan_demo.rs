//! The demo personas get plans that, re-scored through a fresh exposure with the
//! plan's items hidden (the scan's own scoring path), meet every alert level — with
//! the priors' levels, and with each persona's true values (from
//! demo-exports/manifest.json) stated. Also drives `telltale plan` end to end.

use std::path::PathBuf;
use std::process::Command;
use std::time::Duration;

use telltale::plan::{Budget, PlanRequest, Status, solve};
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::synth::PersonaManifest;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn personas() -> Vec<PersonaManifest> {
    let text = std::fs::read_to_string(root().join("demo-exports/manifest.json")).unwrap();
    serde_json::from_str(&text).unwrap()
}

#[test]
fn demo_plans_meet_every_threshold_when_rescored() {
    let mut priors = load_priors(None).unwrap();
    for p in personas() {
        let input = ScanInput {
            archive: root().join("demo-exports").join(&p.archive),
            mapping: Some(root().join("demo-exports").join(&p.mapping)),
            ..ScanInput::default()
        };
        let scan = Scan::run(&input, &mut priors).unwrap();
        for with_truth in [false, true] {
            let mut req = PlanRequest::for_footprint(&priors, &scan.footprint);
            if with_truth {
                for (ai, v) in p.truth.iter().enumerate() {
                    let vi = priors.attributes[ai].value_index(v).unwrap();
                    req.set_true_value(ai, vi);
                }
            }
            req.budget = Budget::with_time_limit(Duration::from_secs(2));
            let out = solve(&scan.exposure, &req).unwrap();
            assert!(
                matches!(out.status, Status::Optimal | Status::Feasible),
                "{}: {:?}",
                p.slug,
                out.status
            );
            let plan = out.plan.as_ref().unwrap();
            // Re-score from scratch: a fresh exposure from the same footprint.
            let mut fresh = Scan::from_footprint(
                "x".into(),
                "y".into(),
                scan.footprint.clone(),
                &mut priors,
                &input.sources,
            );
            for s in plan.subjects() {
                fresh.exposure.set_hidden(s, true);
            }
            fresh.exposure.recompute();
            for t in &req.targets {
                let post = fresh.exposure.posterior(t.attribute);
                let p_watched = match t.true_value {
                    Some(v) => post.probs[v],
                    None => post.probability,
                };
                assert!(
                    p_watched <= t.threshold,
                    "{} (truth {with_truth}): attribute {} at {p_watched} over {}",
                    p.slug,
                    t.attribute,
                    t.threshold
                );
            }
            // The "hide everything" move hides at least as much as the plan.
            let everything = out.moves.last().unwrap();
            assert!(everything.hides >= plan.len());
            if let Some(lb) = out.lower_bound {
                assert!(lb <= plan.cost + 1e-9);
            }
        }
    }
}

fn telltale(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(args)
        .current_dir(root())
        .output()
        .unwrap()
}

#[test]
fn cli_plan_writes_versioned_json_and_names_near_matches() {
    let out = telltale(&[
        "plan",
        "demo-exports/teacher",
        "--format",
        "json",
        "--time-limit",
        "5",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["format"], 1);
    // With each rare value at its own, lower level (the rarity rule) the teacher's
    // plan is not always proven smallest within 5 s on a loaded machine: a plan that
    // meets every level is what this test needs.
    assert!(
        v["status"] == "optimal" || v["status"] == "feasible",
        "{}",
        v["status"]
    );
    let items = v["plan"]["items"].as_array().unwrap();
    assert!(!items.is_empty());
    assert!(
        items
            .iter()
            .all(|i| !i["reasons"].as_array().unwrap().is_empty())
    );
    assert_eq!(v["attributes"].as_array().unwrap().len(), 4);
    assert!(
        v["attributes"]
            .as_array()
            .unwrap()
            .iter()
            .all(|a| a["after"]["meets"] == true)
    );

    // Keeping the first planned item gives a plan without it.
    let first = items[0]["name"].as_str().unwrap().to_string();
    let out = telltale(&[
        "plan",
        "demo-exports/teacher",
        "--format",
        "json",
        "--keep",
        &first,
    ]);
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    if let Some(items) = v["plan"]["items"].as_array() {
        assert!(items.iter().all(|i| i["name"] != first.as_str()));
    }

    // A misspelt item is an error naming the near match.
    let out = telltale(&[
        "plan",
        "demo-exports/teacher",
        "--keep",
        "Kosher Kitchen Chanel",
    ]);
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("Kosher Kitchen Channel"), "{err}");

    // An alert level under 1/7 for a seven-valued attribute cannot be met (the
    // probabilities add up to 1, so some value has at least 1/7): proven and said.
    let out = telltale(&[
        "plan",
        "demo-exports/teacher",
        "--threshold",
        "religion=5%",
        "--format",
        "json",
    ]);
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["status"], "infeasible");
    assert_eq!(v["infeasible"]["blocked"][0]["attribute"], "religion");
    let out = telltale(&["plan", "demo-exports/teacher", "--threshold", "religion=5%"]);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("WHAT STANDS IN THE WAY"), "{text}");
    // The text is wrapped to the terminal width: compare with whitespace collapsed.
    let flat = text.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(flat.contains("1 chance in 7"), "{text}");
}

#[cfg(unix)]
#[test]
fn cli_plan_output_file_is_owner_only() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("plan.md");
    let out = telltale(&[
        "plan",
        "demo-exports/teacher",
        "--format",
        "markdown",
        "--output",
        path.to_str().unwrap(),
    ]);
    assert!(out.status.success());
    let meta = std::fs::metadata(&path).unwrap();
    assert_eq!(meta.permissions().mode() & 0o777, 0o600);
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(text.starts_with("# What to hide in teacher"));
}

/// A search stopped before any plan exists says so and names what to change: more
/// time, or the other method (the exact search cannot suggest itself, as it did once).
/// The reporter persona needs items hidden (its guesses are over the priors' levels),
/// so a search that is stopped at once has no plan to give.
#[test]
fn a_search_stopped_before_any_plan_names_the_other_method() {
    use std::sync::Arc;
    use std::sync::atomic::AtomicBool;
    use telltale::plan::{Method, build_report};

    let mut priors = load_priors(None).unwrap();
    let input = ScanInput {
        archive: root().join("demo-exports/reporter"),
        ..ScanInput::default()
    };
    let scan = Scan::run(&input, &mut priors).unwrap();
    for (method, other) in [
        (Method::Exact, "greedy method"),
        (Method::Greedy, "exact method"),
    ] {
        let mut req = PlanRequest::for_footprint(&priors, &scan.footprint);
        req.method = method;
        // Stopped before it starts: greedy gives up at its first step, and the exact
        // search reaches its node limit at the root.
        req.budget = Budget {
            node_limit: 1,
            deadline: None,
            cancel: Some(Arc::new(AtomicBool::new(true))),
        };
        let out = solve(&scan.exposure, &req).unwrap();
        assert_eq!(out.status, Status::Unknown, "{method:?}");
        assert!(out.plan.is_none());
        let report = build_report("reporter", &scan.footprint, &priors, &out);
        assert!(
            report.summary.starts_with("No plan")
                || report
                    .summary
                    .starts_with("The greedy method found no plan"),
            "{}",
            report.summary
        );
        assert!(
            report.summary.contains("Allow more time"),
            "{}",
            report.summary
        );
        assert!(
            report.summary.contains(other),
            "{method:?}: {}",
            report.summary
        );
        // A lower bound the search proved (the exact search's root gives one here)
        // is said, not kept back.
        if method == Method::Exact
            && let Some(lb) = out.lower_bound
        {
            let said = format!("at least {}", lb.ceil());
            assert!(report.summary.contains(&said), "{}", report.summary);
        }
    }
}

/// The plan's text lists every item to hide by its full name (a person looks for it
/// on the platform by that name), however long.
#[test]
fn plan_text_names_every_item_in_full() {
    use telltale::plan::{build_report, write_text};
    let mut priors = load_priors(None).unwrap();
    let input = ScanInput {
        archive: root().join("demo-exports/reporter"),
        ..ScanInput::default()
    };
    let scan = Scan::run(&input, &mut priors).unwrap();
    let mut req = PlanRequest::for_footprint(&priors, &scan.footprint);
    req.budget = Budget::with_time_limit(Duration::from_secs(2));
    let out = solve(&scan.exposure, &req).unwrap();
    let report = build_report("reporter", &scan.footprint, &priors, &out);
    let mut buf = Vec::new();
    write_text(&report, &mut buf).unwrap();
    let text = String::from_utf8(buf).unwrap();
    let items = &report
        .plan
        .as_ref()
        .expect("the reporter gets a plan")
        .items;
    assert!(
        items.iter().any(|h| h.name.chars().count() > 30),
        "no name is longer than the column: the test checks nothing"
    );
    for h in items {
        assert!(
            text.contains(h.name.as_str()),
            "'{}' is cut in:\n{text}",
            h.name
        );
    }
}
