//! Planner benchmarks (figures in docs/performance.md):
//! - exact branch and bound on 60 candidate items × 4 attributes, drawn from the demo
//!   priors for seeded invented members (items chosen with naive-Bayes affinity to the
//!   member's values, so the footprint gives them away as real ones do), and on the
//!   first 60 items of the reporter persona;
//! - greedy on 10,000 items with seeded random evidence on the demo attributes.
//!
//! Run: `cargo bench --bench plan`.

use std::hint::black_box;
use std::path::PathBuf;
use std::time::Duration;

use criterion::{Criterion, criterion_group, criterion_main};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use telltale::evidence::{Evidence, EvidenceSet, Figures, Origin, Sources, Subject};
use telltale::footprint::{Footprint, Item, ItemKind};
use telltale::infer::{AttrModel, Exposure};
use telltale::plan::{Budget, Method, PlanRequest, Status, solve};
use telltale::priors::Priors;
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::stats::smooth_against;

/// A member with values drawn from the base rates, and `n` reference items drawn
/// without replacement with weight `n_i · Π_a p_i(v_a)/μ_a(v_a)`.
pub fn member_footprint(priors: &Priors, seed: u64, n: usize) -> Footprint {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let values: Vec<usize> = priors
        .attributes
        .iter()
        .map(|a| {
            let mut x: f64 = rng.random();
            a.base_rates
                .iter()
                .position(|&b| {
                    x -= b;
                    x <= 0.0
                })
                .unwrap_or(a.base_rates.len() - 1)
        })
        .collect();
    let mut keyed: Vec<(f64, usize)> = priors
        .items()
        .enumerate()
        .map(|(i, it)| {
            let mut logw = it.support().max(1.0).ln();
            for (ai, counts) in it.members() {
                let a = &priors.attributes[ai];
                let (p, q) = smooth_against(&counts, &a.member_rates, a.smoothing, a.pseudocount);
                logw += (p[values[ai]] / q[values[ai]]).ln();
            }
            let u: f64 = rng.random_range(f64::MIN_POSITIVE..1.0);
            (u.ln() / logw.exp(), i)
        })
        .collect();
    keyed.sort_by(|a, b| b.0.total_cmp(&a.0));
    let items = keyed
        .iter()
        .take(n)
        .map(|&(_, i)| {
            let r = priors.item(i);
            Item {
                kind: r.kind().unwrap_or(ItemKind::Like),
                name: r.name().into(),
                id: None,
                category: None,
                date: None,
                origin: telltale::footprint::Origin {
                    file: "bench".into(),
                    record: i + 1,
                },
            }
        })
        .collect();
    Footprint {
        items,
        ..Footprint::default()
    }
}

/// 10,000 items, each leaning toward one value of one attribute, with small noise on
/// every attribute.
fn random_exposure(priors: &Priors, n: usize, seed: u64) -> Exposure {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut set = EvidenceSet::new(n);
    for i in 0..n {
        let focus = rng.random_range(0..priors.attributes.len());
        for (ai, a) in priors.attributes.iter().enumerate() {
            let k = a.values.len();
            let mut l: Vec<f64> = (0..k).map(|_| rng.random_range(-0.03..0.03)).collect();
            if ai == focus {
                let v = rng.random_range(0..k);
                l[v] += rng.random_range(0.05..0.4);
            }
            set.push(Evidence::new(
                Subject::Item(i),
                ai,
                Figures {
                    log_lr: &l,
                    distribution: &a.base_rates,
                    homogeneity: 0.0,
                    info_bits: 0.0,
                    support: 100.0,
                },
                Origin::Mark,
            ));
        }
    }
    let models = priors
        .attributes
        .iter()
        .map(AttrModel::from_attribute)
        .collect();
    Exposure::with_models(models, set)
}

fn exact(priors: &Priors, x: &Exposure) -> telltale::plan::PlanOutcome {
    let mut req = PlanRequest::from_priors(priors);
    req.budget = Budget::with_time_limit(Duration::from_secs(30));
    solve(x, &req).expect("valid request")
}

fn benches(c: &mut Criterion) {
    let mut priors = load_priors(None).expect("bundled priors");
    let mut g = c.benchmark_group("plan");
    g.sample_size(10);
    g.measurement_time(Duration::from_secs(10));

    for seed in [1u64, 2, 3] {
        let fp = member_footprint(&priors, seed, 60);
        let scan = Scan::from_footprint(
            "bench".into(),
            "bench".into(),
            fp,
            &mut priors,
            &Sources::table_only(),
        );
        let o = exact(&priors, &scan.exposure);
        eprintln!(
            "member seed {seed}: {} candidates, status {:?}, plan {:?}, greedy {:?}, nodes {}",
            o.stats.candidates,
            o.status,
            o.plan.as_ref().map(|p| p.len()),
            o.greedy.cost,
            o.stats.nodes
        );
        assert_eq!(o.status, Status::Optimal, "benchmark instance not solved");
        g.bench_function(format!("exact_60x4_member_seed{seed}"), |b| {
            b.iter(|| exact(&priors, black_box(&scan.exposure)))
        });
    }

    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let input = ScanInput {
        archive: root.join("demo-exports/reporter"),
        ..ScanInput::default()
    };
    let mut fp = Scan::run(&input, &mut priors)
        .expect("demo archive")
        .footprint;
    fp.items.truncate(60);
    let scan = Scan::from_footprint(
        "bench".into(),
        "bench".into(),
        fp,
        &mut priors,
        &Sources::table_only(),
    );
    g.bench_function("exact_60x4_reporter_first60", |b| {
        b.iter(|| exact(&priors, black_box(&scan.exposure)))
    });

    let big = random_exposure(&priors, 10_000, 11);
    let mut req = PlanRequest::from_priors(&priors);
    req.method = Method::Greedy;
    let o = solve(&big, &req).expect("valid request");
    eprintln!(
        "greedy 10,000: status {:?}, plan {:?}",
        o.status,
        o.plan.as_ref().map(|p| p.len())
    );
    // No deadline: a budget made once would expire during the measurement and time
    // the give-up path instead.
    req.budget = Budget::unlimited();
    g.bench_function("greedy_10000x4", |b| {
        b.iter(|| solve(black_box(&big), &req))
    });
    g.finish();
}

criterion_group!(plan, benches);
criterion_main!(plan);
