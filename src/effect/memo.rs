//! The effects of many subjects in one state of an exposure (a list of every item),
//! each worked out once for every distinct thing it can depend on.
//!
//! A subject's effect on an attribute ([`effect_given`]) is a function of the
//! exposure's state (its running sums, cause groups' counts and which subjects are
//! hidden), whether the subject itself is hidden, and its own pieces of evidence in
//! order: for each, its attribute, numbers, footing, cause group and source weight.
//! [`Exposure::posterior_toggled`] reads nothing else of the subject, also for a nested
//! attribute (the coarser attribute's toggled posterior reads the same pieces). Items
//! whose pieces are the same in all of these (many names mentioning the same place
//! share one piece's numbers, [`crate::evidence::Evidence::about`]) get the very figure
//! the first of them got, bit for bit, without working it out again.
//!
//! Which subjects are alike is fixed for an exposure (its evidence never changes, only
//! what is hidden), so [`Alike`] is found once per exposure ([`Exposure::alike`]); a
//! [`Memo`] lives for one state.

use foldhash::{HashMap, HashMapExt};

use super::{Effect, effect_given};
use crate::combine::Footing;
use crate::evidence::Subject;
use crate::infer::{Exposure, Posterior};

/// One piece of a subject's evidence, as far as [`effect_given`] can tell pieces
/// apart: (attribute and footing, its shared numbers, its cause group, its source
/// weight's bits).
type PieceKey = [u64; 4];

/// A subject that shares its evidence with no other subject.
const UNIQUE: u32 = u32::MAX;

fn piece_key(x: &Exposure, ei: usize) -> PieceKey {
    let g = x.grouping();
    let e = &x.evidence().list[ei];
    let rule = u64::from(g.footing[ei] == Footing::RuleOfThumb);
    [
        e.attribute() as u64 | rule << 32,
        e.numbers_id() as u64,
        u64::from(g.group_of[ei]),
        g.weight[ei].to_bits(),
    ]
}

/// A subject's slot: items in order, then the friend list.
fn slot(x: &Exposure, subject: Subject) -> usize {
    match subject {
        Subject::Item(i) => i,
        Subject::FriendList => x.evidence().n_items,
    }
}

/// Subjects whose evidence is the same piece for piece (see the module text), in
/// classes: only subjects with at least one other like them get a class.
#[derive(Debug, Clone, PartialEq)]
pub struct Alike {
    /// Per subject slot (items, then the friend list): its class, or [`UNIQUE`].
    class: Vec<u32>,
    classes: usize,
}

impl Alike {
    pub fn new(x: &Exposure) -> Alike {
        let n_items = x.evidence().n_items;
        let subject = |s: usize| {
            if s == n_items {
                Subject::FriendList
            } else {
                Subject::Item(s)
            }
        };
        let mut keys: Vec<PieceKey> = Vec::with_capacity(x.evidence().list.len());
        let mut starts = Vec::with_capacity(n_items + 2);
        starts.push(0);
        for s in 0..=n_items {
            keys.extend(x.evidence_of(subject(s)).iter().map(|&ei| piece_key(x, ei)));
            starts.push(keys.len());
        }
        let mut class = vec![UNIQUE; n_items + 1];
        let mut classes = 0u32;
        let mut first: HashMap<&[PieceKey], usize> = HashMap::with_capacity(n_items + 1);
        for s in 0..=n_items {
            let key = &keys[starts[s]..starts[s + 1]];
            if key.is_empty() {
                continue;
            }
            match first.get(key) {
                Some(&f) => {
                    if class[f] == UNIQUE {
                        class[f] = classes;
                        classes += 1;
                    }
                    class[s] = class[f];
                }
                None => {
                    first.insert(key, s);
                }
            }
        }
        Alike {
            class,
            classes: classes as usize,
        }
    }

    /// How many classes of two or more alike subjects there are.
    pub fn classes(&self) -> usize {
        self.classes
    }

    /// Whether two subjects' evidence is the same piece for piece (a subject with no
    /// evidence is like no other).
    pub fn same(&self, x: &Exposure, s: Subject, t: Subject) -> bool {
        let (c, d) = (self.class[slot(x, s)], self.class[slot(x, t)]);
        s == t || (c != UNIQUE && c == d)
    }
}

/// No figure yet.
const EMPTY: u32 = u32::MAX;

/// The effects of many subjects in one state of an exposure: [`crate::effect::effect`]'s
/// figures, bit for bit, each worked out once per class of alike subjects, attribute
/// and hidden or not. Only valid while the exposure does not change (it is borrowed).
pub struct Memo<'x> {
    x: &'x Exposure,
    alike: &'x Alike,
    now: Vec<Posterior>,
    /// Per class, attribute and hidden flag: where its figure is in `figures`.
    at: Vec<u32>,
    figures: Vec<Effect>,
}

impl<'x> Memo<'x> {
    pub fn new(x: &'x Exposure) -> Memo<'x> {
        let alike = x.alike();
        Memo {
            now: (0..x.n_attributes()).map(|a| x.posterior(a)).collect(),
            at: vec![EMPTY; alike.classes * x.n_attributes() * 2],
            x,
            alike,
            figures: Vec::new(),
        }
    }

    pub fn exposure(&self) -> &'x Exposure {
        self.x
    }

    /// Attribute `a`'s posterior now.
    pub fn posterior(&self, a: usize) -> &Posterior {
        &self.now[a]
    }

    /// [`crate::effect::effect`]: the same figures, bit for bit.
    pub fn effect(&mut self, a: usize, subject: Subject) -> Effect {
        let x = self.x;
        let class = self.alike.class[slot(x, subject)];
        if class == UNIQUE {
            return effect_given(x, a, subject, &self.now[a]);
        }
        let i = (class as usize * x.n_attributes() + a) * 2 + usize::from(x.is_hidden(subject));
        if let Some(fx) = self.figures.get(self.at[i] as usize) {
            return *fx;
        }
        let fx = effect_given(x, a, subject, &self.now[a]);
        self.at[i] = self.figures.len() as u32;
        self.figures.push(fx);
        fx
    }
}
