//! Life-stage rules: words in an item's name that place its member at a stage of life
//! (a graduating class, first-year students, new parents, retirement …) with the ages
//! that stage spans. The file is TOML (reference-priors/lexicons/life-stages.toml,
//! format described in its header and in docs/evidence.md); every number in it is a
//! rule of thumb and says so.

use serde::Deserialize;

use super::error::{Result, checked, format_problems, parse_toml};
use super::phrase::{Pattern, PhraseIndex, YearToken};

/// The file format version this build reads.
pub const FORMAT: i64 = 1;

/// Ages a stage spans, as a half-open interval of years of age `[from, to)`.
#[derive(Debug, Clone, PartialEq)]
pub struct Stage {
    pub from: f64,
    pub to: f64,
    /// Share of this reading among the rule's stages (they sum to 1).
    pub weight: f64,
    /// The level of education the stage belongs to, when the rules file says.
    pub level: Option<Level>,
}

/// A level of education, for year groups whose age depends on it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Level {
    School,
    University,
}

/// The calendar a pattern's `{year}` is read in (by the pattern's language).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Calendar {
    #[default]
    Gregorian,
    /// Persian: year 1392 began in March 2013 (Gregorian = Solar Hijri + 621).
    SolarHijri,
    /// Thai Buddhist era: 2568 is 2025 (Gregorian = BE − 543), for years from 2400.
    Buddhist,
    /// Arabic and Urdu: four-digit years 1300–1499 are Hijri (lunar) years.
    Hijri,
}

impl Calendar {
    /// The calendar of patterns written under a language tag.
    pub fn of_language(tag: &str) -> Calendar {
        match tag.split('-').next().unwrap_or(tag) {
            "fa" => Calendar::SolarHijri,
            "th" => Calendar::Buddhist,
            "ar" | "ur" => Calendar::Hijri,
            _ => Calendar::Gregorian,
        }
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Rule {
    pub id: String,
    pub label: String,
    pub stages: Vec<Stage>,
    /// How likely a match is about the person's own stage of life.
    pub confidence: f64,
}

impl Rule {
    /// The stages' ages as written, e.g. "17–19 or 21–24".
    pub fn ages_text(&self) -> String {
        self.stages
            .iter()
            .map(|s| format!("{}–{}", s.from as i64, s.to as i64 - 1))
            .collect::<Vec<_>>()
            .join(" or ")
    }
}

/// A rule found in a name.
#[derive(Debug, Clone, PartialEq)]
pub struct StageMatch<'a> {
    pub rule: &'a Rule,
    /// The matched words.
    pub text: String,
    pub year: Option<YearToken>,
    /// The calendar of the matched pattern's year.
    pub calendar: Calendar,
    /// The level of education the rest of the name names, when it names one only.
    pub level: Option<Level>,
}

impl StageMatch<'_> {
    /// The rule's stages, narrowed to the level the name names when the rule has
    /// stages of that level.
    pub fn stages(&self) -> Vec<Stage> {
        let narrowed: Vec<Stage> = match self.level {
            Some(l) => self
                .rule
                .stages
                .iter()
                .filter(|s| s.level == Some(l))
                .cloned()
                .collect(),
            None => Vec::new(),
        };
        if narrowed.is_empty() {
            return self.rule.stages.clone();
        }
        let total: f64 = narrowed.iter().map(|s| s.weight).sum();
        narrowed
            .into_iter()
            .map(|s| Stage {
                weight: s.weight / total,
                ..s
            })
            .collect()
    }
}

#[derive(Debug, Clone, Default)]
pub struct LifeStages {
    pub rules: Vec<Rule>,
    /// Patterns → rule number (low 24 bits) and calendar (the bits above).
    index: PhraseIndex<u32>,
    /// Words naming a level of education.
    levels: PhraseIndex<u8>,
}

const CALENDAR_SHIFT: u32 = 24;

fn calendar_code(c: Calendar) -> u32 {
    match c {
        Calendar::Gregorian => 0,
        Calendar::SolarHijri => 1,
        Calendar::Buddhist => 2,
        Calendar::Hijri => 3,
    }
}

fn calendar_of_code(code: u32) -> Calendar {
    match code {
        1 => Calendar::SolarHijri,
        2 => Calendar::Buddhist,
        3 => Calendar::Hijri,
        _ => Calendar::Gregorian,
    }
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    format: i64,
    #[serde(default)]
    levels: RawLevels,
    #[serde(default)]
    rule: Vec<RawRule>,
}

