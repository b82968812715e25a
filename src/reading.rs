//! Plain-words readings of the numbers, for people who are not statisticians:
//! "an observer would guess 25–34 and be right about 7 times in 10".

use crate::alert::{Flag, Rarity};
use crate::priors::Attribute;

/// A probability as a natural frequency: "about 7 times in 10", "about 1 time in 25",
/// "almost every time (more than 19 times in 20)".
pub fn how_often(p: f64) -> String {
    let p = p.clamp(0.0, 1.0);
    if p >= 0.95 {
        return "almost every time (more than 19 times in 20)".into();
    }
    if p >= 0.15 {
        let tenths = (p * 10.0).round() as u32;
        let tenths = tenths.clamp(2, 9);
        return format!("about {tenths} times in 10");
    }
    if p <= 0.0 {
        return "never".into();
    }
    let n = (1.0 / p).round().max(2.0) as u64;
    if n > 1000 {
        return "less than 1 time in 1,000".into();
    }
    format!("about 1 time in {n}")
}

/// Percentage with sensible precision: "68%", "1.8%", "0.04%".
pub fn percent(p: f64) -> String {
    let x = p * 100.0;
    if x >= 10.0 {
        format!("{x:.0}%")
    } else if x >= 1.0 {
        format!("{x:.1}%")
    } else {
        format!("{x:.2}%")
    }
}

/// How a best guess compares with guessing from population rates.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Level {
    /// Above the user's alert threshold.
    Exposed,
    /// Clearly better than chance, but under the threshold.
    Leaning,
    /// About as good as guessing from population rates.
    Quiet,
}

impl Level {
    pub fn word(self) -> &'static str {
        match self {
            Level::Exposed => "exposed",
            Level::Leaning => "leaning",
            Level::Quiet => "quiet",
        }
    }
}

/// Classify a best guess: over threshold → exposed; at least 1.5× the base rate (and
/// 5 points above it) → leaning; else quiet (common practice, no source). This looks at
/// the best guess and the alert level only; [`assess`] applies the whole alert rule.
pub fn level(probability: f64, base_rate: f64, threshold: f64) -> Level {
    if probability > threshold {
        Level::Exposed
    } else {
        leaning_or_quiet(probability, base_rate)
    }
}

fn leaning_or_quiet(probability: f64, base_rate: f64) -> Level {
    if probability >= 1.5 * base_rate && probability - base_rate >= 0.05 {
        Level::Leaning
    } else {
        Level::Quiet
    }
}

/// One attribute judged by the whole alert rule ([`crate::alert`]).
#[derive(Debug, Clone, PartialEq)]
pub struct Assessment {
    /// The best guess (value index) and its probability.
    pub best: usize,
    pub probability: f64,
    pub base_rate: f64,
    pub level: Level,
    /// The value the rule counts as exposed, if any (the best guess or a rarer one).
    pub flag: Option<Flag>,
    /// The plain-words reading.
    pub reading: String,
}

/// Judge one attribute's posterior by its alert level and the rarity rule, and say it
/// in plain words: the one place the reports and the explorer get their verdict and
/// sentence from.
pub fn assess(attr: &Attribute, probs: &[f64], alert_level: f64, rarity: &Rarity) -> Assessment {
    let (best, probability) = crate::stats::argmax(probs);
    let base_rate = attr.base_rates[best];
    let flag = rarity.flag(alert_level, probs, &attr.base_rates);
    let level = if flag.is_some() {
        Level::Exposed
    } else {
        leaning_or_quiet(probability, base_rate)
    };
    let guess = &attr.values[best].label;
    let mut reading = attribute_sentence(&attr.label, guess, probability, base_rate, alert_level);
    if let Some(f) = flag.filter(|f| f.by_rarity) {
        reading = if f.value == best {
            format!(
                "An observer would guess {guess} and be right {}, {} its population rate of {}. That is under your alert level of {}, but for a value this rare a guess over {} and over {} its rate counts as exposed.",
                how_often(probability),
                times(probability, base_rate),
                percent(base_rate),
                percent(alert_level),
                percent(rarity.floor),
                times_plain(rarity.lift),
            )
        } else {
            format!(
                "{reading} But {} is at {}, {} its population rate of {}: for a value this rare a guess over {} and over {} its rate counts as exposed.",
                attr.values[f.value].label,
                percent(f.probability),
                times(f.probability, f.base_rate),
                percent(f.base_rate),
                percent(rarity.floor),
                times_plain(rarity.lift),
            )
        };
    }
    Assessment {
        best,
        probability,
        base_rate,
        level,
        flag,
        reading,
    }
}

