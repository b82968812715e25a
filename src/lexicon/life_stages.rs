//! Life-stage rules: words in an item's name that place its member at a stage of life
//! (a graduating class, first-year students, new parents, retirement …) with the ages
//! that stage spans. The file is TOML (reference-priors/lexicons/life-stages.toml,
//! format described in its header and in docs/evidence.md); every number in it is a
//! rule of thumb and says so.

use serde::Deserialize;

use super::error::{Error, Result};
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
}

#[derive(Debug, Clone, Default)]
pub struct LifeStages {
    pub rules: Vec<Rule>,
    index: PhraseIndex<u32>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    format: i64,
    #[serde(default)]
    rule: Vec<RawRule>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRule {
    id: String,
    label: String,
    patterns: Vec<String>,
    stages: Vec<RawStage>,
    confidence: f64,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStage {
    ages: [u32; 2],
    weight: Option<f64>,
}

impl LifeStages {
    pub fn parse(text: &str, origin: &str) -> Result<LifeStages> {
        let raw: RawFile = toml::from_str(text).map_err(|e| Error::Syntax {
            file: origin.to_string(),
            message: e.to_string(),
        })?;
        let mut problems = Vec::new();
        if raw.format != FORMAT {
            problems.push(format!(
                "format {} is not the format this telltale reads ({FORMAT})",
                raw.format
            ));
        }
        let mut out = LifeStages::default();
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
                stages.push(Stage {
                    from: lo as f64,
                    to: hi as f64 + 1.0,
                    weight: w / total,
                });
            }
            let index = out.rules.len() as u32;
            let mut any = false;
            for p in &r.patterns {
                match Pattern::parse(p) {
                    Some(pattern) => {
                        out.index.insert(&pattern, index);
                        any = true;
                    }
                    None => problems.push(format!("{at}: pattern '{p}' has no words")),
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
        if !problems.is_empty() {
            return Err(Error::Invalid {
                file: origin.to_string(),
                problems,
            });
        }
        Ok(out)
    }

    /// The rule that best fits a name: the most confident match, then the longest.
    pub fn find(&self, name: &str) -> Option<StageMatch<'_>> {
        self.find_tokens(&super::phrase::tokens(name))
    }

    /// As [`LifeStages::find`], on the name's tokens already made.
    pub fn find_tokens(&self, toks: &[String]) -> Option<StageMatch<'_>> {
        self.index
            .find_tokens(toks)
            .into_iter()
            .flat_map(|h| {
                h.values.iter().map(move |&r| StageMatch {
                    rule: &self.rules[r as usize],
                    text: h.text.clone(),
                    year: h.year,
                })
            })
            .max_by(|a, b| {
                a.rule
                    .confidence
                    .total_cmp(&b.rule.confidence)
                    .then(a.text.len().cmp(&b.text.len()))
            })
    }
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
