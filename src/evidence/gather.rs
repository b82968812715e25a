//! Running the evidence sources over a footprint. The priors table goes first; the
//! lexicon sources (places, life stages, vocabulary) then speak only for the item ×
//! attribute pairs the table said nothing about, so one membership is never counted
//! twice. Friends add one piece of evidence per attribute for the friend list as a
//! whole. Special-category flags are raised on every item, matched or not.

use std::ops::Range;

use super::beliefs::vocabulary_item;
use super::friends::from_friends;
use super::life_stage::{LifeStageSource, newest_date};
use super::model::{EvidenceSet, Subject};
use super::places::{PlaceMemo, PlaceSource};
use super::sources::{Lexicon, Sources};
use super::table::from_table;
use crate::footprint::Footprint;
use crate::lexicon::{Vocabulary, tokens};
use crate::priors::Priors;

/// Footprints smaller than this are read on one thread (common practice, no source:
/// below a few thousand names a thread costs more than it saves).
const PARALLEL_ITEMS: usize = 4096;

/// Gather the evidence the chosen sources give for a footprint.
///
/// The lexicon sources look at each item name once: its tokens are made once and
/// handed to every source. Large footprints are split into contiguous runs of items
/// read on separate threads; the pieces are joined in source order, then item order,
/// so the result is the same list, in the same order, as one thread gives.
pub fn gather(footprint: &Footprint, priors: &Priors, sources: &Sources) -> EvidenceSet {
    let threads = if footprint.items.len() >= PARALLEL_ITEMS {
        std::thread::available_parallelism()
            .map(|n| n.get())
            .unwrap_or(1)
            .clamp(1, 8)
    } else {
        1
    };
    gather_on(footprint, priors, sources, threads)
}

/// As [`gather`], reading the item names on `threads` threads.
fn gather_on(
    footprint: &Footprint,
    priors: &Priors,
    sources: &Sources,
    threads: usize,
) -> EvidenceSet {
    let n_items = footprint.items.len();
    let mut set = EvidenceSet::new(n_items);
    set.sources = sources.enabled();
    if sources.table {
        from_table(footprint, priors, &mut set);
    }
    let n_attrs = priors.attributes.len();
    let mut table = vec![false; n_items * n_attrs];
    for e in &set.list {
        if let Subject::Item(i) = e.subject()
            && i < n_items
            && e.attribute() < n_attrs
        {
            table[i * n_attrs + e.attribute()] = true;
        }
    }
    let gazetteer = sources.places.as_ref().map(Lexicon::get);
    let rules = sources.life_stages.as_ref().map(Lexicon::get);
    let vocabulary = sources.vocabulary.as_ref().map(Lexicon::get);
    let places = gazetteer.as_deref().map(|g| PlaceSource::new(priors, g));
    let life = rules.as_deref().and_then(|rules| {
        let reference = sources
            .reference_time
            .or_else(|| newest_date(footprint))
            .unwrap_or_else(now);
        set.reference_time = Some(reference);
        LifeStageSource::new(priors, rules, reference)
    });
    let lexicons = Lexicons {
        places,
        life,
        vocabulary: vocabulary.as_deref(),
        priors,
    };
    if lexicons.any() {
        let runs = split(n_items, threads);
        let covered = &table;
        let mut pieces: Vec<[EvidenceSet; 3]> = if runs.len() <= 1 {
            runs.into_iter()
                .map(|r| lexicons.run(footprint, r, covered, n_attrs))
                .collect()
        } else {
            std::thread::scope(|scope| {
                let lexicons = &lexicons;
                let handles: Vec<_> = runs
                    .into_iter()
                    .map(|r| scope.spawn(move || lexicons.run(footprint, r, covered, n_attrs)))
                    .collect();
                handles
                    .into_iter()
                    .map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)))
                    .collect()
            })
        };
        // Room for the friend list's evidence too, so the list is not reallocated. A
        // large footprint's pieces are several megabytes: while the list is still empty
        // the first piece becomes it (grown in place) rather than being copied, and each
        // piece is freed as soon as it has been added.
        let mut left: usize = pieces.iter().flatten().map(|p| p.list.len()).sum();
        for source in 0..3 {
            for piece in pieces.iter_mut() {
                let piece = std::mem::take(&mut piece[source]);
                left -= piece.list.len();
                let mut list = piece.list;
                if set.list.is_empty() {
                    std::mem::swap(&mut set.list, &mut list);
                    // Its spare room (it grew by doubling) trimmed to what is to come.
                    set.list.shrink_to(set.list.len() + left + n_attrs);
                }
                set.list.reserve_exact(list.len() + left + n_attrs);
                set.list.extend(list);
                set.special.extend(piece.special);
                set.places.extend(piece.places);
            }
        }
    }
    if sources.friends {
        from_friends(footprint, priors, &mut set);
    }
    set
}

