//! The explorer's plan screen and `telltale plan` give the same plan for the same
//! archive, alert levels, kept items and true values. The explorer's side is what its
//! worker runs (a what-if session's `PlanAsk` turned into the planner request, solved
//! on the session's exposure); the other side is the real binary's JSON report, so the
//! check runs through the command-line parsing the explorer never uses. The demo
//! teacher persona is proven optimal well within the default time limit, so both
//! answers are the proven plan, not whatever a clock allowed.

use std::path::PathBuf;
use std::process::Command;
use std::sync::Arc;
use std::sync::atomic::AtomicBool;

use serde_json::Value;
use telltale::decisions::Decisions;
use telltale::plan::{Method, build_report, find_subject, solve};
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::whatif::{PlanAsk, Session};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn session(persona: &str) -> Session {
    let priors = load_priors(None).unwrap();
    let input = ScanInput {
        archive: root().join("demo-exports").join(persona),
        ..ScanInput::default()
    };
    let mut priors = priors;
    // The alert levels alone (no rule for rare values, as `--rarity-floor 100%` below):
    // the teacher's plans are then proven smallest within the time limit even on a
    // loaded machine, so both paths must give the same one. The rarity rule's plans
    // are checked in tests/alert_rule.rs.
    priors.rarity = telltale::alert::Rarity::OFF;
    let scan = Scan::run(&input, &mut priors).unwrap();
    let fp = scan.footprint.fingerprint.clone();
    Session::open(scan, priors, &Decisions::new(&fp))
}

fn cli(args: &[&str]) -> Value {
    let out = Command::new(env!("CARGO_BIN_EXE_telltale"))
        .arg("plan")
        .args(args)
        .args(["--format", "json", "--rarity-floor", "100%"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

/// What must agree: status, the items (names and kinds, in order), the lower bound and
/// every attribute's state after the plan (probabilities to 9 decimals: the JSON
/// round trip may change the last bit).
fn essentials(report: &Value) -> Value {
    serde_json::json!({
        "status": report["status"],
        "plan": report["plan"]["items"].as_array().map(|items| items
            .iter()
            .map(|i| serde_json::json!([i["name"], i["kind"]]))
            .collect::<Vec<_>>()),
        "lower_bound": report["lower_bound"],
        "after": report["attributes"].as_array().unwrap().iter()
            .map(|a| serde_json::json!([a["id"], a["after"]["guess"], round9(&a["after"]["probability"]), a["after"]["meets"]]))
            .collect::<Vec<_>>(),
        "moves": report["coarse_moves"].as_array().unwrap().iter()
            .map(|m| serde_json::json!([m["description"], m["attributes_met"]]))
            .collect::<Vec<_>>(),
    })
}

fn round9(v: &Value) -> String {
    format!("{:.9}", v.as_f64().unwrap())
}

fn explorer(s: &Session, use_real_values: bool) -> Value {
    let ask = PlanAsk::from_session(s, use_real_values, Method::Exact);
    let req = ask.request(s, Arc::new(AtomicBool::new(false)));
    let outcome = solve(s.exposure(), &req).unwrap();
    let report = build_report(&s.scan.archive_name, s.footprint(), &s.priors, &outcome);
    serde_json::to_value(&report).unwrap()
}

#[test]
fn explorer_plan_equals_the_plan_command() {
    let archive = root().join("demo-exports/teacher");
    let archive = archive.to_str().unwrap();

    // Defaults: every attribute at the priors' alert level.
    let mut s = session("teacher");
    let ours = explorer(&s, false);
    // Place names group by shared cause and rules of thumb alone have a ceiling
    // (docs/model-card.md, "Combining evidence"): the linear bounds are then not a
    // proof, so a plan that meets every level is "feasible" rather than "optimal".
    assert!(
        ours["status"] == "optimal" || ours["status"] == "feasible",
        "{}",
        ours["status"]
    );
    assert_eq!(essentials(&ours), essentials(&cli(&[archive])));

    // A kept item, a changed alert level and a stated true value.
    let kept = "Torah Study at Home";
    let subject = find_subject(s.footprint(), kept).unwrap();
    s.toggle_kept(subject);
    s.set_target(2, 0.45);
    let religion = s.priors.attributes.len() - 1;
    let christian = s.priors.attributes[religion]
        .value_index("christian")
        .unwrap();
    s.set_real_value(religion, Some(christian));
    let ours = explorer(&s, true);
    let theirs = cli(&[
        archive,
        "--keep",
        kept,
        "--threshold",
        "politics=0.45",
        "--true",
        "religion=christian",
    ]);
    assert_eq!(essentials(&ours), essentials(&theirs));
    let names: Vec<&str> = ours["plan"]["items"]
        .as_array()
        .unwrap()
        .iter()
        .map(|i| i["name"].as_str().unwrap())
        .collect();
    assert!(!names.contains(&kept), "a kept item was planned hidden");
    // The stated value is never named as a reason's value; "your value" stands in.
    for item in ours["plan"]["items"].as_array().unwrap() {
        for r in item["reasons"].as_array().unwrap() {
            assert_ne!(r["value"], "christian", "the stated value was named");
        }
    }
}
