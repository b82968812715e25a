//! The item list: one row per item (and the friend list), with the attribute it gives
//! away most, its information in bits and what it adds to the observer's best guess;
//! filtered by attribute, kind and a search text, in the chosen order. Computing all
//! rows touches each piece of evidence once and allocates only the rows.

use super::session::Session;
#[cfg(test)]
use super::session::subject_name;
use crate::decisions::Mark;
use crate::evidence::Subject;
use crate::footprint::ItemKind;
use crate::text::name_key;

/// Which kinds of subject to list.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum KindFilter {
    #[default]
    All,
    Kind(ItemKind),
    /// The friend list as a whole.
    Friends,
}

impl KindFilter {
    /// The cycle order for a front end's filter key.
    pub const CYCLE: [KindFilter; 6] = [
        KindFilter::All,
        KindFilter::Kind(ItemKind::Like),
        KindFilter::Kind(ItemKind::Group),
        KindFilter::Kind(ItemKind::Follow),
        KindFilter::Kind(ItemKind::Event),
        KindFilter::Friends,
    ];

    pub fn label(self) -> &'static str {
        match self {
            KindFilter::All => "all kinds",
            KindFilter::Kind(k) => k.plural(),
            KindFilter::Friends => "friend list",
        }
    }

    pub fn next(self) -> KindFilter {
        let i = Self::CYCLE.iter().position(|k| *k == self).unwrap_or(0);
        Self::CYCLE[(i + 1) % Self::CYCLE.len()]
    }
}

/// Row order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SortBy {
    /// What the item adds to the observer's current best guess, most first.
    #[default]
    Revealing,
    /// Information (bits), most first.
    Information,
    /// Homogeneity of members, most alike first.
    Homogeneity,
    /// Newest first.
    Date,
    /// Alphabetical by name.
    Name,
}

impl SortBy {
    pub const CYCLE: [SortBy; 5] = [
        SortBy::Revealing,
        SortBy::Information,
        SortBy::Homogeneity,
        SortBy::Date,
        SortBy::Name,
    ];

    pub fn label(self) -> &'static str {
        match self {
            SortBy::Revealing => "most revealing",
            SortBy::Information => "most informative",
            SortBy::Homogeneity => "most alike members",
            SortBy::Date => "newest",
            SortBy::Name => "name",
        }
    }

    pub fn next(self) -> SortBy {
        let i = Self::CYCLE.iter().position(|k| *k == self).unwrap_or(0);
        Self::CYCLE[(i + 1) % Self::CYCLE.len()]
    }
}

/// What to list.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RowQuery {
    /// Only items with evidence about this attribute (and show that attribute).
    pub attribute: Option<usize>,
    pub kind: KindFilter,
    /// Case-, accent- and punctuation-insensitive substring of the name.
    pub search: String,
    pub sort: SortBy,
}

/// One line of the item list (the name is [`super::session::subject_name`] of the subject).
#[derive(Debug, Clone, PartialEq)]
pub struct ItemRow {
    pub subject: Subject,
    /// like, group, follow, event or friends.
    pub kind: &'static str,
    /// The attribute shown (the filtered one, or the one it adds most to); `None`
    /// when nothing is known about the item.
    pub attribute: Option<usize>,
    /// The value it pushes the guess toward for that attribute ([`crate::effect`]).
    pub reveals: Option<usize>,
    pub bits: f64,
    pub homogeneity: f64,
    /// Leave-one-out bits on the observer's current best guess ([`crate::effect`]):
    /// what it adds, or would add if shown again; the reports' figure.
    pub contribution_bits: f64,
    pub mark: Option<Mark>,
    pub date: Option<i64>,
}

/// The rows for a query.
pub fn item_rows(s: &Session, q: &RowQuery) -> Vec<ItemRow> {
    let x = s.exposure();
    let mut effects = crate::effect::Memo::new(x);
    let needle = name_key(&q.search);
    let fp = s.footprint();
    let mut rows = Vec::with_capacity(fp.items.len() + 1);
    for subject in s.subjects() {
        let (kind, date) = match subject {
            Subject::Item(i) => (fp.items[i].kind.as_str(), fp.items[i].date),
            Subject::FriendList => ("friends", None),
        };
        let keep_kind = match q.kind {
            KindFilter::All => true,
            KindFilter::Kind(k) => matches!(subject, Subject::Item(i) if fp.items[i].kind == k),
            KindFilter::Friends => subject == Subject::FriendList,
        };
        if !keep_kind {
            continue;
        }
        if !needle.is_empty() && !s.name_key(subject).contains(&needle) {
            continue;
        }
        // The evidence to show: the filtered attribute's, or the largest contribution.
        // The figure is the leave-one-out one of [`crate::effect`], the reports' own.
        // A subject's figure for an attribute covers all its evidence about it, so it
        // is worked out once per attribute (the first piece stands for the row).
        let mut chosen: Option<(usize, f64, usize)> = None;
        for &ei in x.evidence_of(subject) {
            let a = x.evidence().list[ei].attribute();
            if q.attribute.is_some_and(|q| q != a)
                || chosen.is_some_and(|(c, _, _)| x.evidence().list[c].attribute() == a)
            {
                continue;
            }
            let fx = effects.effect(a, subject);
            if chosen.is_none_or(|(_, best, _)| fx.bits > best) {
                chosen = Some((ei, fx.bits, fx.points_to));
            }
        }
        if q.attribute.is_some() && chosen.is_none() {
            continue;
        }
        let row = match chosen {
            Some((ei, c, points_to)) => {
                let e = &x.evidence().list[ei];
                ItemRow {
                    subject,
                    kind,
                    attribute: Some(e.attribute()),
                    reveals: Some(points_to),
                    bits: e.info_bits(),
                    homogeneity: e.homogeneity(),
                    contribution_bits: c,
                    mark: s.mark(subject),
                    date,
                }
            }
            None => ItemRow {
                subject,
                kind,
                attribute: None,
                reveals: None,
                bits: 0.0,
                homogeneity: 0.0,
                contribution_bits: 0.0,
                mark: s.mark(subject),
                date,
            },
        };
        rows.push(row);
    }
    sort_rows(s, &mut rows, q.sort);
    rows
}