/// How far a probability falls, in percentage points, never rounded to a misleading
/// zero: "12 pts", "0.35 pts", "<0.01 pts" (a near-certain guess barely moves), and a
/// rise as "−3.1 pts".
pub fn fall_points(d: f64) -> String {
    let x = d * 100.0;
    let sign = if x < 0.0 { "−" } else { "" };
    let a = x.abs();
    if a == 0.0 {
        "0 pts".into()
    } else if a < 0.01 {
        format!("{sign}<0.01 pts")
    } else if a < 1.0 {
        format!("{sign}{a:.2} pts")
    } else if a < 10.0 {
        format!("{sign}{a:.1} pts")
    } else {
        format!("{sign}{a:.0} pts")
    }
}

/// What each per-item figure means, as (name, meaning): the one wording the text,
/// Markdown and HTML reports' legends use, so they cannot drift apart. "Adds", "points
/// to" and "if hidden" are the one leave-one-out figure of [`crate::effect`].
pub const ITEM_FIGURES: [(&str, &str); 5] = [
    (
        "Bits",
        "how far the item's members differ from everyone (Kullback–Leibler divergence)",
    ),
    (
        "Homogeneity",
        "0 when members are spread evenly over the values, 1 when all alike (measured against an even spread, not the population: members as mixed as everyone read above 0)",
    ),
    (
        "Points to",
        "the value the item pushes the observer's guess toward: the guess itself when it adds bits, else the value it raises most",
    ),
    (
        "Adds",
        "how much the observer's best guess about you rests on the item: its log-odds in bits with the item shown minus with it hidden (negative: it argues against the guess)",
    ),
    (
        "If hidden",
        "how much the best guess's probability would fall if you hid the item (same sign as Adds)",
    ),
];

/// The rarity part of the alert rule in one sentence, for the reports and screens.
pub fn rarity_note(r: &Rarity) -> String {
    if r.is_on() {
        format!(
            "Rare values count too: a value over {} and over {} its population rate counts as exposed, whatever the alert level.",
            percent(r.floor),
            times_plain(r.lift)
        )
    } else {
        "Only the alert levels count: the rule for rare values is off.".into()
    }
}

/// "16×": how many times a rate.
fn times(p: f64, base: f64) -> String {
    if base > 0.0 {
        times_plain(p / base)
    } else {
        "many times".into()
    }
}

fn times_plain(x: f64) -> String {
    if x >= 10.0 || (x - x.round()).abs() < 0.05 {
        format!("{x:.0}×")
    } else {
        format!("{x:.1}×")
    }
}

