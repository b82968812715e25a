//! The report's item rows made one at a time: the streamed JSON writer gives exactly the
//! bytes of the report built with every row (on every demo persona, with and without
//! hidden items), a report holding the first n rows holds exactly the first n of the
//! full list, and the rows come in the documented order (most bits toward the guess
//! first, then most informative).

use std::path::PathBuf;

use telltale::evidence::Subject;
use telltale::priors::Priors;
use telltale::report::{RowCount, write_json};
use telltale::scan::{Scan, ScanInput, load_priors};

fn scan(name: &str, priors: &mut Priors) -> Scan {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-exports");
    let mapping = name
        .strip_suffix(".zip")
        .map(|stem| dir.join(format!("{stem}.mapping.toml")));
    let input = ScanInput {
        archive: dir.join(name),
        mapping,
        ..ScanInput::default()
    };
    Scan::run(&input, priors).unwrap()
}

fn personas() -> [&'static str; 4] {
    ["reporter", "organiser", "teacher", "student.zip"]
}

fn full_json(scan: &Scan, priors: &Priors) -> Vec<u8> {
    let mut buf = Vec::new();
    write_json(&scan.report(priors), &mut buf).unwrap();
    buf
}

fn streamed_json(scan: &Scan, priors: &Priors) -> Vec<u8> {
    let mut buf = Vec::new();
    scan.write_json(priors, &mut buf).unwrap();
    buf
}

#[test]
fn streamed_json_is_the_full_report_byte_for_byte() {
    let mut priors = load_priors(None).unwrap();
    for name in personas() {
        let mut s = scan(name, &mut priors);
        let full = full_json(&s, &priors);
        assert!(full.len() > 1000, "{name}: report too small to compare");
        assert_eq!(
            String::from_utf8(streamed_json(&s, &priors)).unwrap(),
            String::from_utf8(full).unwrap(),
            "{name}"
        );
        // Hide every third item and the friend list: the rows change, the two
        // writers still agree.
        for i in (0..s.footprint.items.len()).step_by(3) {
            s.exposure.set_hidden(Subject::Item(i), true);
        }
        s.exposure.set_hidden(Subject::FriendList, true);
        let full = full_json(&s, &priors);
        assert_eq!(
            streamed_json(&s, &priors),
            full,
            "{name}, with items hidden"
        );
    }
}

#[test]
fn first_n_rows_are_the_head_of_the_full_list() {
    let mut priors = load_priors(None).unwrap();
    for name in personas() {
        let s = scan(name, &mut priors);
        let all = s.report(&priors).items;
        assert!(all.len() > 5, "{name}: too few rows to compare");
        for n in [0, 1, 5, all.len(), all.len() + 3] {
            let head = s.report_with(&priors, RowCount::First(n)).items;
            assert_eq!(head.len(), n.min(all.len()), "{name}, n = {n}");
            for (a, b) in head.iter().zip(&all) {
                assert_eq!(
                    serde_json::to_string(a).unwrap(),
                    serde_json::to_string(b).unwrap(),
                    "{name}, n = {n}"
                );
            }
        }
        assert!(s.report_with(&priors, RowCount::Nothing).items.is_empty());
    }
}

#[test]
fn rows_come_most_revealing_first() {
    let mut priors = load_priors(None).unwrap();
    for name in personas() {
        let rows = scan(name, &mut priors).report(&priors).items;
        for w in rows.windows(2) {
            let (a, b) = (&w[0], &w[1]);
            assert!(
                a.contribution_bits > b.contribution_bits
                    || (a.contribution_bits == b.contribution_bits && a.bits >= b.bits),
                "{name}: {} ({}, {}) before {} ({}, {})",
                a.name,
                a.contribution_bits,
                a.bits,
                b.name,
                b.contribution_bits,
                b.bits
            );
        }
    }
}