/// The lexicon sources that run, set up for one priors file.
struct Lexicons<'a> {
    places: Option<PlaceSource<'a>>,
    life: Option<LifeStageSource<'a>>,
    vocabulary: Option<&'a Vocabulary>,
    priors: &'a Priors,
}

impl Lexicons<'_> {
    fn any(&self) -> bool {
        self.places.is_some() || self.life.is_some() || self.vocabulary.is_some()
    }

    /// Evidence for the items in `run`, per source (places, life stages, vocabulary).
    fn run(
        &self,
        footprint: &Footprint,
        run: Range<usize>,
        table: &[bool],
        n_attrs: usize,
    ) -> [EvidenceSet; 3] {
        let n = footprint.items.len();
        let mut out = [
            EvidenceSet::new(n),
            EvidenceSet::new(n),
            EvidenceSet::new(n),
        ];
        let covered = |i: usize, a: usize| table[i * n_attrs + a];
        let mut memo = PlaceMemo::default();
        for i in run {
            let item = &footprint.items[i];
            let toks = tokens(&item.name);
            if let Some(p) = &self.places {
                p.item(i, &toks, &covered, &mut memo, &mut out[0]);
            }
            if let Some(l) = &self.life {
                l.item(i, item, &toks, &covered, &mut out[1]);
            }
            if let Some(v) = self.vocabulary {
                vocabulary_item(self.priors, v, i, item, &toks, &covered, &mut out[2]);
            }
        }
        // The lists grew by doubling; they are held until every run is joined.
        for set in &mut out {
            set.list.shrink_to_fit();
            set.places.shrink_to_fit();
        }
        out
    }
}

/// `n` items in at most `parts` contiguous runs of nearly equal length.
fn split(n: usize, parts: usize) -> Vec<Range<usize>> {
    let parts = parts.clamp(1, n.max(1));
    (0..parts)
        .map(|p| (n * p / parts)..(n * (p + 1) / parts))
        .filter(|r| !r.is_empty())
        .collect()
}

fn now() -> i64 {
    std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs() as i64)
        .unwrap_or(0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::footprint::{Item, ItemKind, Origin};
    use crate::scan::load_priors;

    /// Names that wake every lexicon source: places, life stages with and without
    /// years, belief words, special categories, and names that say nothing.
    fn names(n: usize) -> Vec<String> {
        let places = [
            "Portland",
            "Tigard",
            "New York City",
            "Boise",
            "Reading",
            "Kazan",
        ];
        let shapes = [
            "{p} Farmers Market",
            "Class of 2004 {p} High",
            "{p} Mosque Community",
            "Young Socialists of {p}",
            "Knitting Circle",
            "{p} Parents' Association",
            "Retired Teachers {p}",
            "Мечеть в Казани",
        ];
        (0..n)
            .map(|i| {
                let p = places[i % places.len()];
                let shape = shapes[(i / places.len()) % shapes.len()];
                format!("{} {i}", shape.replace("{p}", p))
            })
            .collect()
    }

    #[test]
    fn threads_give_the_same_evidence_in_the_same_order() {
        let priors = load_priors(None).unwrap();
        let footprint = Footprint {
            items: names(PARALLEL_ITEMS + 123)
                .into_iter()
                .enumerate()
                .map(|(i, name)| Item {
                    kind: ItemKind::Group,
                    name: name.into(),
                    id: None,
                    category: (i % 7 == 0).then(|| "Religious organisation".into()),
                    date: Some(1_100_000_000 + i as i64 * 86_400),
                    origin: Origin {
                        file: "groups.json".into(),
                        record: i + 1,
                    },
                })
                .collect(),
            ..Footprint::default()
        };
        let sources = Sources::all();
        let one = gather_on(&footprint, &priors, &sources, 1);
        assert!(one.list.len() > PARALLEL_ITEMS, "{} pieces", one.list.len());
        assert!(!one.special.is_empty());
        for threads in [2, 3, 8] {
            let many = gather_on(&footprint, &priors, &sources, threads);
            assert_eq!(many.list, one.list, "{threads} threads");
            assert_eq!(many.special, one.special, "{threads} threads");
            assert_eq!(many.reference_time, one.reference_time);
        }
    }

    #[test]
    fn runs_cover_every_item_once() {
        for (n, parts) in [(0, 2), (1, 4), (10, 3), (4096, 2), (7, 8)] {
            let runs = split(n, parts);
            assert!(runs.len() <= parts.max(1));
            let all: Vec<usize> = runs.into_iter().flatten().collect();
            assert_eq!(all, (0..n).collect::<Vec<_>>());
        }
    }
}
