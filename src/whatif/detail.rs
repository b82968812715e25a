//! One item in detail: for each attribute it tells about, its members' distribution
//! against everyone's (the reference the likelihood ratios are taken against), its
//! homogeneity and information, where the evidence comes from, and what hiding (or
//! showing) it would change in every posterior.

use super::session::{Session, subject_name};
use crate::decisions::Mark;
use crate::evidence::Subject;

/// One value's share among the item's members and among everyone.
#[derive(Debug, Clone, PartialEq)]
pub struct ValueBar {
    pub value: usize,
    pub label: String,
    pub members: f64,
    pub everyone: f64,
}

/// One piece of the item's evidence.
#[derive(Debug, Clone, PartialEq)]
pub struct EvidenceView {
    pub attribute: usize,
    pub attribute_label: String,
    /// Values by members' share, largest first.
    pub bars: Vec<ValueBar>,
    pub homogeneity: f64,
    pub info_bits: f64,
    pub support: f64,
    /// priors, lexicon, friends or mark.
    pub source: &'static str,
    pub source_detail: String,
    /// The value it pushes the guess toward ([`crate::effect`]).
    pub leaning_label: String,
    /// Leave-one-out bits on the observer's current best guess ([`crate::effect`]).
    pub contribution_bits: f64,
}

/// How one attribute's best guess would move if the item were toggled.
#[derive(Debug, Clone, PartialEq)]
pub struct AttributeChange {
    pub attribute: usize,
    pub label: String,
    pub now_guess: String,
    pub now_probability: f64,
    pub then_guess: String,
    pub then_probability: f64,
    /// The real value's probability now and then, when the person stated it.
    pub real: Option<(String, f64, f64)>,
}

/// Everything the detail view shows.
#[derive(Debug, Clone, PartialEq)]
pub struct ItemDetail {
    pub subject: Subject,
    pub name: String,
    pub kind: String,
    pub category: Option<String>,
    pub date: Option<i64>,
    /// Where in the archive it was read (file, record).
    pub origin: Option<String>,
    pub mark: Option<Mark>,
    pub evidence: Vec<EvidenceView>,
    /// What toggling it would do (hiding if shown, showing if hidden), for the
    /// attributes it has evidence about.
    pub changes: Vec<AttributeChange>,
}

/// Build the detail of one subject.
pub fn item_detail(s: &Session, subject: Subject) -> ItemDetail {
    let fp = s.footprint();
    let x = s.exposure();
    let (kind, category, date, origin) = match subject {
        Subject::Item(i) => {
            let it = &fp.items[i];
            (
                it.kind.as_str().to_string(),
                it.category.as_deref().map(String::from),
                it.date,
                Some(it.origin.to_string()),
            )
        }
        Subject::FriendList => (
            "friends".to_string(),
            None,
            None,
            Some(format!(
                "{} in the archive",
                crate::reading::count(fp.friends.len(), "friend", "friends")
            )),
        ),
    };
    let mut evidence = Vec::new();
    let mut attrs = Vec::new();
    for &ei in x.evidence_of(subject) {
        let e = &x.evidence().list[ei];
        let attr = &s.priors.attributes[e.attribute()];
        let fx = crate::effect::effect(x, e.attribute(), subject);
        // The reference the ratios were taken against: μ(v) = p(v) / L(v).
        let mut bars: Vec<ValueBar> = e
            .distribution()
            .iter()
            .zip(e.log_lr().iter())
            .enumerate()
            .map(|(v, (&p, &l))| ValueBar {
                value: v,
                label: attr.values[v].label.clone(),
                members: p,
                everyone: p / l.exp(),
            })
            .collect();
        bars.sort_by(|a, b| b.members.total_cmp(&a.members));
        // The value it points to is always among the first bars the page shows.
        if let Some(pos) = bars.iter().position(|b| b.value == fx.points_to)
            && pos > 2
        {
            let bar = bars.remove(pos);
            bars.insert(2, bar);
        }
        evidence.push(EvidenceView {
            attribute: e.attribute(),
            attribute_label: attr.label.clone(),
            bars,
            homogeneity: e.homogeneity(),
            info_bits: e.info_bits(),
            support: e.support(),
            source: e.origin.kind(),
            source_detail: e.origin.describe(),
            leaning_label: attr.values[fx.points_to].label.clone(),
            contribution_bits: fx.bits,
        });
        if !attrs.contains(&e.attribute()) {
            attrs.push(e.attribute());
        }
    }
    let changes = attrs
        .into_iter()
        .map(|a| {
            let attr = &s.priors.attributes[a];
            let now = x.posterior(a);
            let then = x.posterior_toggled(a, subject);
            AttributeChange {
                attribute: a,
                label: attr.label.clone(),
                now_guess: attr.values[now.best].label.clone(),
                now_probability: now.probability,
                then_guess: attr.values[then.best].label.clone(),
                then_probability: then.probability,
                real: s
                    .real_value(a)
                    .map(|v| (attr.values[v].label.clone(), now.probs[v], then.probs[v])),
            }
        })
        .collect();
    ItemDetail {
        subject,
        name: subject_name(fp, subject).to_string(),
        kind,
        category,
        date,
        origin,
        mark: s.mark(subject),
        evidence,
        changes,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::whatif::session::tests::demo_session;

    #[test]
    fn detail_predicts_what_hiding_does() {
        let mut s = demo_session();
        let top = s.exposure().contributions(0)[0].subject;
        let d = item_detail(&s, top);
        assert!(!d.evidence.is_empty());
        for ev in &d.evidence {
            let members: f64 = ev.bars.iter().map(|b| b.members).sum();
            let everyone: f64 = ev.bars.iter().map(|b| b.everyone).sum();
            assert!((members - 1.0).abs() < 1e-9 && (everyone - 1.0).abs() < 1e-9);
        }
        let change = d.changes.iter().find(|c| c.attribute == 0).unwrap();
        s.toggle_hidden(top);
        let after = s.posterior(0);
        assert!((after.probability - change.then_probability).abs() < 1e-12);
    }
}
