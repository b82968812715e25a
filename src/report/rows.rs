//! The report's item × attribute rows, in report order (most revealing for this person
//! first), made one at a time. A scan of a large archive has hundreds of thousands of
//! rows; the JSON writer streams them from here instead of holding them all, and the
//! text, Markdown and HTML reports make only the few they show.

use std::cell::RefCell;
use std::collections::HashMap;
use std::sync::Arc;

use serde::ser::{Serialize, SerializeSeq, Serializer};

use crate::effect::Memo;
use crate::evidence::{LexiconRule, Origin, Subject};
use crate::footprint::Footprint;
use crate::infer::Exposure;
use crate::priors::Priors;

use super::build::ItemReport;

/// How many of the rows a report holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RowCount {
    /// Every row (what `--format json` writes).
    All,
    /// The first `n` in report order (what the text, Markdown and HTML reports show).
    First(usize),
    /// None: the rows are streamed separately ([`Rows`]).
    Nothing,
}

/// One attribute's strings, shared by every row about it.
struct AttrStrings {
    id: Arc<str>,
    value_ids: Vec<Arc<str>>,
    value_labels: Vec<Arc<str>>,
}

/// The rows of a report, ready to be made in order.
pub struct Rows<'a> {
    footprint: &'a Footprint,
    exposure: &'a Exposure,
    attrs: Vec<AttrStrings>,
    /// Each row's figure, measured against each attribute's posterior now; items
    /// sharing evidence have theirs worked out once ([`Memo`]).
    effects: RefCell<Memo<'a>>,
    /// Report order: indices into the evidence list (visible subjects only). A row's
    /// figures are worked out when it is made, so a large archive's rows cost four
    /// bytes each until then.
    order: Vec<u32>,
}

impl<'a> Rows<'a> {
    pub fn new(footprint: &'a Footprint, priors: &Priors, exposure: &'a Exposure) -> Self {
        let attrs = priors
            .attributes
            .iter()
            .map(|a| AttrStrings {
                id: a.id.as_str().into(),
                value_ids: a.values.iter().map(|v| v.id.as_str().into()).collect(),
                value_labels: a.values.iter().map(|v| v.label.as_str().into()).collect(),
            })
            .collect();
        let mut effects = Memo::new(exposure);
        let list = &exposure.evidence().list;
        // Most bits toward the guess first (the leave-one-out figure of
        // [`crate::effect`]), then the most informative; ties go by attribute, then by
        // evidence order (so the sort is deterministic).
        let mut keyed: Vec<(f64, f64, usize, u32)> = (0..list.len())
            .filter(|&i| !exposure.is_hidden(list[i].subject()))
            .map(|i| {
                let e = &list[i];
                let a = e.attribute();
                let bits = effects.effect(a, e.subject()).bits;
                (bits, e.info_bits(), e.attribute(), i as u32)
            })
            .collect();
        keyed.sort_unstable_by(|(xc, xb, xa, a), (yc, yb, ya, b)| {
            yc.total_cmp(xc)
                .then(yb.total_cmp(xb))
                .then(xa.cmp(ya))
                .then(a.cmp(b))
        });
        let order: Vec<u32> = keyed.into_iter().map(|k| k.3).collect();
        Rows {
            footprint,
            exposure,
            attrs,
            effects: RefCell::new(effects),
            order,
        }
    }

    pub fn len(&self) -> usize {
        self.order.len()
    }

    pub fn is_empty(&self) -> bool {
        self.order.is_empty()
    }

    /// The rows in report order, each made when it is reached.
    pub fn iter(&self) -> impl Iterator<Item = ItemReport> + '_ {
        let mut described = Described::default();
        self.order
            .iter()
            .map(move |&ei| self.row(ei as usize, &mut described))
    }

    fn row(&self, ei: usize, described: &mut Described) -> ItemReport {
        let e = &self.exposure.evidence().list[ei];
        let ai = e.attribute();
        let strings = &self.attrs[ai];
        // Leave-one-out: what all of this subject's evidence for the attribute does to
        // the best guess.
        let fx = self.effects.borrow_mut().effect(ai, e.subject());
        let (name, kind, date) = match e.subject() {
            Subject::Item(i) => {
                let it = &self.footprint.items[i];
                (String::from(&*it.name), it.kind.as_str(), it.date)
            }
            Subject::FriendList => ("your friend list".to_string(), "friends", None),
        };
        ItemReport {
            name,
            kind,
            attribute: strings.id.clone(),
            reveals: strings.value_ids[fx.points_to].clone(),
            reveals_label: strings.value_labels[fx.points_to].clone(),
            bits: e.info_bits(),
            homogeneity: e.homogeneity(),
            contribution_bits: fx.bits,
            if_hidden_drop: fx.drop_if_hidden(),
            support: e.support(),
            source: e.origin.kind(),
            source_detail: described.get(&e.origin),
            date,
        }
    }
}

/// A JSON array of the rows, made one at a time while it is written.
impl Serialize for Rows<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut seq = serializer.serialize_seq(Some(self.len()))?;
        for row in self.iter() {
            seq.serialize_element(&row)?;
        }
        seq.end()
    }
}

/// Descriptions of evidence origins; lexicon origins shared by many items (the same
/// place, the same rule) are described once.
#[derive(Default)]
struct Described(HashMap<*const LexiconRule, Arc<str>>);

impl Described {
    fn get(&mut self, origin: &Origin) -> Arc<str> {
        match origin {
            Origin::Lexicon(rule) => self
                .0
                .entry(Arc::as_ptr(rule))
                .or_insert_with(|| origin.describe().into())
                .clone(),
            other => other.describe().into(),
        }
    }
}
