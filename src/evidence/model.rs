//! The evidence record shared by every source.

use std::sync::Arc;

use serde::Serialize;

use crate::lexicon::SpecialCategory;
use crate::priors::MatchedBy;
use crate::stats::{homogeneity, kl_bits};

/// What a piece of evidence is about: one item, or the friend list as a whole.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case", tag = "type", content = "index")]
pub enum Subject {
    Item(usize),
    FriendList,
}

/// Where a piece of evidence comes from.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case", tag = "type")]
pub enum Origin {
    /// A reference item in the priors table.
    Table {
        matched_by: MatchedBy,
        /// The reference item's name (shared by the item's evidence about each
        /// attribute).
        reference: Arc<str>,
    },
    /// A lexicon rule (place names, life-stage dates, vocabulary).
    /// The rule and the description are shared between the many items that match
    /// the same way.
    Lexicon { rule: Arc<str>, detail: Arc<str> },
    /// Friends whose attributes are known (weighted-vote relational neighbour).
    Friends { known: usize, total: usize },
    /// The user's own statement.
    Mark,
}

impl Origin {
    /// Short name for tables and JSON: priors, lexicon, friends, mark.
    pub fn kind(&self) -> &'static str {
        match self {
            Origin::Table { .. } => "priors",
            Origin::Lexicon { .. } => "lexicon",
            Origin::Friends { .. } => "friends",
            Origin::Mark => "mark",
        }
    }

    /// A plain description for people.
    pub fn describe(&self) -> String {
        match self {
            Origin::Table {
                matched_by,
                reference,
            } => format!(
                "reference table, matched by {} to '{reference}'",
                matched_by.as_str()
            ),
            Origin::Lexicon { rule, detail } => format!("{rule}: {detail}"),
            Origin::Friends { known, total } => {
                format!("friends: {known} of {total} with this attribute known")
            }
            Origin::Mark => "your own mark".into(),
        }
    }
}

/// One subject's evidence about one attribute.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Evidence {
    pub subject: Subject,
    /// Index into the priors' attributes.
    pub attribute: usize,
    /// Natural-log likelihood ratio per value, `ln(p(v)/μ(v))` (shared between
    /// items whose evidence is the same, such as names mentioning the same place).
    pub log_lr: Arc<[f64]>,
    /// The implied member distribution `p(v)`.
    pub distribution: Arc<[f64]>,
    /// `1 − H(p)/log₂|V|`.
    pub homogeneity: f64,
    /// `KL(p ‖ μ)` in bits: how far the members are from everyone's memberships.
    pub info_bits: f64,
    /// Members (or equivalent observations) behind the estimate.
    pub support: f64,
    pub origin: Origin,
}

impl Evidence {
    /// Evidence from a member distribution `p` against a reference distribution (the
    /// membership rates μ for table items).
    pub fn from_distribution(
        subject: Subject,
        attribute: usize,
        distribution: Vec<f64>,
        base: &[f64],
        support: f64,
        origin: Origin,
    ) -> Evidence {
        let log_lr = distribution
            .iter()
            .zip(base)
            .map(|(&p, &b)| (p.max(f64::MIN_POSITIVE) / b).ln())
            .collect();
        Evidence {
            subject,
            attribute,
            log_lr,
            homogeneity: homogeneity(&distribution),
            info_bits: kl_bits(&distribution, base),
            distribution: distribution.into(),
            support,
            origin,
        }
    }

    /// The same evidence about another subject, sharing its numbers and description.
    pub fn about(&self, subject: Subject) -> Evidence {
        Evidence {
            subject,
            ..self.clone()
        }
    }

    /// The value this evidence points to most (highest likelihood ratio).
    pub fn leaning(&self) -> usize {
        crate::stats::argmax(&self.log_lr).0
    }
}

/// An item whose name falls into special categories of personal data (GDPR Article
/// 9(1)), whether or not it says anything about a protected attribute.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SpecialFlag {
    /// Index into the footprint's items.
    pub item: usize,
    pub categories: Vec<SpecialCategory>,
    /// The words that put it there.
    pub terms: Vec<String>,
}

/// How much is known about the friends: the share of them whose attributes the
/// archive (or the user's friends file) gives, per priors attribute.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct FriendStats {
    pub total: usize,
    /// Friends with a readable value, per priors attribute (same order).
    pub known: Vec<usize>,
    /// Friends with a value that matches none of the attribute's values, per attribute.
    pub unreadable: Vec<usize>,
}

/// All evidence for one footprint, indexed by subject.
#[derive(Debug, Clone, Default)]
pub struct EvidenceSet {
    pub list: Vec<Evidence>,
    /// Number of items in the footprint (subjects `Item(0..n_items)`).
    pub n_items: usize,
    /// Items that matched a reference item.
    pub matched_items: usize,
    /// Items in special categories of personal data (from the vocabulary).
    pub special: Vec<SpecialFlag>,
    /// What is known about the friends, when the friends source ran.
    pub friends: Option<FriendStats>,
    /// The "now" ages were computed for (Unix seconds), when the life-stage source ran.
    pub reference_time: Option<i64>,
    /// The sources that ran.
    pub sources: Vec<super::sources::SourceKind>,
}

impl EvidenceSet {
    pub fn new(n_items: usize) -> Self {
        EvidenceSet {
            n_items,
            ..EvidenceSet::default()
        }
    }

    pub fn push(&mut self, e: Evidence) {
        self.list.push(e);
    }

    /// Evidence about one subject.
    pub fn for_subject(&self, subject: Subject) -> impl Iterator<Item = &Evidence> {
        self.list.iter().filter(move |e| e.subject == subject)
    }

    /// Items that carry any evidence.
    pub fn items_with_evidence(&self) -> usize {
        let mut seen = vec![false; self.n_items];
        for e in &self.list {
            if let Subject::Item(i) = e.subject
                && i < seen.len()
            {
                seen[i] = true;
            }
        }
        seen.iter().filter(|&&b| b).count()
    }
}
