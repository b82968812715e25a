//! Evaluation: how well the observer model guesses the attributes of people whose
//! statistics it has not seen. Cross-validation over a labelled cohort (statistics and
//! calibration from the other folds, guesses for the held-out fold), compared with
//! guessing the most common value and guessing uniformly; calibration error before and
//! after calibration; and accuracy as the share of members whose attributes are public
//! (and so feed the statistics) varies. Reports as text, versioned JSON, Markdown and
//! HTML with inline-SVG charts.

mod html;
mod markdown;
mod report;
mod run;
mod svg;
mod text;

pub use html::write_html;
pub use markdown::write_markdown;
pub use report::{
    AttrEval, BestGuess, Bin, EVAL_FORMAT, EvalReport, MixEval, ShareRow, write_json,
};
pub use run::{EvalParams, MIXES, evaluate, evaluate_against, parse_shares, reliability};
pub use text::write_text;
