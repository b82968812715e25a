//! The evaluation report's structure: what the renderers draw and what the JSON form
//! (format 1, stable for scripts) contains.

use std::io::{self, Write};

use serde::{Deserialize, Serialize};

/// Version of the evaluation JSON.
pub const EVAL_FORMAT: u32 = 1;

/// One confidence bin of a reliability diagram.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Bin {
    /// Lower edge of the bin (bins are 0.1 wide).
    pub from: f64,
    pub count: usize,
    /// Mean confidence of the guesses in the bin.
    pub confidence: f64,
    /// Share of them that were right.
    pub accuracy: f64,
}

/// Cross-validated figures for one attribute.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AttrEval {
    pub id: String,
    pub label: String,
    pub values: usize,
    /// Members who declared this attribute (and were guessed).
    pub members: usize,
    /// Accuracy of the calibrated model's best guess.
    pub accuracy: f64,
    /// Accuracy of always guessing the most common value (from the training folds).
    pub majority_rate: f64,
    /// Expected accuracy of a uniform guess, 1/|V|.
    pub uniform_rate: f64,
    /// Mean log loss of the calibrated model (nats).
    pub log_loss: f64,
    /// Expected calibration error of naive Bayes (λ = 1).
    pub ece_naive: f64,
    /// With the fitted temperature only.
    pub ece_temperature: f64,
    /// With the logistic calibration.
    pub ece_calibrated: f64,
    pub reliability_naive: Vec<Bin>,
    pub reliability_calibrated: Vec<Bin>,
    /// Accuracy of the best possible guess (the argmax of the true generating
    /// posterior given each member's items), where the model that made the cohort is
    /// known (synthetic cohorts); see [`EvalReport::best_possible`].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub bayes_optimal: Option<f64>,
    /// Expected calibration error of the best possible guess's own confidence: a true
    /// posterior is calibrated, so this is near 0 up to sampling error, and a larger
    /// figure would say the generating model was taken wrongly.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub bayes_optimal_ece: Option<f64>,
    /// `accuracy / bayes_optimal`: 1 means the observer model is as good as possible.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ratio_to_best: Option<f64>,
    /// The same held-out members guessed the way a scan guesses (every source but
    /// friends on their matched items, combined as a scan combines them), split by
    /// the evidence the guess rested on; mixes with no member are left out.
    #[serde(default)]
    pub by_mix: Vec<MixEval>,
}

/// Accuracy and calibration of the guesses that rested on one mix of evidence.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MixEval {
    /// "table only", "table and word lists" or "word lists only".
    pub mix: String,
    /// Held-out members whose guess rested on it.
    pub members: usize,
    pub accuracy: f64,
    /// Expected calibration error of the best guess (10 bins).
    pub ece: f64,
}

/// Accuracy at one public share.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ShareRow {
    pub share: f64,
    /// Accuracy per attribute, in the order of `attributes`.
    pub accuracy: Vec<f64>,
}

/// The whole evaluation.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EvalReport {
    pub format: u32,
    /// Archives in the cohort folder.
    pub archives: usize,
    /// Members with at least one declared attribute.
    pub members: usize,
    pub folds: usize,
    pub seed: u64,
    /// ε when the training statistics went through the Laplace release.
    pub epsilon: Option<f64>,
    /// Items counted per contributor at most.
    pub max_items: usize,
    pub min_members: f64,
    /// Candidate items in the schema.
    pub candidate_items: usize,
    pub attributes: Vec<AttrEval>,
    pub public_share: Vec<ShareRow>,
    pub synthetic: bool,
    /// What the Bayes-optimal figures were computed from, when they were.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub best_possible: Option<String>,
}

/// The best possible guess, where the model that made a cohort is known.
pub trait BestGuess {
    /// Per attribute (in the schema's order), the true posterior over its values given
    /// a member's items (indices of the schema's candidate items); `None` when it cannot
    /// be given for this schema.
    fn posteriors(&self, items: &[u32]) -> Option<Vec<Vec<f64>>>;
    /// Where the figures come from, in a sentence, for the report.
    fn describe(&self) -> String;
}

/// Write the report as pretty JSON.
pub fn write_json(r: &EvalReport, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, r).map_err(io::Error::other)?;
    writeln!(out)
}
