//! Evidence from life stages and dates: an item whose name places its member at a
//! stage of life (a graduating class, first-year students, new parents, retirement)
//! says how old the person was then, and the year in the name — or the date they
//! joined, liked or followed it — says when. Their age now is that age plus the years
//! since, spread over the priors' age bands (whose value ids or labels, "25-34",
//! "65+", "under 18", are read as age ranges).
//!
//! A rule gives the ages the stage spans (several readings with weights, as for a
//! graduating class: school leavers or university graduates) and a confidence `c`
//! that the item is about the person's own life. The implied distribution over bands
//! is `D = c·P_rule + (1 − c)·π`, and its likelihood ratios `D(v)/π(v)` enter the
//! posterior like any other evidence. The numbers are rules of thumb and the rules
//! file says so.

use super::model::{Evidence, EvidenceSet, Origin, Subject};
use super::places::normalise;
use super::sources::SourceKind;
use crate::footprint::{Footprint, Item};
use crate::lexicon::{Calendar, LifeStages, StageMatch, YearToken};
use crate::priors::Priors;

/// Seconds in a mean Gregorian year (365.2425 days).
pub const YEAR_SECONDS: f64 = 365.2425 * 86_400.0;
/// Open-ended bands ("65+") end here.
pub const OLDEST_AGE: f64 = 120.0;
/// A stage dated more than this many years after the reference time is ignored.
const MAX_YEARS_AHEAD: f64 = 8.0;

/// A priors attribute whose values are age ranges.
#[derive(Debug, Clone, PartialEq)]
pub struct AgeBands {
    pub attribute: usize,
    /// `[from, to)` in years of age, per value.
    pub ranges: Vec<(f64, f64)>,
}

/// Read an age range: "25-34" or "25–34" (→ 25 ≤ age < 35), "65+", "under 18" or
/// "<18", "18 and over".
pub fn parse_age_range(s: &str) -> Option<(f64, f64)> {
    let t: String = s
        .trim()
        .to_lowercase()
        .chars()
        .map(|c| match c {
            '–' | '—' | '‑' | '−' | '‒' => '-',
            _ => c,
        })
        .collect();
    let t = t.trim();
    let num = |x: &str| -> Option<f64> {
        let x = x.trim();
        (!x.is_empty() && x.bytes().all(|b| b.is_ascii_digit()))
            .then(|| x.parse::<f64>().ok())
            .flatten()
            .filter(|v| *v <= 130.0)
    };
    if let Some(rest) = t.strip_suffix('+') {
        return num(rest).map(|a| (a, OLDEST_AGE));
    }
    for suffix in [" and over", " or over", " and older", " or older"] {
        if let Some(rest) = t.strip_suffix(suffix) {
            return num(rest).map(|a| (a, OLDEST_AGE));
        }
    }
    for prefix in ["under ", "<", "below "] {
        if let Some(rest) = t.strip_prefix(prefix) {
            return num(rest).map(|a| (0.0, a));
        }
    }
    let (a, b) = t.split_once('-')?;
    let (a, b) = (num(a)?, num(b)?);
    (a <= b).then_some((a, b + 1.0))
}

/// The priors' age attribute: the first whose every value (by id, else label) reads
/// as an age range, the ranges not overlapping.
pub fn age_bands(priors: &Priors) -> Option<AgeBands> {
    priors.attributes.iter().enumerate().find_map(|(ai, a)| {
        let ranges: Option<Vec<(f64, f64)>> = a
            .values
            .iter()
            .map(|v| parse_age_range(&v.id).or_else(|| parse_age_range(&v.label)))
            .collect();
        let ranges = ranges?;
        let mut sorted = ranges.clone();
        sorted.sort_by(|x, y| x.0.total_cmp(&y.0));
        let disjoint = sorted.windows(2).all(|w| w[0].1 <= w[1].0);
        (ranges.len() >= 2 && disjoint).then_some(AgeBands {
            attribute: ai,
            ranges,
        })
    })
}

/// The Gregorian year a `{year}` slot means: four digits as written (in the
/// pattern's calendar); two digits in the century that puts it no more than a few
/// years after the reference year. `None` for a year no calendar reads.
///
/// Conversions (from memory): Solar Hijri + 621 (the year begins in March, and a
/// school or university year in Mehr, September–October, of that Gregorian year);
/// Buddhist era − 543; Hijri (lunar) years are 354 or 355 days, so Gregorian ≈
/// 622 + H × 32/33.
pub fn calendar_year(y: YearToken, calendar: Calendar, reference_year: i32) -> Option<i32> {
    let ahead = reference_year + MAX_YEARS_AHEAD as i32;
    let gregorian = |v: i32| -> Option<i32> {
        match calendar {
            Calendar::SolarHijri if v < 1700 => Some(v + 621),
            Calendar::Buddhist if v >= 2400 => Some(v - 543),
            Calendar::Hijri if v < 1500 => Some(622 + (v as f64 * 32.0 / 33.0).round() as i32),
            _ => Some(v),
        }
        .filter(|g| (1900..=2100).contains(g))
    };
    if y.digits == 4 {
        return gregorian(y.value);
    }
    // Two digits: the latest century (of the calendar's own years) not too far ahead.
    let centuries: &[i32] = match calendar {
        Calendar::SolarHijri => &[1400, 1300],
        Calendar::Buddhist => &[2500],
        _ => {
            let this_century = reference_year - reference_year.rem_euclid(100);
            return Some(if this_century + y.value <= ahead {
                this_century + y.value
            } else {
                this_century - 100 + y.value
            });
        }
    };
    centuries
        .iter()
        .filter_map(|c| gregorian(c + y.value))
        .find(|g| *g <= ahead)
}

