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
    /// A lexicon rule (place names, life-stage dates, vocabulary). Shared between the
    /// many items that match the same way; one pointer, so that every `Origin` (and
    /// every piece of evidence) stays small.
    Lexicon(Arc<LexiconRule>),
    /// Friends whose attributes are known (weighted-vote relational neighbour).
    Friends { known: usize, total: usize },
    /// The user's own statement.
    Mark,
}

/// The lexicon rule behind a piece of evidence, and what it matched.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct LexiconRule {
    pub rule: String,
    pub detail: String,
    /// The cause this evidence shares with other evidence of the same attribute, for
    /// the dependence-aware combination ([`crate::combine`]). `None`: the rule itself,
    /// with the value the evidence points to most. A source whose rule names cover
    /// several causes (or one cause under several names) sets it.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub cause: Option<String>,
}

impl Origin {
    /// Evidence from a lexicon rule.
    pub fn lexicon(rule: impl Into<String>, detail: impl Into<String>) -> Origin {
        Origin::Lexicon(Arc::new(LexiconRule {
            rule: rule.into(),
            detail: detail.into(),
            cause: None,
        }))
    }

    /// Evidence from a lexicon rule, with the cause it shares with other evidence
    /// named ([`LexiconRule::cause`]).
    pub fn lexicon_with_cause(
        rule: impl Into<String>,
        detail: impl Into<String>,
        cause: impl Into<String>,
    ) -> Origin {
        Origin::Lexicon(Arc::new(LexiconRule {
            rule: rule.into(),
            detail: detail.into(),
            cause: Some(cause.into()),
        }))
    }

    /// Short name for tables and JSON: priors, lexicon, friends, mark.
    pub fn kind(&self) -> &'static str {
        match self {
            Origin::Table { .. } => "priors",
            Origin::Lexicon(_) => "lexicon",
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
            Origin::Lexicon(l) => format!("{}: {}", l.rule, l.detail),
            Origin::Friends { known, total } => {
                format!("friends: {known} of {total} with this attribute known")
            }
            Origin::Mark => "your own mark".into(),
        }
    }
}

/// The numbers of one piece of evidence, as given to [`Evidence::new`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Figures<'a> {
    /// Natural-log likelihood ratio per value, `ln(p(v)/μ(v))`.
    pub log_lr: &'a [f64],
    /// The implied member distribution `p(v)` (same length as `log_lr`).
    pub distribution: &'a [f64],
    /// `1 − H(p)/log₂|V|`.
    pub homogeneity: f64,
    /// `KL(p ‖ μ)` in bits.
    pub info_bits: f64,
    /// Members (or equivalent observations) behind the estimate.
    pub support: f64,
}

/// The subject stored in 32 bits: an item index, or `u32::MAX` for the friend list.
const FRIEND_LIST: u32 = u32::MAX;

/// One subject's evidence about one attribute.
///
/// Kept compact because a large reference table gives several hundred thousand of
/// them: every number lives in one shared allocation (`[log_lr; n]`,
/// `[distribution; n]`, homogeneity, information, support), so evidence that is the
/// same for many items (names mentioning the same place) shares it, and the subject
/// and attribute are 32-bit indices. Item indices fit: an item record takes more than
/// 64 bytes, so 2³² − 1 of them could not be held in memory in the first place.
#[derive(Debug, Clone, PartialEq)]
pub struct Evidence {
    numbers: Arc<[f64]>,
    pub origin: Origin,
    subject: u32,
    attribute: u32,
}

