//! Confidence must not outrun evidence: the worked figures of the overconfidence report
//! as regression cases. Naive Bayes counts correlated items as independent witnesses
//! and grows overconfident (Domingos & Pazzani 1997, "On the Optimality of the Simple
//! Bayesian Classifier under Zero-One Loss", Machine Learning 29): these archives are
//! built to show it.

use telltale::combine::RULES_OF_THUMB_CEILING;
use telltale::evidence::Sources;
use telltale::footprint::{Footprint, Item, ItemKind, Origin};
use telltale::priors::Priors;
use telltale::scan::{Scan, load_priors};

fn footprint(names: &[String]) -> Footprint {
    Footprint {
        items: names
            .iter()
            .enumerate()
            .map(|(i, name)| Item {
                kind: ItemKind::Group,
                name: name.as_str().into(),
                id: None,
                category: None,
                date: Some(1_600_000_000 + i as i64 * 86_400),
                origin: Origin {
                    file: "groups.json".into(),
                    record: i + 1,
                },
            })
            .collect(),
        ..Footprint::default()
    }
}

fn scan(names: &[String], priors: &mut Priors) -> Scan {
    Scan::from_footprint(
        "invented".into(),
        "test".into(),
        footprint(names),
        priors,
        &Sources::all(),
    )
}

/// Ten groups that name nothing a word list knows, then `k` named for Eugene.
fn eugene(k: usize) -> Vec<String> {
    let neutral = [
        "Sourdough Starters",
        "Weekend Knitting Circle",
        "Board Game Nights",
        "Amateur Astronomy Club",
        "Houseplant Swap",
        "Vintage Bicycle Repair",
        "Crossword Solvers",
        "Birdwatching Beginners",
        "Home Espresso Tinkerers",
        "Origami Folders",
    ];
    let topics = [
        "Runners",
        "Book Club",
        "Foodies",
        "Gardeners",
        "Cyclists",
        "Photographers",
    ];
    neutral
        .iter()
        .map(|s| s.to_string())
        .chain((0..k).map(|i| format!("Eugene {} {}", topics[i % topics.len()], i + 1)))
        .collect()
}

fn location_of(priors: &Priors, value: &str) -> (usize, usize) {
    for (ai, a) in priors.attributes.iter().enumerate() {
        if let Some(v) = a.value_index(value) {
            return (ai, v);
        }
    }
    panic!("no value {value}");
}

/// Same-town items: P(Oregon) rises with k, each extra item adds less evidence than the
/// one before, P ≥ 0.5 at k = 10, and with only rules of thumb behind it P stays under
/// 0.98 at k = 30 (it was 0.38, 0.999, 1.000, 1.000 at k = 1, 3, 10, 30 when every
/// item counted in full). "Adds" is read as evidence, the log-odds of Oregon against
/// the rest: in probability the first steps from Oregon's 1–2% population rate climb
/// the logistic curve's lower, convex part, so there the check is from k = 2 on.
#[test]
fn same_town_items_saturate() {
    let mut priors = load_priors(None).unwrap();
    let (ai, oregon) = location_of(&priors, "Oregon");
    let p: Vec<f64> = (0..=30)
        .map(|k| scan(&eugene(k), &mut priors).exposure.posterior(ai).probs[oregon])
        .collect();
    eprintln!(
        "P(Oregon) k=0,1,2,3,10,30: {:.3} {:.3} {:.3} {:.3} {:.3} {:.3}",
        p[0], p[1], p[2], p[3], p[10], p[30]
    );
    let log_odds: Vec<f64> = p.iter().map(|p| (p / (1.0 - p)).ln()).collect();
    for k in 1..=30 {
        assert!(p[k] > p[k - 1], "k = {k}: {} ≤ {}", p[k], p[k - 1]);
    }
    for k in 2..=30 {
        let gain = log_odds[k] - log_odds[k - 1];
        let before = log_odds[k - 1] - log_odds[k - 2];
        assert!(
            gain < before,
            "k = {k}: adds {gain} in log-odds, the one before {before}"
        );
        if k >= 3 {
            assert!(p[k] - p[k - 1] < p[k - 1] - p[k - 2], "k = {k}: {p:?}");
        }
    }
    assert!(p[10] >= 0.5, "{}", p[10]);
    assert!(p[30] < 0.98, "{}", p[30]);
    let x = scan(&eugene(30), &mut priors);
    assert!(x.exposure.rests_on_rules(ai));
    assert!(x.exposure.posterior(ai).probability < RULES_OF_THUMB_CEILING);
    let report = x.report(&priors);
    let reading = &report.attributes[ai].reading;
    assert!(reading.contains("rules of thumb"), "{reading}");
}
