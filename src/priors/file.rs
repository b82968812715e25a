//! The priors file's serde form (format 1): what is read and what `synth` and
//! `priors build` write. Field-by-field documentation: docs/priors.md.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::footprint::ItemKind;

/// The priors format version this build reads and writes.
pub const FORMAT: u32 = 1;

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PriorsFile {
    pub format: u32,
    pub provenance: Provenance,
    pub attributes: Vec<AttributeSpec>,
    #[serde(default)]
    pub items: Vec<ItemSpec>,
}

/// Where the statistics came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Provenance {
    /// Who or what produced the statistics.
    pub source: String,
    /// Licence of the statistics (SPDX identifier where there is one).
    pub licence: String,
    /// Date made, `YYYY-MM-DD`.
    pub created: String,
    /// How they were made, in a sentence or two.
    pub method: String,
    /// True when the statistics describe an invented population.
    pub synthetic: bool,
    /// How many people contributed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub contributors: Option<u64>,
    /// Differential-privacy parameters, when the counts were released with noise.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub privacy: Option<PrivacySpec>,
}

/// How the counts were protected.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PrivacySpec {
    /// "discrete_laplace" (integer noise from an exact sampler); files from earlier
    /// versions say "laplace" (continuous noise).
    pub mechanism: String,
    /// Total privacy budget ε for one contributor.
    pub epsilon: f64,
    /// L1 sensitivity of one released count.
    pub sensitivity: f64,
    /// Items with fewer noisy members than this were dropped.
    pub min_members: f64,
    /// How the budget was split across attributes and items, in words.
    pub budget_split: String,
}

/// One protected attribute.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct AttributeSpec {
    pub id: String,
    pub label: String,
    /// Alert threshold: a best guess more likely than this counts as exposed.
    pub threshold: f64,
    /// Dirichlet prior strength α for smoothing member counts (pseudo-members spread
    /// in proportion to the membership rates).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub smoothing: Option<f64>,
    /// Pseudo-members added to every value, so values few members are expected to
    /// hold need real evidence before they count.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pseudocount: Option<f64>,
    /// The GDPR Article 9 special category this attribute falls in, if any.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub special_category: Option<String>,
    pub values: Vec<ValueSpec>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub calibration: Option<Calibration>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ValueSpec {
    pub id: String,
    pub label: String,
    /// Share of the population with this value: the observer's prior.
    pub base_rate: f64,
    /// Share of all item memberships held by people with this value (people with
    /// some values join more items than others). Likelihood ratios are taken against
    /// it; when absent, the base rate is used.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub member_rate: Option<f64>,
}

/// How summed evidence becomes a probability.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "method", rename_all = "lowercase", deny_unknown_fields)]
pub enum Calibration {
    /// Naive Bayes with a temperature: `log P(v) = log π(v) + λ·Σ log L(v) − log Z`.
    /// λ < 1 tempers the overconfidence that correlated items cause.
    Temperature { lambda: f64 },
    /// Top-label logistic calibration fitted on a labelled cohort (see
    /// [`crate::calibration`]): the best guess's probability is
    /// `σ(intercept + log_odds·x₁ + log_base_rate·x₂ + evidence_spread·x₃)` over the
    /// tempered naive-Bayes log-odds x₁, the guess's log base rate x₂ and
    /// `ln(1 + max S − min S)` x₃; other values keep their naive-Bayes proportions.
    Logistic {
        /// Temperature applied to summed evidence before the features are taken.
        lambda: f64,
        intercept: f64,
        log_odds: f64,
        log_base_rate: f64,
        evidence_spread: f64,
    },
}

impl Default for Calibration {
    fn default() -> Self {
        Calibration::Temperature { lambda: 1.0 }
    }
}

/// One reference item.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ItemSpec {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub id: Option<String>,
    pub name: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<ItemKind>,
    /// Other names the item is known by.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub aliases: Vec<String>,
    /// Attribute id → members per value (in the attribute's value order).
    pub members: BTreeMap<String, MemberSpec>,
}

/// Members of an item for one attribute: counts per value, or shares per value with an
/// effective sample size.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(untagged)]
pub enum MemberSpec {
    Counts(Vec<f64>),
    Shares { shares: Vec<f64>, n: f64 },
}

impl MemberSpec {
    /// Counts per value (shares × n for the shares form).
    pub fn counts(&self) -> Vec<f64> {
        match self {
            MemberSpec::Counts(c) => c.clone(),
            MemberSpec::Shares { shares, n } => shares.iter().map(|s| s * n).collect(),
        }
    }

    pub fn len(&self) -> usize {
        match self {
            MemberSpec::Counts(c) => c.len(),
            MemberSpec::Shares { shares, .. } => shares.len(),
        }
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
}

/// Read by hand rather than as an untagged enum: serde buffers every untagged value
/// before trying the variants, which dominated loading a table of a million items.
impl<'de> Deserialize<'de> for MemberSpec {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        use serde::de::{Error, MapAccess, SeqAccess, Visitor};
        struct V;
        impl<'de> Visitor<'de> for V {
            type Value = MemberSpec;
            fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
                f.write_str("a list of member counts, or {\"shares\": [...], \"n\": number}")
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<MemberSpec, A::Error> {
                let mut counts = Vec::with_capacity(seq.size_hint().unwrap_or(8));
                while let Some(c) = seq.next_element::<f64>()? {
                    counts.push(c);
                }
                Ok(MemberSpec::Counts(counts))
            }
            fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<MemberSpec, A::Error> {
                let (mut shares, mut n) = (None, None);
                while let Some(key) = map.next_key::<String>()? {
                    match key.as_str() {
                        "shares" => shares = Some(map.next_value::<Vec<f64>>()?),
                        "n" => n = Some(map.next_value::<f64>()?),
                        other => {
                            return Err(A::Error::unknown_field(other, &["shares", "n"]));
                        }
                    }
                }
                match (shares, n) {
                    (Some(shares), Some(n)) => Ok(MemberSpec::Shares { shares, n }),
                    (None, _) => Err(A::Error::missing_field("shares")),
                    (_, None) => Err(A::Error::missing_field("n")),
                }
            }
        }
        d.deserialize_any(V)
    }
}