/// Each row's figures are the leave-one-out ones ([`telltale::effect`]), recomputed
/// here the slow way for every attribute, with and without hidden items: hide the
/// row's subject on a copy of the exposure, take the best guess's posterior again,
/// and compare. "Adds" is the change in the guess's log₂-odds (shown minus hidden),
/// "if hidden" the fall in its probability; both agree in sign in every row.
#[test]
fn row_figures_are_the_leave_one_out_change() {
    let mut priors = load_priors(None).unwrap();
    // log₂ odds of value v, the rest summed (accurate near certainty).
    let log2_odds = |probs: &[f64], v: usize| {
        let rest: f64 = (0..probs.len()).filter(|&u| u != v).map(|u| probs[u]).sum();
        probs[v].log2() - rest.log2()
    };
    for name in personas() {
        let mut s = scan(name, &mut priors);
        for round in 0..2 {
            if round == 1 {
                for i in (0..s.footprint.items.len()).step_by(4) {
                    s.exposure.set_hidden(Subject::Item(i), true);
                }
            }
            let rows = s.report(&priors).items;
            // The visible subjects a row can stand for (names can repeat; then one of
            // them must give the row's figures).
            let subjects_of = |r: &telltale::report::ItemReport| -> Vec<Subject> {
                if r.kind == "friends" {
                    return vec![Subject::FriendList];
                }
                (0..s.footprint.items.len())
                    .filter(|&i| {
                        let it = &s.footprint.items[i];
                        *it.name == *r.name
                            && it.kind.as_str() == r.kind
                            && it.date == r.date
                            && !s.exposure.is_hidden(Subject::Item(i))
                    })
                    .map(Subject::Item)
                    .collect()
            };
            for r in &rows {
                let a = priors
                    .attributes
                    .iter()
                    .position(|x| *x.id == *r.attribute)
                    .unwrap();
                let now = s.exposure.posterior(a);
                let candidates = subjects_of(r);
                assert!(!candidates.is_empty(), "{name}: no subject for {}", r.name);
                let matches = candidates.iter().any(|&subject| {
                    let mut without = s.exposure.clone();
                    without.set_hidden(subject, true);
                    let then = without.posterior(a);
                    let bits = log2_odds(&now.probs, now.best) - log2_odds(&then.probs, now.best);
                    let drop = now.probs[now.best] - then.probs[now.best];
                    (r.contribution_bits - bits).abs() < 1e-9 * (1.0 + bits.abs())
                        && (r.if_hidden_drop - drop).abs() < 1e-12
                });
                assert!(
                    matches,
                    "{name}, round {round}: {}: adds {}, if hidden {} is not the recomputed change",
                    r.name, r.contribution_bits, r.if_hidden_drop
                );
                assert!(
                    r.contribution_bits * r.if_hidden_drop > 0.0
                        || (r.contribution_bits.abs() < 1e-9 && r.if_hidden_drop.abs() < 1e-12),
                    "{name}, round {round}: {}: adds {} but if hidden {}",
                    r.name,
                    r.contribution_bits,
                    r.if_hidden_drop
                );
            }
            assert!(rows.len() > 5, "{name}: too few rows to compare");
        }
    }
}

/// The text report never cuts an item's name in its list of the items that give the
/// most away (a person looks for the item by that name): every listed row's full name
/// is in the text, on the demo personas, which have names longer than the column.
#[test]
fn text_report_lists_every_shown_name_in_full() {
    use telltale::report::{TextOptions, write_text};
    let mut priors = load_priors(None).unwrap();
    let mut long = 0;
    for name in personas() {
        let s = scan(name, &mut priors);
        let report = s.report(&priors);
        let opts = TextOptions::default();
        let mut buf = Vec::new();
        write_text(&report, opts, &mut buf).unwrap();
        let text = String::from_utf8(buf).unwrap();
        for row in report.items.iter().take(opts.top) {
            long += usize::from(row.name.chars().count() > 28);
            assert!(
                text.contains(row.name.as_str()),
                "{name}: '{}' is not in the text report in full",
                row.name
            );
        }
    }
    assert!(
        long > 0,
        "no name is longer than the column: the test checks nothing"
    );
}