#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct RawLevels {
    #[serde(default)]
    school: Vec<String>,
    #[serde(default)]
    university: Vec<String>,
}

/// Patterns: one list for every language, or lists keyed by language tag.
#[derive(Deserialize)]
#[serde(untagged)]
enum RawPatterns {
    List(Vec<String>),
    ByLanguage(std::collections::BTreeMap<String, Vec<String>>),
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRule {
    id: String,
    label: String,
    patterns: RawPatterns,
    stages: Vec<RawStage>,
    confidence: f64,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStage {
    ages: [u32; 2],
    weight: Option<f64>,
    level: Option<String>,
}

fn parse_level(s: &str) -> Option<Level> {
    match s {
        "school" => Some(Level::School),
        "university" => Some(Level::University),
        _ => None,
    }
}

impl LifeStages {
    pub fn parse(text: &str, origin: &str) -> Result<LifeStages> {
        let raw: RawFile = parse_toml(text, origin)?;
        let mut problems = format_problems(raw.format, FORMAT);
        let mut out = LifeStages::default();
        for (words, level) in [(&raw.levels.school, 1u8), (&raw.levels.university, 2u8)] {
            for w in words {
                match Pattern::parse(w) {
                    Some(p) => out.levels.insert(&p, level),
                    None => problems.push(format!("levels: '{w}' has no words")),
                }
            }
        }
        for (i, r) in raw.rule.into_iter().enumerate() {
            let at = format!("rule[{}] ({})", i + 1, r.id);
            if !(r.confidence > 0.0 && r.confidence <= 1.0) {
                problems.push(format!("{at}: confidence must be above 0 and at most 1"));
            }
            if r.stages.is_empty() {
                problems.push(format!("{at}: needs at least one stage"));
            }
            let total: f64 = r.stages.iter().map(|s| s.weight.unwrap_or(1.0)).sum();
            let mut stages = Vec::new();
            for s in &r.stages {
                let w = s.weight.unwrap_or(1.0);
                let [lo, hi] = s.ages;
                if lo > hi || hi > 130 {
                    problems.push(format!(
                        "{at}: ages [{lo}, {hi}] must rise and stay under 130"
                    ));
                }
                if !(w.is_finite() && w > 0.0) {
                    problems.push(format!("{at}: stage weights must be above 0"));
                }
                let level = match &s.level {
                    None => None,
                    Some(l) => {
                        let parsed = parse_level(l);
                        if parsed.is_none() {
                            problems.push(format!(
                                "{at}: level '{l}' is not \"school\" or \"university\""
                            ));
                        }
                        parsed
                    }
                };
                stages.push(Stage {
                    from: lo as f64,
                    to: hi as f64 + 1.0,
                    weight: w / total,
                    level,
                });
            }
            let index = out.rules.len() as u32;
            let mut any = false;
            let lists: Vec<(Calendar, Vec<String>)> = match r.patterns {
                RawPatterns::List(l) => vec![(Calendar::Gregorian, l)],
                RawPatterns::ByLanguage(m) => m
                    .into_iter()
                    .map(|(tag, l)| (Calendar::of_language(&tag), l))
                    .collect(),
            };
            for (calendar, list) in &lists {
                for p in list {
                    match Pattern::parse(p) {
                        Some(pattern) => {
                            let value = index | (calendar_code(*calendar) << CALENDAR_SHIFT);
                            out.index.insert(&pattern, value);
                            any = true;
                        }
                        None => problems.push(format!("{at}: pattern '{p}' has no words")),
                    }
                }
            }
            if !any {
                problems.push(format!("{at}: needs at least one pattern"));
            }
            out.rules.push(Rule {
                id: r.id,
                label: r.label,
                stages,
                confidence: r.confidence,
            });
        }
        checked(out, problems, origin)
    }

    /// The rule that best fits a name: the most confident match, then the longest.
    pub fn find(&self, name: &str) -> Option<StageMatch<'_>> {
        self.find_tokens(&super::phrase::tokens(name))
    }

    /// As [`LifeStages::find`], on the name's tokens already made. A year written
    /// against letters ("2014级", "21학번") is read as a token of its own.
    pub fn find_tokens(&self, toks: &[String]) -> Option<StageMatch<'_>> {
        let split;
        let toks = if toks.iter().any(|t| mixes_digits(t)) {
            split = split_digits(toks);
            &split[..]
        } else {
            toks
        };
        let best = self
            .index
            .find_tokens(toks)
            .into_iter()
            .flat_map(|h| {
                h.values.iter().map(move |&v| {
                    let rule = &self.rules[(v & ((1 << CALENDAR_SHIFT) - 1)) as usize];
                    (
                        rule,
                        calendar_of_code(v >> CALENDAR_SHIFT),
                        h.text.clone(),
                        h.year,
                    )
                })
            })
            .max_by(|a, b| {
                a.0.confidence
                    .total_cmp(&b.0.confidence)
                    .then(a.3.is_some().cmp(&b.3.is_some()))
                    .then(a.2.len().cmp(&b.2.len()))
            })?;
        let (rule, calendar, text, year) = best;
        let mut level = None;
        let mut both = false;
        for h in self.levels.find_tokens(toks) {
            for &l in h.values {
                let l = if l == 1 {
                    Level::School
                } else {
                    Level::University
                };
                match level {
                    None => level = Some(l),
                    Some(k) if k != l => both = true,
                    _ => {}
                }
            }
        }
        Some(StageMatch {
            rule,
            text,
            year,
            calendar,
            level: if both { None } else { level },
        })
    }
}