impl Evidence {
    /// Evidence from its numbers (`log_lr` and `distribution` of the same length).
    pub fn new(subject: Subject, attribute: usize, figures: Figures<'_>, origin: Origin) -> Self {
        debug_assert_eq!(figures.log_lr.len(), figures.distribution.len());
        let numbers: Arc<[f64]> = figures
            .log_lr
            .iter()
            .chain(figures.distribution)
            .copied()
            .chain([figures.homogeneity, figures.info_bits, figures.support])
            .collect();
        Evidence {
            numbers,
            origin,
            subject: pack_subject(subject),
            attribute: attribute as u32,
        }
    }

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
        let log_lr: Vec<f64> = distribution
            .iter()
            .zip(base)
            .map(|(&p, &b)| (p.max(f64::MIN_POSITIVE) / b).ln())
            .collect();
        let figures = Figures {
            log_lr: &log_lr,
            distribution: &distribution,
            homogeneity: homogeneity(&distribution),
            info_bits: kl_bits(&distribution, base),
            support,
        };
        Evidence::new(subject, attribute, figures, origin)
    }

    /// The same evidence about another subject, sharing its numbers and description.
    pub fn about(&self, subject: Subject) -> Evidence {
        Evidence {
            subject: pack_subject(subject),
            ..self.clone()
        }
    }

    /// Evidence with the same numbers about another subject, from another origin.
    pub fn sharing(&self, subject: Subject, origin: Origin) -> Evidence {
        Evidence {
            numbers: Arc::clone(&self.numbers),
            origin,
            subject: pack_subject(subject),
            attribute: self.attribute,
        }
    }

    /// What the evidence is about.
    pub fn subject(&self) -> Subject {
        if self.subject == FRIEND_LIST {
            Subject::FriendList
        } else {
            Subject::Item(self.subject as usize)
        }
    }

    /// Index into the priors' attributes.
    pub fn attribute(&self) -> usize {
        self.attribute as usize
    }

    /// Point the evidence at another index of the same attribute (when attributes
    /// are put in another order).
    pub(crate) fn move_to_attribute(&mut self, attribute: usize) {
        self.attribute = attribute as u32;
    }

    /// Number of values of the attribute.
    fn n_values(&self) -> usize {
        (self.numbers.len() - 3) / 2
    }

    /// Natural-log likelihood ratio per value, `ln(p(v)/μ(v))`.
    pub fn log_lr(&self) -> &[f64] {
        &self.numbers[..self.n_values()]
    }

    /// The implied member distribution `p(v)`.
    pub fn distribution(&self) -> &[f64] {
        let n = self.n_values();
        &self.numbers[n..2 * n]
    }

    /// `1 − H(p)/log₂|V|`.
    pub fn homogeneity(&self) -> f64 {
        self.numbers[self.numbers.len() - 3]
    }

    /// `KL(p ‖ μ)` in bits: how far the members are from everyone's memberships.
    pub fn info_bits(&self) -> f64 {
        self.numbers[self.numbers.len() - 2]
    }

    /// Members (or equivalent observations) behind the estimate.
    pub fn support(&self) -> f64 {
        self.numbers[self.numbers.len() - 1]
    }

    /// Whether two pieces hold the very same numbers (one shared allocation, as
    /// [`Evidence::about`] and [`Evidence::sharing`] make): then every figure worked
    /// out from them is the same, bit for bit.
    pub fn numbers_id(&self) -> usize {
        Arc::as_ptr(&self.numbers) as *const f64 as usize
    }

    /// The value this evidence points to most (highest likelihood ratio).
    pub fn leaning(&self) -> usize {
        crate::stats::argmax(self.log_lr()).0
    }
}

fn pack_subject(subject: Subject) -> u32 {
    match subject {
        Subject::Item(i) => {
            debug_assert!(i < FRIEND_LIST as usize);
            i as u32
        }
        Subject::FriendList => FRIEND_LIST,
    }
}

