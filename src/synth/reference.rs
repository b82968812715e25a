//! Reference statistics from the synthetic population: member counts per item and
//! attribute value, and the population's own base rates, written as a priors file
//! (marked synthetic in its provenance).

use std::collections::BTreeMap;

use super::catalogue::CatItem;
use super::membership::Population;
use super::world::{attribute_specs, cardinalities};
use crate::priors::{FORMAT, ItemSpec, MemberSpec, PriorsFile, Provenance};

/// Items with fewer members than this are left out of the table (common practice, no
/// source: tiny items give unstable shares and could single people out).
pub const MIN_MEMBERS: usize = 5;

/// Counts per item (per attribute, per value) and per attribute over all members.
pub struct Counts {
    pub items: Vec<[Vec<f64>; 4]>,
    pub population: [Vec<f64>; 4],
    /// Memberships per attribute value, over all items.
    pub memberships: [Vec<f64>; 4],
    pub members: Vec<usize>,
}

pub fn count(pop: &Population, catalogue: &[CatItem]) -> Counts {
    let k = cardinalities();
    let empty = || -> [Vec<f64>; 4] {
        [
            vec![0.0; k[0]],
            vec![0.0; k[1]],
            vec![0.0; k[2]],
            vec![0.0; k[3]],
        ]
    };
    let mut items: Vec<[Vec<f64>; 4]> = (0..catalogue.len()).map(|_| empty()).collect();
    let mut members = vec![0usize; catalogue.len()];
    let mut population = empty();
    let mut memberships = empty();
    for (profile, affs) in pop.profiles.iter().zip(&pop.affiliations) {
        for a in 0..4 {
            population[a][profile[a]] += 1.0;
        }
        for &i in affs {
            members[i as usize] += 1;
            for a in 0..4 {
                items[i as usize][a][profile[a]] += 1.0;
                memberships[a][profile[a]] += 1.0;
            }
        }
    }
    Counts {
        items,
        population,
        memberships,
        members,
    }
}

/// The priors file for the counted population.
pub fn priors_file(
    counts: &Counts,
    catalogue: &[CatItem],
    fitted: [(f64, f64, f64); 4],
    contributors: usize,
    seed: u64,
) -> PriorsFile {
    let attributes = attribute_specs(&counts.population, &counts.memberships, fitted);
    let items = catalogue
        .iter()
        .enumerate()
        .filter(|(i, _)| counts.members[*i] >= MIN_MEMBERS)
        .map(|(i, item)| {
            let mut members = BTreeMap::new();
            for (a, spec) in attributes.iter().enumerate() {
                members.insert(
                    spec.id.clone(),
                    MemberSpec::Counts(counts.items[i][a].clone()),
                );
            }
            ItemSpec {
                id: Some(item.id.clone()),
                name: item.name.clone(),
                kind: Some(item.kind),
                aliases: Vec::new(),
                members,
            }
        })
        .collect();
    PriorsFile {
        format: FORMAT,
        provenance: Provenance {
            source: "telltale synth: the fictional Lanternwick network".into(),
            licence: "CC0-1.0".into(),
            created: "2026-11-30".into(),
            method: format!(
                "Member counts per item from {contributors} invented members (seed {seed}); items with fewer than {MIN_MEMBERS} members left out; smoothing and calibration temperatures fitted on separate invented members by minimum log loss. Describes no real people."
            ),
            synthetic: true,
            contributors: Some(contributors as u64),
            privacy: None,
        },
        attributes,
        items,
    }
}
