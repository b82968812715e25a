//! The exact planner against scipy.optimize.milp (HiGHS) on linearised binary-attribute
//! instances: tests/python/gen_plan_milp.py draws seeded instances, solves the integer
//! programme with HiGHS and stores the optima in tests/data/plan_milp.json (scripts/test
//! regenerates it and compares). Here the planner must reach the same optimum, and
//! report infeasible exactly where HiGHS does.

mod plan_common;

use plan_common::{Attr, exposure, meets};
use serde::Deserialize;
use telltale::evidence::Subject;
use telltale::plan::{Budget, Method, PlanRequest, Status, Target, solve};

#[derive(Deserialize)]
struct File {
    source: String,
    instances: Vec<Instance>,
}

#[derive(Deserialize)]
struct Instance {
    n: usize,
    attributes: Vec<RawAttr>,
    keep: Vec<usize>,
    costs: Vec<f64>,
    optimum: Option<f64>,
}

#[derive(Deserialize)]
struct RawAttr {
    base: Vec<f64>,
    lambda: f64,
    threshold: f64,
    true_value: Option<usize>,
    log_lr: Vec<Vec<f64>>,
}

#[test]
fn optima_equal_highs() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/plan_milp.json"
    ))
    .expect("tests/data/plan_milp.json");
    let file: File = serde_json::from_str(&text).expect("valid reference file");
    assert!(file.source.contains("HiGHS"));
    assert!(file.instances.len() >= 50);
    let mut feasible = 0;
    for (k, inst) in file.instances.iter().enumerate() {
        let attrs: Vec<Attr> = inst
            .attributes
            .iter()
            .map(|a| Attr {
                base: a.base.clone(),
                lambda: a.lambda,
                threshold: a.threshold,
                true_value: a.true_value,
                levels: None,
                log_lr: a.log_lr.clone(),
                kinds: Vec::new(),
            })
            .collect();
        let x = exposure(inst.n, &attrs);
        let req = PlanRequest {
            targets: attrs
                .iter()
                .enumerate()
                .map(|(i, a)| Target {
                    attribute: i,
                    threshold: a.threshold,
                    true_value: a.true_value,
                    value_levels: None,
                })
                .collect(),
            keep: inst.keep.iter().map(|&i| Subject::Item(i)).collect(),
            costs: (0..inst.n)
                .map(|i| (Subject::Item(i), inst.costs[i]))
                .collect(),
            method: Method::Exact,
            budget: Budget::unlimited(),
            moves: Vec::new(),
        };
        let out = solve(&x, &req).expect("valid request");
        match inst.optimum {
            Some(opt) => {
                feasible += 1;
                assert_eq!(out.status, Status::Optimal, "instance {k}");
                let plan = out.plan.expect("a plan");
                assert!(
                    (plan.cost - opt).abs() < 1e-9,
                    "instance {k}: planner {} vs HiGHS {opt}",
                    plan.cost
                );
                assert!(meets(&x, &attrs, &plan.subjects()), "instance {k}");
            }
            None => assert_eq!(out.status, Status::Infeasible, "instance {k}"),
        }
    }
    assert!(feasible >= 40);
}
