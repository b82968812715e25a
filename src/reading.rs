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

/// A count with its noun, singular for exactly one: `count(1, "item", "items")` is
/// "1 item", `count(0, "item", "items")` "0 items". Every "N things" a person reads
/// goes through here, so no screen says "1 items" or "1 other values".
pub fn count(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// What feeds an attribute, in words: "no evidence", "fed by 1 piece of evidence",
/// "fed by 12 pieces of evidence" (the reports' line under each attribute).
pub fn fed_by(feeding: usize) -> String {
    if feeding == 0 {
        "no evidence".into()
    } else {
        format!(
            "fed by {}",
            count(feeding, "piece of evidence", "pieces of evidence")
        )
    }
}

/// How many of the pieces of evidence feeding an attribute point to its guess, in
/// words, the verb agreeing with the count: "no evidence", "its one piece of evidence
/// does not support it", "none of the 3 pieces of evidence supports it", "1 of 5 pieces
/// of evidence supports it", "80 of 151 pieces of evidence support it", "all 3 pieces
/// of evidence support it", "its one piece of evidence supports it". With
/// `of_evidence` false, "of evidence" is left out ("none of the 3 pieces supports it")
/// for a short line; "no evidence" stays as it is.
pub fn support_phrase(supporting: usize, feeding: usize, of_evidence: bool) -> String {
    let of = if of_evidence { " of evidence" } else { "" };
    let supporting = supporting.min(feeding);
    match (supporting, feeding) {
        (_, 0) => "no evidence".into(),
        (0, 1) => format!("its one piece{of} does not support it"),
        (1, 1) => format!("its one piece{of} supports it"),
        (0, n) => format!("none of the {n} pieces{of} supports it"),
        (k, n) if k == n => format!("all {n} pieces{of} support it"),
        (1, n) => format!("1 of {n} pieces{of} supports it"),
        (k, n) => format!("{k} of {n} pieces{of} support it"),
    }
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
    let remainder = attr.remainder();
    let flag = rarity.flag(alert_level, probs, &attr.base_rates, remainder);
    let level = if flag.is_some() {
        Level::Exposed
    } else if remainder == Some(best) {
        Level::Quiet
    } else {
        leaning_or_quiet(probability, base_rate)
    };
    let guess = &attr.values[best].label;
    let mut reading = if remainder == Some(best) {
        remainder_sentence(&attr.label, probability)
    } else {
        attribute_sentence(&attr.label, guess, probability, base_rate, alert_level)
    };
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

/// How the best guess's probability would change if an item were hidden, given how
/// far it would fall (`drop`, [`crate::effect::Effect::drop_if_hidden`]), in
/// percentage points and never rounded to a misleading zero: "−12 pts", "−0.35 pts",
/// "−<0.01 pts" (a near-certain guess barely moves), and a rise as "+3.1 pts". The
/// sign is the change's, so it is the opposite of the item's "adds".
pub fn hidden_change_points(drop: f64) -> String {
    let x = -drop * 100.0;
    let sign = if x < 0.0 { "−" } else { "+" };
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

/// Bits with their sign, never rounded to a signed zero: "+3.84", "-0.35", "+<0.01"
/// and "-<0.01" for a figure that rounds to nothing, "0.00" for none at all.
pub fn signed_bits(b: f64) -> String {
    if b == 0.0 {
        "0.00".into()
    } else if b.abs() < 0.005 {
        format!("{}<0.01", if b < 0.0 { "-" } else { "+" })
    } else {
        format!("{b:+.2}")
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
        "how the best guess's probability would change if you hid the item, in percentage points: down (−) when Adds is positive, up (+) when it is negative",
    ),
];

/// The meaning of one of [`ITEM_FIGURES`] by its name ("" for a name not there).
pub fn item_figure(name: &str) -> &'static str {
    ITEM_FIGURES
        .iter()
        .find(|(n, _)| *n == name)
        .map_or("", |(_, meaning)| meaning)
}

/// What one item does to one attribute's guess, as the explorer's item page writes it
/// beside the item's chart: "points to Oregon · adds +1.23 bits to the current guess"
/// (the figures of [`crate::effect`], named as the reports' columns name them).
pub fn effect_phrase(points_to: &str, bits: f64) -> String {
    format!(
        "points to {points_to} · adds {} bits to the current guess",
        signed_bits(bits)
    )
}

/// One reason an item is in a plan, as the plan's text, HTML and the explorer's plan
/// screen write it: "Home: Oregon (+1.23 bits; shown again: 34%)". `shown_again` is
/// the value's probability if just this item were shown again (`None`: not shown).
pub fn plan_reason(attribute: &str, value: &str, bits: f64, shown_again: Option<f64>) -> String {
    match shown_again {
        Some(p) => format!(
            "{attribute}: {value} ({} bits; shown again: {})",
            signed_bits(bits),
            percent(p)
        ),
        None => format!("{attribute}: {value} ({} bits)", signed_bits(bits)),
    }
}

/// The legend under a plan's reasons.
pub const PLAN_REASON_LEGEND: &str = "Bits: what showing the item again (the rest of the plan hidden) would add to the value's log-odds, in bits: the reports' \"adds\", for that value; \"shown again\": that value's probability if you showed just this item again.";

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

/// The sentence when the best guess is the remainder ("none of the values named").
pub fn remainder_sentence(attribute_label: &str, probability: f64) -> String {
    format!(
        "Your footprint does not narrow your {} down: the likeliest answer, {}, is somewhere none of your items name.",
        attribute_label.to_lowercase(),
        percent(probability)
    )
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

/// Said after an attribute's sentence when only rules of thumb (word lists: place
/// names, life stages, belief words) support its guess, whose probability is then held
/// at or under [`crate::combine::RULES_OF_THUMB_CEILING`].
pub fn rules_of_thumb_note() -> String {
    format!(
        "This guess rests only on rules of thumb (words in item names), not on counted data, so it is never put above {}.",
        percent(crate::combine::RULES_OF_THUMB_CEILING)
    )
}

/// An attribute's sentence, with [`rules_of_thumb_note`] when only rules of thumb
/// support the guess (callers leave it off when the guess is "somewhere else", which
/// names no place and is not held under the ceiling).
pub fn with_footing(sentence: String, rests_on_rules: bool) -> String {
    if rests_on_rules {
        format!("{sentence} {}", rules_of_thumb_note())
    } else {
        sentence
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counts_are_singular_for_one_only() {
        assert_eq!(count(0, "item", "items"), "0 items");
        assert_eq!(count(1, "item", "items"), "1 item");
        assert_eq!(count(2, "other value", "other values"), "2 other values");
        assert_eq!(
            count(1, "piece of evidence", "pieces of evidence"),
            "1 piece of evidence"
        );
    }

    /// Singular and plural agree with the count, and an attribute with nothing
    /// feeding it says so plainly (English grammar: "none of the N … supports", common
    /// practice, no source).
    #[test]
    fn support_counts_read_plainly() {
        assert_eq!(support_phrase(0, 0, true), "no evidence");
        assert_eq!(support_phrase(0, 0, false), "no evidence");
        assert_eq!(
            support_phrase(0, 1, true),
            "its one piece of evidence does not support it"
        );
        assert_eq!(support_phrase(1, 1, false), "its one piece supports it");
        assert_eq!(
            support_phrase(0, 3, true),
            "none of the 3 pieces of evidence supports it"
        );
        assert_eq!(
            support_phrase(0, 3, false),
            "none of the 3 pieces supports it"
        );
        assert_eq!(
            support_phrase(1, 5, true),
            "1 of 5 pieces of evidence supports it"
        );
        assert_eq!(
            support_phrase(80, 151, true),
            "80 of 151 pieces of evidence support it"
        );
        assert_eq!(support_phrase(3, 3, false), "all 3 pieces support it");
        assert_eq!(fed_by(0), "no evidence");
        assert_eq!(fed_by(1), "fed by 1 piece of evidence");
        assert_eq!(fed_by(12), "fed by 12 pieces of evidence");
    }

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
        assert_eq!(with_footing(s.clone(), false), s);
        let r = with_footing(s.clone(), true);
        assert!(
            r.starts_with(&s) && r.contains("rules of thumb") && r.contains("85%"),
            "{r}"
        );
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
        assert_eq!(hidden_change_points(1e-7), "−<0.01 pts");
        assert_eq!(hidden_change_points(-0.031), "+3.1 pts");
        assert_eq!(hidden_change_points(0.12), "−12 pts");
        assert_eq!(signed_bits(-1e-4), "-<0.01");
        assert_eq!(signed_bits(3.844), "+3.84");
    }
}
