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
}

/// Write the report as pretty JSON.
pub fn write_json(r: &EvalReport, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, r).map_err(io::Error::other)?;
    writeln!(out)
}