/// Put rows in `by`'s order. The order is total (ties break by archive order), so rows
/// made for one query and sorted again for another order are the very list
/// [`item_rows`] gives for that order: the figures do not depend on the order.
pub fn sort_rows(s: &Session, rows: &mut [ItemRow], by: SortBy) {
    // Items nothing is known about go last; ties break by archive order, so the
    // order is total and the same every time.
    let unknown = |r: &ItemRow| r.attribute.is_none();
    match by {
        SortBy::Revealing => rows.sort_unstable_by(|a, b| {
            unknown(a)
                .cmp(&unknown(b))
                .then(b.contribution_bits.total_cmp(&a.contribution_bits))
                .then(b.bits.total_cmp(&a.bits))
                .then(a.subject.cmp(&b.subject))
        }),
        SortBy::Information => rows.sort_unstable_by(|a, b| {
            unknown(a)
                .cmp(&unknown(b))
                .then(b.bits.total_cmp(&a.bits))
                .then(a.subject.cmp(&b.subject))
        }),
        SortBy::Homogeneity => rows.sort_unstable_by(|a, b| {
            unknown(a)
                .cmp(&unknown(b))
                .then(b.homogeneity.total_cmp(&a.homogeneity))
                .then(a.subject.cmp(&b.subject))
        }),
        SortBy::Date => {
            rows.sort_unstable_by(|a, b| b.date.cmp(&a.date).then(a.subject.cmp(&b.subject)))
        }
        SortBy::Name => rows.sort_unstable_by(|a, b| {
            s.name_key(a.subject)
                .cmp(s.name_key(b.subject))
                .then(a.subject.cmp(&b.subject))
        }),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::whatif::session::tests::demo_session;

    #[test]
    fn most_revealing_first_by_the_leave_one_out_figure() {
        let s = demo_session();
        let rows = item_rows(
            &s,
            &RowQuery {
                attribute: Some(0),
                ..RowQuery::default()
            },
        );
        let contrib = s.exposure().contributions(0);
        assert_eq!(rows.len(), contrib.len());
        // Each row's figure is the leave-one-out one, same sign as the exposure's own
        // leave-one-out drop of the best guess.
        for r in &rows {
            let fx = crate::effect::effect(s.exposure(), 0, r.subject);
            assert!((r.contribution_bits - fx.bits).abs() < 1e-12);
            let c = contrib.iter().find(|c| c.subject == r.subject).unwrap();
            assert_eq!(r.contribution_bits > 0.0, c.loo_drop > 0.0);
        }
        for w in rows.windows(2) {
            assert!(w[0].contribution_bits >= w[1].contribution_bits);
        }
    }

    #[test]
    fn filters_and_search_narrow_the_list() {
        let s = demo_session();
        let all = item_rows(&s, &RowQuery::default());
        // Every item, plus one row for the friend list when friends give evidence (the
        // reporter's archive lists friends with stated attributes).
        let friend_row = !s.exposure().evidence_of(Subject::FriendList).is_empty();
        assert!(friend_row);
        assert_eq!(all.len(), s.footprint().items.len() + 1);
        assert_eq!(
            all.iter()
                .filter(|r| r.subject == Subject::FriendList)
                .count(),
            1
        );
        let groups = item_rows(
            &s,
            &RowQuery {
                kind: KindFilter::Kind(ItemKind::Group),
                ..RowQuery::default()
            },
        );
        assert_eq!(groups.len(), s.footprint().count(ItemKind::Group));
        assert!(groups.iter().all(|r| r.kind == "group"));
        let name_of = |r: &ItemRow| subject_name(s.footprint(), r.subject).to_string();
        let word = name_of(&all[0])
            .split_whitespace()
            .next()
            .unwrap()
            .to_uppercase();
        let found = item_rows(
            &s,
            &RowQuery {
                search: word.clone(),
                ..RowQuery::default()
            },
        );
        assert!(!found.is_empty() && found.len() <= all.len());
        assert!(
            found
                .iter()
                .all(|r| name_key(&name_of(r)).contains(&name_key(&word)))
        );
        let by_name = item_rows(
            &s,
            &RowQuery {
                sort: SortBy::Name,
                ..RowQuery::default()
            },
        );
        for w in by_name.windows(2) {
            assert!(name_key(&name_of(&w[0])) <= name_key(&name_of(&w[1])));
        }
    }
}
