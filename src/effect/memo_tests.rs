//! [`Memo`] gives the very figures [`effect`] gives, bit for bit, on random exposures:
//! items sharing evidence (the same numbers, as names mentioning the same place do),
//! cause groups that saturate, table evidence too thin to count as data, word-list
//! evidence alone (the rules-of-thumb ceiling), a nested attribute, both calibrations,
//! and random hidden items. The slow path is the reference here; it is checked against
//! worked examples in `effect.rs` and `tests/item_figures.rs`.

use std::sync::Arc;

use proptest::prelude::*;

use super::*;
use crate::evidence::{Evidence, EvidenceSet, Nesting, Origin};
use crate::infer::AttrModel;
use crate::priors::{Calibration, MatchedBy};

/// Values per attribute: attribute 1 lies inside attribute 0 (values 0–1 in 0, 2 in
/// 1, 3 in 2, 4 "somewhere else"); attribute 2 stands alone.
const K: [usize; 3] = [3, 5, 4];

/// One piece in the shared pool: its attribute, member distribution (unnormalised
/// weights) and support.
type PoolPiece = (usize, Vec<f64>, f64);

/// One item's piece: which pool piece, and which origin (0 table, 1 word list with a
/// cause, 2 own mark).
type ItemPiece = (usize, u8, usize);

fn pool_piece() -> impl Strategy<Value = PoolPiece> {
    (0..3usize).prop_flat_map(|a| {
        (
            Just(a),
            prop::collection::vec(0.05f64..1.0, K[a]),
            prop_oneof![Just(0.5), Just(40.0)],
        )
    })
}

fn calibration(logistic: bool, lambda: f64) -> Calibration {
    if logistic {
        Calibration::Logistic {
            lambda,
            intercept: 0.3,
            log_odds: 0.8,
            log_base_rate: 0.2,
            evidence_spread: -0.1,
        }
    } else {
        Calibration::Temperature { lambda }
    }
}

fn exposure(
    pool: &[PoolPiece],
    items: &[Vec<ItemPiece>],
    friends: bool,
    logistic: [bool; 3],
    lambda: f64,
) -> Exposure {
    let bases: Vec<Vec<f64>> = K
        .iter()
        .map(|&k| {
            (1..=k)
                .map(|i| i as f64 / (k * (k + 1) / 2) as f64)
                .collect()
        })
        .collect();
    let shared: Vec<Evidence> = pool
        .iter()
        .map(|(a, w, support)| {
            let total: f64 = w.iter().sum();
            let p = w.iter().map(|x| x / total).collect();
            Evidence::from_distribution(Subject::Item(0), *a, p, &bases[*a], *support, Origin::Mark)
        })
        .collect();
    let mut set = EvidenceSet::new(items.len());
    for (i, pieces) in items.iter().enumerate() {
        for &(k, origin, cause) in pieces {
            let origin = match origin {
                0 => Origin::Table {
                    matched_by: MatchedBy::Name,
                    reference: Arc::from(format!("reference {cause}")),
                },
                1 => Origin::lexicon_with_cause("places", "a town", format!("cause {cause}")),
                _ => Origin::Mark,
            };
            set.push(shared[k % shared.len()].sharing(Subject::Item(i), origin));
        }
    }
    if friends {
        let p = vec![0.2, 0.5, 0.3];
        set.push(Evidence::from_distribution(
            Subject::FriendList,
            0,
            p,
            &bases[0],
            12.0,
            Origin::Friends {
                known: 12,
                total: 30,
            },
        ));
    }
    set.nested.push(Nesting {
        child: 1,
        parent: 0,
        parent_of: vec![Some(0), Some(0), Some(1), Some(2), None],
        remainder: 4,
    });
    let models = bases
        .iter()
        .zip(logistic)
        .map(|(b, l)| AttrModel {
            log_base: b.iter().map(|x| x.ln()).collect(),
            calibration: calibration(l, lambda),
        })
        .collect();
    Exposure::with_models(models, set)
}

/// Every float of an effect as bits, so 0.0 and −0.0 (or two NaNs) are told apart.
fn bits_of(fx: &Effect) -> (usize, [u64; 4], usize) {
    (
        fx.best,
        [fx.probability, fx.toggled, fx.bits, fx.gain].map(f64::to_bits),
        fx.points_to,
    )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn memo_gives_the_same_figures_as_the_slow_path(
        pool in prop::collection::vec(pool_piece(), 1..6),
        items in prop::collection::vec(
            prop::collection::vec((0..6usize, 0..3u8, 0..2usize), 0..4),
            1..25,
        ),
        friends in any::<bool>(),
        logistic in any::<[bool; 3]>(),
        lambda in 0.5f64..1.6,
        hide in prop::collection::vec(any::<bool>(), 26),
    ) {
        let mut x = exposure(&pool, &items, friends, logistic, lambda);
        for (i, &h) in hide.iter().enumerate().take(items.len()) {
            x.set_hidden(Subject::Item(i), h);
        }
        x.set_hidden(Subject::FriendList, hide[25]);
        // Items given the same pieces (pool piece, origin, cause, in order) are found
        // alike: nothing [`effect`] reads tells them apart.
        let same_pieces = |p: &[ItemPiece]| -> Vec<(usize, u8, usize)> {
            p.iter().map(|&(k, o, c)| (k % pool.len(), o, c)).collect()
        };
        for i in 0..items.len() {
            for j in 0..items.len() {
                if !items[i].is_empty() && same_pieces(&items[i]) == same_pieces(&items[j]) {
                    prop_assert!(x.alike().same(&x, Subject::Item(i), Subject::Item(j)));
                }
            }
        }
        let mut memo = Memo::new(&x);
        let subjects = (0..items.len()).map(Subject::Item).chain([Subject::FriendList]);
        for s in subjects {
            for a in 0..K.len() {
                let slow = effect(&x, a, s);
                let fast = memo.effect(a, s);
                prop_assert_eq!(bits_of(&fast), bits_of(&slow), "{:?} attribute {}", s, a);
            }
        }
    }
}