/// The year a `{year}` slot means in the Gregorian calendar (see [`calendar_year`]).
#[cfg(test)]
fn full_year(y: YearToken, reference_year: i32) -> i32 {
    calendar_year(y, Calendar::Gregorian, reference_year).unwrap_or(y.value)
}

/// Calendar year of a Unix time (UTC).
pub fn year_of(unix: i64) -> i32 {
    time::OffsetDateTime::from_unix_timestamp(unix)
        .map(|d| d.year())
        .unwrap_or(1970)
}

/// Unix time of 1 July of a year (the middle of a year named without a date).
fn mid_year(year: i32) -> i64 {
    time::Date::from_calendar_date(year, time::Month::July, 1)
        .map(|d| d.midnight().assume_utc().unix_timestamp())
        .unwrap_or(0)
}

/// When the stage happened, and how that was known.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StageTime {
    /// The year written in the item's name.
    Named(i32),
    /// The date the person joined, liked or followed the item.
    Joined(i64),
    /// No date: taken as now.
    Undated,
}

/// The distribution over the bands implied by a match (before the confidence
/// mixing), the years since the stage and how the time was known; `None` when the
/// ages fall outside every band.
pub fn band_shares(
    m: &StageMatch<'_>,
    item_date: Option<i64>,
    reference: i64,
    bands: &AgeBands,
) -> Option<(Vec<f64>, f64, StageTime)> {
    let ref_year = year_of(reference);
    let named = m.year.and_then(|y| calendar_year(y, m.calendar, ref_year));
    let (when, time) = match (named, item_date) {
        (Some(year), _) => (mid_year(year), StageTime::Named(year)),
        (None, Some(d)) => (d, StageTime::Joined(d)),
        (None, None) => (reference, StageTime::Undated),
    };
    let since = (reference - when) as f64 / YEAR_SECONDS;
    if since < -MAX_YEARS_AHEAD {
        return None;
    }
    let mut shares = vec![0.0; bands.ranges.len()];
    for stage in &m.stages() {
        let (from, to) = (stage.from + since, stage.to + since);
        let width = to - from;
        for (share, &(lo, hi)) in shares.iter_mut().zip(&bands.ranges) {
            let overlap = (to.min(hi) - from.max(lo)).max(0.0);
            *share += stage.weight * overlap / width;
        }
    }
    let total: f64 = shares.iter().sum();
    if total <= 1e-9 {
        return None;
    }
    Some((shares.into_iter().map(|s| s / total).collect(), since, time))
}

/// The newest date anywhere in the footprint.
pub fn newest_date(footprint: &Footprint) -> Option<i64> {
    footprint
        .items
        .iter()
        .filter_map(|i| i.date)
        .chain(footprint.friends.iter().filter_map(|f| f.date))
        .max()
}

/// The life-stage source set up for one priors file, run item by item.
pub(crate) struct LifeStageSource<'a> {
    priors: &'a Priors,
    rules: &'a LifeStages,
    reference: i64,
    bands: AgeBands,
}

impl<'a> LifeStageSource<'a> {
    /// `None` when the priors have no age-band attribute.
    pub(crate) fn new(priors: &'a Priors, rules: &'a LifeStages, reference: i64) -> Option<Self> {
        Some(LifeStageSource {
            bands: age_bands(priors)?,
            priors,
            rules,
            reference,
        })
    }

