//! What one key press in the explorer costs on a large footprint: hiding or showing one
//! item of 10,000 and bringing the posteriors (and the views) up to date. Target: under
//! 1 ms median for the toggle and recompute. The footprint is built from seeded random
//! evidence against the bundled demo priors' attributes, so the run is reproducible.
//!
//! Run: `cargo bench --bench toggle`

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use telltale::decisions::Decisions;
use telltale::evidence::{Evidence, EvidenceSet, Origin, Subject};
use telltale::footprint::{Footprint, Item, ItemKind};
use telltale::infer::Exposure;
use telltale::scan::{Scan, load_priors};
use telltale::whatif::{RowQuery, Session, item_rows, overview};

const ITEMS: usize = 10_000;

fn session(seed: u64) -> Session {
    let priors = load_priors(None).expect("bundled priors");
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut footprint = Footprint {
        fingerprint: "bench".into(),
        ..Footprint::default()
    };
    let mut set = EvidenceSet::new(ITEMS);
    for i in 0..ITEMS {
        footprint.items.push(Item {
            kind: ItemKind::ALL[i % 4],
            name: format!("Item {i}").into(),
            id: Some(i.to_string().into()),
            category: None,
            date: Some(1_600_000_000 + i as i64 * 3600),
            origin: telltale::footprint::Origin {
                file: "bench".into(),
                record: i + 1,
            },
        });
        // Every item tells about one to all four attributes.
        for (a, attr) in priors.attributes.iter().enumerate() {
            if a > 0 && rng.random_bool(0.5) {
                continue;
            }
            // Members tilted toward one value: p = (1-t)·μ + t·e_v.
            let v = rng.random_range(0..attr.values.len());
            let t = rng.random_range(0.0..0.3);
            let p: Vec<f64> = attr
                .member_rates
                .iter()
                .enumerate()
                .map(|(k, &m)| (1.0 - t) * m + if k == v { t } else { 0.0 })
                .collect();
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                a,
                p,
                &attr.member_rates,
                200.0,
                Origin::Mark,
            ));
        }
    }
    let exposure = Exposure::new(&priors, set);
    let scan = Scan {
        archive_name: "bench".into(),
        mapping_origin: "bench".into(),
        footprint,
        exposure,
    };
    Session::open(scan, priors, &Decisions::new("bench"))
}

fn bench(c: &mut Criterion) {
    let mut s = session(11);
    let n_attr = s.n_attributes();
    let mut i = 0usize;
    c.bench_function("toggle one of 10k items + all posteriors", |b| {
        b.iter(|| {
            i = (i + 7919) % ITEMS;
            s.toggle_hidden(Subject::Item(i));
            for a in 0..n_attr {
                black_box(s.posterior(a));
            }
        })
    });
    c.bench_function("toggle one of 10k items + overview", |b| {
        b.iter(|| {
            i = (i + 7919) % ITEMS;
            s.toggle_hidden(Subject::Item(i));
            black_box(overview(&s));
        })
    });
    let q = RowQuery::default();
    c.bench_function(
        "toggle one of 10k items + overview + sorted item list",
        |b| {
            b.iter(|| {
                i = (i + 7919) % ITEMS;
                s.toggle_hidden(Subject::Item(i));
                black_box(overview(&s));
                black_box(item_rows(&s, &q));
            })
        },
    );
}

criterion_group!(benches, bench);
criterion_main!(benches);
