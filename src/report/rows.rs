//! The report's item × attribute rows, in report order (most revealing for this person
//! first), made one at a time. A scan of a large archive has hundreds of thousands of
//! rows; the JSON writer streams them from here instead of holding them all, and the
//! text, Markdown and HTML reports make only the few they show.

use std::collections::HashMap;
use std::sync::Arc;

use serde::ser::{Serialize, SerializeSeq, Serializer};

use crate::evidence::{LexiconRule, Origin, Subject};
use crate::footprint::Footprint;
use crate::infer::{Contribution, Exposure};
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
    /// Per attribute, its contributions (strongest toward the best guess first).
    contributions: Vec<Vec<Contribution>>,
    /// Report order: (attribute, position in its contributions).
    order: Vec<(u32, u32)>,
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
        let contributions: Vec<Vec<Contribution>> = (0..priors.attributes.len())
            .map(|ai| exposure.contributions(ai))
            .collect();
        let mut order: Vec<(u32, u32)> =
            Vec::with_capacity(contributions.iter().map(Vec::len).sum());
        for (ai, cs) in contributions.iter().enumerate() {
            order.extend((0..cs.len()).map(|ci| (ai as u32, ci as u32)));
        }
        // Most bits toward the guess first, then the most informative; ties keep the
        // attribute-by-attribute order (so the sort is deterministic).
        let bits = |&(ai, ci): &(u32, u32)| {
            let c = &contributions[ai as usize][ci as usize];
            (
                c.toward_best_bits,
                exposure.evidence().list[c.evidence].info_bits(),
            )
        };
        order.sort_unstable_by(|a, b| {
            let ((xc, xb), (yc, yb)) = (bits(a), bits(b));
            yc.total_cmp(&xc).then(yb.total_cmp(&xb)).then(a.cmp(b))
        });
        Rows {
            footprint,
            exposure,
            attrs,
            contributions,
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
            .map(move |&(ai, ci)| self.row(ai as usize, ci as usize, &mut described))
    }

    fn row(&self, ai: usize, ci: usize, described: &mut Described) -> ItemReport {
        let c = &self.contributions[ai][ci];
        let strings = &self.attrs[ai];
        let e = &self.exposure.evidence().list[c.evidence];
        let (name, kind, date) = match c.subject {
            Subject::Item(i) => {
                let it = &self.footprint.items[i];
                (String::from(&*it.name), it.kind.as_str(), it.date)
            }
            Subject::FriendList => ("your friend list".to_string(), "friends", None),
        };
        let leaning = e.leaning();
        ItemReport {
            name,
            kind,
            attribute: strings.id.clone(),
            reveals: strings.value_ids[leaning].clone(),
            reveals_label: strings.value_labels[leaning].clone(),
            bits: e.info_bits(),
            homogeneity: e.homogeneity(),
            contribution_bits: c.toward_best_bits,
            if_hidden_drop: c.loo_drop,
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
