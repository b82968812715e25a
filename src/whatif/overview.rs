//! The overview: one summary per protected attribute, in plain words. Its cost does
//! not depend on the footprint's size: the counts come from the exposure's running
//! tallies, so it can be redrawn after every key press.

use super::session::Session;
use crate::alert::Flag;
use crate::evidence::Subject;
use crate::reading::{Level, assess, with_footing};

/// What the overview shows for one attribute.
#[derive(Debug, Clone, PartialEq)]
pub struct AttributeSummary {
    pub attribute: usize,
    pub label: String,
    pub guess_label: String,
    pub probability: f64,
    /// Population rate of the best-guess value.
    pub base_rate: f64,
    /// The person's alert level for this attribute.
    pub target: f64,
    pub level: Level,
    /// The value the alert rule counts as exposed (the best guess, or a rarer value).
    pub flag: Option<Flag>,
    /// One sentence in plain words.
    pub reading: String,
    /// Visible pieces of evidence feeding it.
    pub feeding: usize,
    /// Of those, how many point toward the best guess (likelihood ratio above 1).
    pub supporting: usize,
    /// The one piece feeding it is the friend list's (not an item's).
    pub only_friend_list: bool,
    /// The best guess's probability with nothing hidden.
    pub baseline_probability: f64,
    pub baseline_guess_label: String,
    /// When the person stated their real value: its label and current probability.
    pub real: Option<(String, f64)>,
    pub special_category: Option<String>,
}

/// The overview of every attribute, in the priors' order.
pub fn overview(s: &Session) -> Vec<AttributeSummary> {
    let x = s.exposure();
    let posteriors: Vec<_> = (0..s.n_attributes()).map(|a| s.posterior(a)).collect();
    s.priors
        .attributes
        .iter()
        .enumerate()
        .map(|(a, attr)| {
            let post = posteriors[a].clone();
            let base = attr.base_rates[post.best];
            let target = s.target(a);
            let guess = attr.values[post.best].label.clone();
            let baseline = s.baseline(a);
            let verdict = assess(attr, &post.probs, target, &s.priors.rarity);
            AttributeSummary {
                attribute: a,
                label: attr.label.clone(),
                reading: with_footing(
                    verdict.reading,
                    post.rests_on_rules && attr.remainder() != Some(post.best),
                ),
                guess_label: guess,
                probability: post.probability,
                base_rate: base,
                target,
                level: verdict.level,
                flag: verdict.flag,
                feeding: x.feeding(a),
                supporting: x.pointing_to(a, posteriors[a].best),
                only_friend_list: x.feeding(a) == 1
                    && !x.is_hidden(Subject::FriendList)
                    && x.evidence_of(Subject::FriendList)
                        .iter()
                        .any(|&ei| x.evidence().list[ei].attribute() == a),
                baseline_probability: baseline.probability,
                baseline_guess_label: attr.values[baseline.best].label.clone(),
                real: s
                    .real_value(a)
                    .map(|v| (attr.values[v].label.clone(), post.probs[v])),
                special_category: attr.special_category.clone(),
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::whatif::session::tests::demo_session;

    #[test]
    fn overview_follows_hiding() {
        let mut s = demo_session();
        let first = overview(&s);
        assert_eq!(first.len(), s.n_attributes());
        for o in &first {
            assert!((o.probability - o.baseline_probability).abs() < 1e-12);
            assert!(o.probability > 0.0 && o.probability <= 1.0);
        }
        // Hide the item contributing most to the first attribute's best guess.
        let top = s.exposure().contributions(0)[0].subject;
        let fed = first[0].feeding;
        s.toggle_hidden(top);
        let after = overview(&s);
        assert!(after[0].probability < first[0].probability);
        assert_eq!(after[0].feeding + 1, fed);
        assert!(after[0].supporting < first[0].supporting);
        assert!(first[0].supporting <= first[0].feeding);
        // The running tally equals a direct count over all visible evidence.
        for o in &after {
            let best = s.posterior(o.attribute).best;
            let x = s.exposure();
            let direct = x
                .evidence()
                .list
                .iter()
                .filter(|e| e.attribute() == o.attribute && !x.is_hidden(e.subject()))
                .filter(|e| e.log_lr()[best] > 0.0)
                .count();
            assert_eq!(o.supporting, direct);
        }
        assert!((after[0].baseline_probability - first[0].probability).abs() < 1e-12);
        s.set_real_value(0, Some(0));
        assert!(overview(&s)[0].real.is_some());
        assert!(matches!(top, Subject::Item(_)));
    }

    #[test]
    fn the_friend_list_alone_is_named_as_such() {
        let mut s = demo_session();
        let x = s.exposure();
        let a = x
            .evidence_of(Subject::FriendList)
            .first()
            .map(|&ei| x.evidence().list[ei].attribute())
            .expect("the demo persona's friend list informs some attribute");
        assert!(!overview(&s)[a].only_friend_list);
        // Every item hidden: the friend list is all that feeds the attribute.
        let items: Vec<Subject> = (0..s.footprint().items.len()).map(Subject::Item).collect();
        s.hide_all(&items);
        let o = &overview(&s)[a];
        assert_eq!(o.feeding, 1);
        assert!(o.only_friend_list);
        // And with the friend list hidden too, nothing feeds it.
        s.toggle_hidden(Subject::FriendList);
        let o = &overview(&s)[a];
        assert_eq!(o.feeding, 0);
        assert!(!o.only_friend_list);
    }
}