/// Whether a token has a digit next to a letter.
fn mixes_digits(t: &str) -> bool {
    let mut prev: Option<bool> = None;
    for c in t.chars() {
        let d = super::phrase::digit_value(c).is_some();
        if prev.is_some_and(|p| p != d) {
            return true;
        }
        prev = Some(d);
    }
    false
}

/// Tokens with every run of digits cut from the letters around it.
fn split_digits(toks: &[String]) -> Vec<String> {
    let mut out = Vec::with_capacity(toks.len() + 2);
    for t in toks {
        let mut cur = String::new();
        let mut prev: Option<bool> = None;
        for c in t.chars() {
            let d = super::phrase::digit_value(c).is_some();
            if prev.is_some_and(|p| p != d) && !cur.is_empty() {
                out.push(std::mem::take(&mut cur));
            }
            cur.push(c);
            prev = Some(d);
        }
        if !cur.is_empty() {
            out.push(cur);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    const RULES: &str = r#"
format = 1
[[rule]]
id = "class"
label = "a class"
patterns = ["class of {year}"]
stages = [{ ages = [17, 19], weight = 3 }, { ages = [21, 24], weight = 1 }]
confidence = 0.8
[[rule]]
id = "retired"
label = "retired"
patterns = ["retire*"]
stages = [{ ages = [60, 85] }]
confidence = 0.5
"#;

    #[test]
    fn rules_load_and_match() {
        let ls = LifeStages::parse(RULES, "t.toml").unwrap();
        assert_eq!(ls.rules.len(), 2);
        assert_eq!(ls.rules[0].stages[0].weight, 0.75);
        assert_eq!(ls.rules[0].stages[1].to, 25.0);
        assert_eq!(ls.rules[0].ages_text(), "17–19 or 21–24");
        let m = ls.find("Class of 1999 retirees").unwrap();
        assert_eq!(m.rule.id, "class");
        assert_eq!(m.year.unwrap().value, 1999);
        assert_eq!(ls.find("Retired Teachers").unwrap().rule.id, "retired");
        assert!(ls.find("Chess Club").is_none());
    }

    // French elision: the name key joins apostrophes ("d'élèves" → "deleves"), so the
    // bundled pattern must be written joined too. Phrase from French school usage
    // ("association de parents d'élèves"), from memory.
    #[test]
    fn bundled_rules_read_french_elision() {
        let ls = crate::lexicon::bundled::life_stages();
        let m = ls.find("Association des parents d'élèves de l'école Jaurès");
        assert_eq!(m.map(|m| m.rule.id.as_str()), Some("school-parent"));
        let m = ls.find("Parents d’élèves (Lyon)");
        assert_eq!(m.map(|m| m.rule.id.as_str()), Some("school-parent"));
    }

    #[test]
    fn problems_are_listed() {
        let bad = "format = 1\n[[rule]]\nid = \"x\"\nlabel = \"x\"\npatterns = [\"  \"]\nstages = [{ ages = [30, 20] }]\nconfidence = 2\n";
        let err = LifeStages::parse(bad, "bad.toml").unwrap_err().to_string();
        assert!(err.contains("confidence"), "{err}");
        assert!(err.contains("must rise"), "{err}");
        assert!(err.contains("no words"), "{err}");
    }
}
