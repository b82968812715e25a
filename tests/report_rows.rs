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

/// Each row's figures are the exposure's own per-subject contributions
/// ([`telltale::infer::Exposure::contributions`]: the bits toward the best guess and
/// the leave-one-out drop), for every attribute, with and without hidden items. The
/// rows work them out when they are made; the exposure computes them in one pass.
#[test]
fn row_figures_are_the_exposures_contributions() {
    let mut priors = load_priors(None).unwrap();
    for name in personas() {
        let mut s = scan(name, &mut priors);
        for round in 0..2 {
            if round == 1 {
                for i in (0..s.footprint.items.len()).step_by(4) {
                    s.exposure.set_hidden(Subject::Item(i), true);
                }
            }
            let rows = s.report(&priors).items;
            let mut total = 0;
            for (a, attr) in priors.attributes.iter().enumerate() {
                let mut from_rows: Vec<(String, u64, u64)> = rows
                    .iter()
                    .filter(|r| *r.attribute == *attr.id)
                    .map(|r| {
                        (
                            r.name.clone(),
                            r.contribution_bits.to_bits(),
                            r.if_hidden_drop.to_bits(),
                        )
                    })
                    .collect();
                let mut from_exposure: Vec<(String, u64, u64)> = s
                    .exposure
                    .contributions(a)
                    .iter()
                    .map(|c| {
                        let name = match c.subject {
                            Subject::Item(i) => s.footprint.items[i].name.to_string(),
                            Subject::FriendList => "your friend list".to_string(),
                        };
                        (name, c.toward_best_bits.to_bits(), c.loo_drop.to_bits())
                    })
                    .collect();
                from_rows.sort();
                from_exposure.sort();
                assert_eq!(
                    from_rows, from_exposure,
                    "{name}, {}, round {round}",
                    attr.id
                );
                total += from_rows.len();
            }
            assert_eq!(
                total,
                rows.len(),
                "{name}: every row belongs to an attribute"
            );
            assert!(total > 5, "{name}: too few rows to compare");
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
