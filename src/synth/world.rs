//! The fictional network's people: the four protected attributes with their values and
//! intended rates, and a population of members drawn from them with mild, invented
//! correlations (older members lean a little further right and are a little more often
//! religious). Everything here is invented for the demo.

use rand::Rng;
use rand::distr::{Distribution, weighted::WeightedIndex};

use super::places::STATES;
use crate::priors::{AttributeSpec, Calibration, ValueSpec};

/// Attribute order used throughout the generator.
pub const AGE: usize = 0;
pub const LOCATION: usize = 1;
pub const POLITICS: usize = 2;
pub const RELIGION: usize = 3;

pub const AGE_BANDS: [(&str, &str, f64); 7] = [
    ("13-17", "13–17", 0.05),
    ("18-24", "18–24", 0.13),
    ("25-34", "25–34", 0.20),
    ("35-44", "35–44", 0.19),
    ("45-54", "45–54", 0.16),
    ("55-64", "55–64", 0.14),
    ("65+", "65+", 0.13),
];

/// Ages at the start and end of each band (65+ capped at 85 for birth years).
pub const AGE_SPANS: [(i32, i32); 7] = [
    (13, 17),
    (18, 24),
    (25, 34),
    (35, 44),
    (45, 54),
    (55, 64),
    (65, 85),
];

pub const POLITICS_VALUES: [(&str, &str, f64); 5] = [
    ("left", "Left", 0.12),
    ("centre-left", "Centre-left", 0.24),
    ("centre", "Centre", 0.28),
    ("centre-right", "Centre-right", 0.22),
    ("right", "Right", 0.14),
];

pub const RELIGION_VALUES: [(&str, &str, f64); 7] = [
    ("none", "No religion", 0.33),
    ("christian", "Christian", 0.47),
    ("muslim", "Muslim", 0.05),
    ("jewish", "Jewish", 0.04),
    ("hindu", "Hindu", 0.03),
    ("buddhist", "Buddhist", 0.03),
    ("other", "Another religion", 0.05),
];

/// Number of values per attribute, in attribute order.
pub fn cardinalities() -> [usize; 4] {
    [
        AGE_BANDS.len(),
        STATES.len(),
        POLITICS_VALUES.len(),
        RELIGION_VALUES.len(),
    ]
}

/// Whether an attribute's values are ordered (neighbours are similar).
pub fn is_ordinal(attr: usize) -> bool {
    attr == AGE || attr == POLITICS
}

/// A member's latent attributes (value index per attribute).
pub type Profile = [usize; 4];

/// Draw one member.
pub fn draw_profile(rng: &mut impl Rng) -> Profile {
    let age = weighted(rng, AGE_BANDS.iter().map(|v| v.2));
    let location = weighted(rng, STATES.iter().map(|s| s.2));
    let tilt = age as f64 - 3.0;
    let politics = weighted(
        rng,
        POLITICS_VALUES
            .iter()
            .enumerate()
            .map(|(i, v)| v.2 * (0.12 * tilt * (i as f64 - 2.0)).exp()),
    );
    let religion = weighted(
        rng,
        RELIGION_VALUES.iter().enumerate().map(|(i, v)| {
            if i == 0 {
                v.2 * (-0.15 * tilt).exp()
            } else {
                v.2
            }
        }),
    );
    [age, location, politics, religion]
}

pub fn weighted(rng: &mut impl Rng, weights: impl Iterator<Item = f64>) -> usize {
    let w: Vec<f64> = weights.collect();
    match WeightedIndex::new(&w) {
        Ok(d) => d.sample(rng),
        Err(_) => rng.random_range(0..w.len().max(1)),
    }
}

/// Attribute specs with base rates taken from an observed population.
/// Attribute specs from observed counts: `people` per value (base rates) and
/// `memberships` per value (membership rates). `fitted` holds (smoothing α,
/// pseudo-count k, temperature λ) per attribute.
pub fn attribute_specs(
    people: &[Vec<f64>; 4],
    memberships: &[Vec<f64>; 4],
    fitted: [(f64, f64, f64); 4],
) -> Vec<AttributeSpec> {
    let rates = |c: &Vec<f64>| -> Vec<f64> {
        let total: f64 = c.iter().sum::<f64>() + c.len() as f64 * 0.5;
        c.iter().map(|x| round6((x + 0.5) / total)).collect()
    };
    let both = |a: usize| -> Vec<(f64, f64)> {
        rates(&people[a])
            .into_iter()
            .zip(rates(&memberships[a]))
            .collect()
    };
    let spec = |id: &str,
                label: &str,
                threshold: f64,
                special: Option<&str>,
                values: Vec<(String, String)>,
                rates: Vec<(f64, f64)>,
                fit: (f64, f64, f64)| AttributeSpec {
        id: id.into(),
        label: label.into(),
        threshold,
        smoothing: Some(fit.0),
        pseudocount: Some(fit.1),
        special_category: special.map(str::to_string),
        values: values
            .into_iter()
            .zip(rates)
            .map(|((id, label), (base_rate, member_rate))| ValueSpec {
                id,
                label,
                base_rate,
                member_rate: Some(member_rate),
            })
            .collect(),
        calibration: Some(Calibration::Temperature { lambda: fit.2 }),
    };
    let pairs = |v: &[(&str, &str, f64)]| -> Vec<(String, String)> {
        v.iter()
            .map(|x| (x.0.to_string(), x.1.to_string()))
            .collect()
    };
    vec![
        spec(
            "age_band",
            "Age band",
            0.5,
            None,
            pairs(&AGE_BANDS),
            both(AGE),
            fitted[AGE],
        ),
        spec(
            "location",
            "Home location",
            0.35,
            None,
            STATES
                .iter()
                .map(|s| (s.0.to_string(), s.1.to_string()))
                .collect(),
            both(LOCATION),
            fitted[LOCATION],
        ),
        spec(
            "politics",
            "Political leaning",
            0.5,
            Some("political opinions"),
            pairs(&POLITICS_VALUES),
            both(POLITICS),
            fitted[POLITICS],
        ),
        spec(
            "religion",
            "Religion",
            0.7,
            Some("religious or philosophical beliefs"),
            pairs(&RELIGION_VALUES),
            both(RELIGION),
            fitted[RELIGION],
        ),
    ]
}

pub fn round6(x: f64) -> f64 {
    (x * 1e6).round() / 1e6
}

/// The value id of a profile entry.
pub fn value_id(attr: usize, value: usize) -> &'static str {
    match attr {
        AGE => AGE_BANDS[value].0,
        LOCATION => STATES[value].0,
        POLITICS => POLITICS_VALUES[value].0,
        _ => RELIGION_VALUES[value].0,
    }
}

/// The value label of a profile entry.
pub fn value_label(attr: usize, value: usize) -> &'static str {
    match attr {
        AGE => AGE_BANDS[value].1,
        LOCATION => STATES[value].1,
        POLITICS => POLITICS_VALUES[value].1,
        _ => RELIGION_VALUES[value].1,
    }
}
