//! Who belongs to what. Each member joins a number of items drawn from a log-normal
//! distribution; which items is a weighted draw without replacement
//! (Efraimidis–Spirakis keys), weights `exp(log-popularity + tilts matching the
//! member)`, so members gather in items that fit them: homophilous membership.

use rand::Rng;

use super::catalogue::CatItem;
use super::world::{Profile, draw_profile};

/// A standard normal draw (Box–Muller).
pub fn normal(rng: &mut impl Rng) -> f64 {
    let u1: f64 = rng.random_range(f64::MIN_POSITIVE..1.0);
    let u2: f64 = rng.random();
    (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
}

/// How many items a member joins: log-normal around `mean`, within 5..=cap.
pub fn draw_degree(rng: &mut impl Rng, mean: f64, cap: usize) -> usize {
    let sigma = 0.6;
    let mu = mean.ln() - sigma * sigma / 2.0;
    ((mu + sigma * normal(rng)).exp().round() as usize).clamp(5, cap)
}

/// Draw `d` distinct items for a member.
pub fn affiliations(
    rng: &mut impl Rng,
    catalogue: &[CatItem],
    profile: &Profile,
    d: usize,
) -> Vec<u32> {
    let d = d.min(catalogue.len());
    let mut keyed: Vec<(f64, u32)> = catalogue
        .iter()
        .enumerate()
        .map(|(i, item)| {
            let u: f64 = rng.random_range(f64::MIN_POSITIVE..1.0);
            // key = u^(1/w), compared in log space: ln(u)/w.
            (u.ln() * (-item.log_weight(profile)).exp(), i as u32)
        })
        .collect();
    if d < keyed.len() {
        keyed.select_nth_unstable_by(d, |a, b| b.0.total_cmp(&a.0));
        keyed.truncate(d);
    }
    let mut out: Vec<u32> = keyed.into_iter().map(|(_, i)| i).collect();
    out.sort_unstable();
    out
}

/// A population: profiles and the items each member joined.
#[derive(Debug, Clone)]
pub struct Population {
    pub profiles: Vec<Profile>,
    pub affiliations: Vec<Vec<u32>>,
}

/// Draw `n` members and their affiliations.
pub fn populate(
    rng: &mut impl Rng,
    catalogue: &[CatItem],
    n: usize,
    mean_degree: f64,
) -> Population {
    let mut profiles = Vec::with_capacity(n);
    let mut affs = Vec::with_capacity(n);
    for _ in 0..n {
        let p = draw_profile(rng);
        let d = draw_degree(rng, mean_degree, 400);
        affs.push(affiliations(rng, catalogue, &p, d));
        profiles.push(p);
    }
    Population {
        profiles,
        affiliations: affs,
    }
}