/// The same fields as before the numbers were packed together.
impl Serialize for Evidence {
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut s = serializer.serialize_struct("Evidence", 8)?;
        s.serialize_field("subject", &self.subject())?;
        s.serialize_field("attribute", &self.attribute())?;
        s.serialize_field("log_lr", self.log_lr())?;
        s.serialize_field("distribution", self.distribution())?;
        s.serialize_field("homogeneity", &self.homogeneity())?;
        s.serialize_field("info_bits", &self.info_bits())?;
        s.serialize_field("support", &self.support())?;
        s.serialize_field("origin", &self.origin)?;
        s.end()
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
    /// The places each item's name mentions (item index, shared between items that
    /// name the same places the same way), from the places source: what the home
    /// levels are fitted to ([`crate::evidence::fit_home_levels`]).
    pub places: Vec<(usize, Arc<super::places::NamedPlaces>)>,
    /// Attributes whose values lie inside another's (a region inside its country, a
    /// town inside its region and country): no finer value may read likelier than the
    /// coarser value it lies in ([`crate::infer::Exposure::posterior`]). Set when the
    /// home levels are fitted.
    pub nested: Vec<Nesting>,
}

/// Values of one attribute (`child`) that lie inside values of another (`parent`).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Nesting {
    pub child: usize,
    pub parent: usize,
    /// Per child value, the parent value it lies in (`None`: not known, such as
    /// "somewhere else").
    pub parent_of: Vec<Option<usize>>,
    /// The child's remainder value, which takes the probability taken from values
    /// read likelier than their parent.
    pub remainder: usize,
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
        self.list.iter().filter(move |e| e.subject() == subject)
    }

    /// Items that carry any evidence.
    pub fn items_with_evidence(&self) -> usize {
        let mut seen = vec![false; self.n_items];
        for e in &self.list {
            if let Subject::Item(i) = e.subject()
                && i < seen.len()
            {
                seen[i] = true;
            }
        }
        seen.iter().filter(|&&b| b).count()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn piece(subject: Subject) -> Evidence {
        Evidence::new(
            subject,
            2,
            Figures {
                log_lr: &[0.5, -0.25, 0.0],
                distribution: &[0.5, 0.2, 0.3],
                homogeneity: 0.1,
                info_bits: 0.2,
                support: 7.0,
            },
            Origin::lexicon("places", "'Hilo' → US-HI"),
        )
    }

    #[test]
    fn packed_numbers_read_back() {
        for subject in [
            Subject::Item(0),
            Subject::Item(123_456),
            Subject::FriendList,
        ] {
            let e = piece(subject);
            assert_eq!(e.subject(), subject);
            assert_eq!(e.attribute(), 2);
            assert_eq!(e.log_lr(), &[0.5, -0.25, 0.0]);
            assert_eq!(e.distribution(), &[0.5, 0.2, 0.3]);
            assert_eq!(
                (e.homogeneity(), e.info_bits(), e.support()),
                (0.1, 0.2, 7.0)
            );
            assert_eq!(e.leaning(), 0);
            let moved = e.about(Subject::Item(9));
            assert_eq!(moved.subject(), Subject::Item(9));
            assert_eq!(moved.log_lr().as_ptr(), e.log_lr().as_ptr(), "shared");
        }
        // A large reference table gives hundreds of thousands of pieces: keep them at
        // 48 bytes (numbers pointer, origin, two 32-bit indices).
        assert!(std::mem::size_of::<Evidence>() <= 48);
        assert!(std::mem::size_of::<Origin>() <= 24);
    }

    /// The JSON form keeps the field names and order it had when every number was a
    /// field of its own.
    #[test]
    fn serialized_form_is_unchanged() {
        let json = serde_json::to_string(&piece(Subject::Item(4))).unwrap();
        assert_eq!(
            json,
            r#"{"subject":{"type":"item","index":4},"attribute":2,"log_lr":[0.5,-0.25,0.0],"distribution":[0.5,0.2,0.3],"homogeneity":0.1,"info_bits":0.2,"support":7.0,"origin":{"type":"lexicon","rule":"places","detail":"'Hilo' → US-HI"}}"#
        );
        let table = Origin::Table {
            matched_by: MatchedBy::Name,
            reference: "Hilo Knitters".into(),
        };
        assert_eq!(
            serde_json::to_string(&table).unwrap(),
            r#"{"type":"table","matched_by":"name","reference":"Hilo Knitters"}"#
        );
    }
}