    /// Add the evidence of item `i`, whose name has the tokens `toks`.
    pub(crate) fn item(
        &self,
        i: usize,
        item: &Item,
        toks: &[String],
        covered: &dyn Fn(usize, usize) -> bool,
        set: &mut EvidenceSet,
    ) {
        let bands = &self.bands;
        let a = bands.attribute;
        let attr = &self.priors.attributes[a];
        if covered(i, a) {
            return;
        }
        let Some(m) = self.rules.find_tokens(toks) else {
            return;
        };
        let Some((shares, since, time)) = band_shares(&m, item.date, self.reference, bands) else {
            return;
        };
        let c = m.rule.confidence;
        let dist = normalise(
            shares
                .iter()
                .zip(&attr.base_rates)
                .map(|(p, b)| c * p + (1.0 - c) * b),
        );
        let stages = m.stages();
        let low = stages.iter().map(|s| s.from).fold(f64::MAX, f64::min) + since;
        let high = stages.iter().map(|s| s.to).fold(f64::MIN, f64::max) + since - 1.0;
        let when = match time {
            StageTime::Named(y) => format!("in {y}"),
            StageTime::Joined(d) => format!("when you joined in {}", year_of(d)),
            StageTime::Undated => "(undated, taken as now)".into(),
        };
        let ages = stages
            .iter()
            .map(|s| format!("{}–{}", s.from as i64, s.to as i64 - 1))
            .collect::<Vec<_>>()
            .join(" or ");
        let detail = format!(
            "'{}' ({}): aged {ages} {when}, so about {:.0}–{:.0} now (rule of thumb)",
            m.text,
            m.rule.label,
            low.max(0.0).floor(),
            high.max(0.0).ceil()
        );
        set.push(Evidence::from_distribution(
            Subject::Item(i),
            a,
            dist,
            &attr.base_rates,
            1.0,
            Origin::lexicon(
                format!("{}: {}", SourceKind::LifeStages.id(), m.rule.id),
                detail,
            ),
        ));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::{Rule, Stage};

    #[test]
    fn age_ranges_parse() {
        assert_eq!(parse_age_range("25-34"), Some((25.0, 35.0)));
        assert_eq!(parse_age_range("25–34"), Some((25.0, 35.0)));
        assert_eq!(parse_age_range("65+"), Some((65.0, OLDEST_AGE)));
        assert_eq!(parse_age_range("Under 18"), Some((0.0, 18.0)));
        assert_eq!(parse_age_range("18 and over"), Some((18.0, OLDEST_AGE)));
        assert_eq!(parse_age_range("US-OR"), None);
        assert_eq!(parse_age_range("34-25"), None);
        assert_eq!(parse_age_range("25000-50000"), None);
    }

    #[test]
    fn two_digit_years_pick_their_century() {
        let y = |v| YearToken {
            value: v,
            digits: 2,
        };
        assert_eq!(full_year(y(4), 2026), 2004);
        assert_eq!(full_year(y(30), 2026), 2030);
        assert_eq!(full_year(y(85), 2026), 1985);
    }

    fn bands() -> AgeBands {
        let r = |a: &str| parse_age_range(a).unwrap();
        AgeBands {
            attribute: 0,
            ranges: ["13-17", "18-24", "25-34", "35-44", "45-54", "55-64", "65+"]
                .map(r)
                .to_vec(),
        }
    }

    // Common practice, no source: a "Class of 2004" graduated from secondary school at
    // 17–19 (or from university at 21–24) in 2004, so in 2026 they are 39–41 (or
    // 43–46): every reading lies in the 35–44 band except university graduates of 45
    // or 46 (weight 0.4 · 2/4 = 0.2 of the mass, in 45–54).
    #[test]
    fn a_graduating_class_gives_the_expected_band() {
        let rule = Rule {
            id: "class".into(),
            label: "class".into(),
            stages: vec![
                Stage {
                    from: 17.0,
                    to: 20.0,
                    weight: 0.6,
                    level: None,
                },
                Stage {
                    from: 21.0,
                    to: 25.0,
                    weight: 0.4,
                    level: None,
                },
            ],
            confidence: 0.8,
        };
        let m = StageMatch {
            rule: &rule,
            text: "class of 2004".into(),
            year: Some(YearToken {
                value: 2004,
                digits: 4,
            }),
            calendar: Calendar::Gregorian,
            level: None,
        };
        let reference = mid_year(2026);
        let (shares, since, time) = band_shares(&m, None, reference, &bands()).unwrap();
        assert_eq!(time, StageTime::Named(2004));
        assert!((since - 22.0).abs() < 0.01);
        assert!((shares[3] - 0.8).abs() < 0.01, "{shares:?}");
        assert!((shares[4] - 0.2).abs() < 0.01, "{shares:?}");
        let best = crate::stats::argmax(&shares).0;
        assert_eq!(best, 3, "35–44");
    }

    // Joining a first-year student group (aged 18–19 then) in 2016 makes someone 27–29
    // in 2026 (common practice, no source).
    #[test]
    fn a_join_date_dates_the_stage() {
        let rule = Rule {
            id: "first-year".into(),
            label: "first-year students".into(),
            stages: vec![Stage {
                from: 18.0,
                to: 20.0,
                weight: 1.0,
                level: None,
            }],
            confidence: 0.8,
        };
        let m = StageMatch {
            rule: &rule,
            text: "freshers".into(),
            year: None,
            calendar: Calendar::Gregorian,
            level: None,
        };
        let joined = mid_year(2016);
        let (shares, since, time) =
            band_shares(&m, Some(joined), mid_year(2026), &bands()).unwrap();
        assert_eq!(time, StageTime::Joined(joined));
        assert!((since - 10.0).abs() < 0.01);
        assert!((shares[2] - 1.0).abs() < 1e-9, "{shares:?}");
        // Undated: taken as now, 18–19 → the 18–24 band.
        let (shares, _, time) = band_shares(&m, None, mid_year(2026), &bands()).unwrap();
        assert_eq!(time, StageTime::Undated);
        assert!((shares[1] - 1.0).abs() < 1e-9);
    }
}
