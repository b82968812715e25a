//! Plain-words readings of the numbers, for people who are not statisticians:
//! "an observer would guess 25–34 and be right about 7 times in 10".

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
/// 5 points above it) → leaning; else quiet (common practice, no source). A value at
/// least as common in the population as the threshold is never exposed: guessing it
/// needs no footprint (the "somewhere else" remainder of the home levels).
pub fn level(probability: f64, base_rate: f64, threshold: f64) -> Level {
    if probability > threshold && base_rate < threshold {
        Level::Exposed
    } else if probability >= 1.5 * base_rate && probability - base_rate >= 0.05 {
        Level::Leaning
    } else {
        Level::Quiet
    }
}

/// One sentence about one attribute.
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
}