/// One sentence about one attribute's best guess against one alert level.
pub fn attribute_sentence(
    attribute_label: &str,
    guess_label: &str,
    probability: f64,
    base_rate: f64,
    threshold: f64,
) -> String {
    let attr = attribute_label.to_lowercase();
    let lift = if base_rate > 0.0 {
        probability / base_rate
    } else {
        1.0
    };
    match level(probability, base_rate, threshold) {
        Level::Exposed => format!(
            "An observer would guess {guess_label} and be right {}: {:.1}× better than guessing from population rates, and over your alert level of {}.",
            how_often(probability),
            lift,
            percent(threshold)
        ),
        Level::Leaning => format!(
            "An observer would guess {guess_label} and be right {} ({:.1}× the population rate); under your alert level of {}.",
            how_often(probability),
            lift,
            percent(threshold)
        ),
        Level::Quiet => format!(
            "Your footprint says little about your {attr}: the best guess, {guess_label}, would be right {}, close to guessing from population rates ({}).",
            how_often(probability),
            percent(base_rate)
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn frequencies_read_naturally() {
        assert_eq!(how_often(0.68), "about 7 times in 10");
        assert_eq!(how_often(0.5), "about 5 times in 10");
        assert_eq!(
            how_often(0.97),
            "almost every time (more than 19 times in 20)"
        );
        assert_eq!(how_often(0.04), "about 1 time in 25");
        // Uniform guessing over 55 values: 1/55 ≈ 1.8% (common practice, no source).
        assert_eq!(percent(1.0 / 55.0), "1.8%");
        assert_eq!(how_often(1.0 / 55.0), "about 1 time in 55");
        assert_eq!(how_often(0.0), "never");
    }

    #[test]
    fn levels_follow_threshold_and_lift() {
        assert_eq!(level(0.7, 0.2, 0.5), Level::Exposed);
        assert_eq!(level(0.35, 0.2, 0.5), Level::Leaning);
        assert_eq!(level(0.22, 0.2, 0.5), Level::Quiet);
        let s = attribute_sentence("Age band", "25–34", 0.68, 0.18, 0.5);
        assert!(s.contains("about 7 times in 10"), "{s}");
        assert!(s.contains("3.8×"), "{s}");
    }

    fn religion() -> Attribute {
        // The demo priors' religion rates (rounded): Christian, none, Jewish.
        let base_rates = vec![0.50, 0.46, 0.04];
        Attribute {
            id: "religion".into(),
            label: "Religion".into(),
            values: ["Christian", "None", "Jewish"]
                .iter()
                .map(|l| crate::priors::AttrValue {
                    id: l.to_lowercase(),
                    label: l.to_string(),
                })
                .collect(),
            log_base: base_rates.iter().map(|b: &f64| b.ln()).collect(),
            member_rates: base_rates.clone(),
            base_rates,
            threshold: 0.7,
            smoothing: 4.0,
            pseudocount: 1.0,
            special_category: None,
            calibration: crate::priors::Calibration::Temperature { lambda: 1.0 },
        }
    }

    #[test]
    fn assess_applies_the_rarity_rule() {
        let a = religion();
        let r = Rarity::default();
        // Jewish at 63% (16× its rate) under a 70% level: exposed for rarity.
        let x = assess(&a, &[0.2, 0.17, 0.63], 0.7, &r);
        assert_eq!(x.level, Level::Exposed);
        assert_eq!(x.flag.map(|f| (f.value, f.by_rarity)), Some((2, true)));
        assert!(x.reading.contains("16×"), "{}", x.reading);
        assert!(
            x.reading.contains("under your alert level of 70%"),
            "{}",
            x.reading
        );
        // A rare value that is not the best guess is named after the best guess.
        let x = assess(&a, &[0.52, 0.23, 0.25], 0.7, &r);
        assert_eq!(x.level, Level::Exposed);
        assert_eq!(x.best, 0);
        assert!(x.reading.contains("Jewish is at 25%"), "{}", x.reading);
        // With the rule off, the same posterior is only leaning or quiet.
        let x = assess(&a, &[0.2, 0.17, 0.63], 0.7, &Rarity::OFF);
        assert_ne!(x.level, Level::Exposed);
        assert!(x.flag.is_none());
        // Over the alert level: the usual sentence.
        let x = assess(&a, &[0.9, 0.05, 0.05], 0.7, &r);
        assert_eq!(x.flag.map(|f| (f.value, f.by_rarity)), Some((0, false)));
        assert!(
            x.reading.contains("over your alert level of 70%"),
            "{}",
            x.reading
        );
        assert!(rarity_note(&r).contains("over 20% and over 5×"));
        assert_eq!(fall_points(1e-7), "<0.01 pts");
        assert_eq!(fall_points(-0.031), "−3.1 pts");
        assert_eq!(fall_points(0.12), "12 pts");
    }
}
