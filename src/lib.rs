//! telltale: an offline check of what a person's own social-network archive gives away
//! about their age band, home location, political leaning and religion, which items
//! give the most away, and what to hide.
//!
//! The library does all the work and knows nothing of terminals; the `telltale` binary
//! (CLI and explorer) is a thin shell over it. Data flows
//! archive → [`import`] (through a [`mapping`]) → [`footprint`] → [`evidence`] (from
//! [`priors`] and other sources) → [`infer`] → [`report`].

pub mod alert;
pub mod archive;
pub mod calibration;
pub mod cautions;
pub mod cohort;
pub mod combine;
pub mod decisions;
pub mod effect;
pub mod eval;
pub mod evidence;
pub mod footprint;
pub mod friends_file;
#[doc(hidden)]
pub mod fuzzing;
pub mod import;
pub mod infer;
pub mod lexicon;
pub mod limits;
pub mod mapping;
mod name_key;
pub mod plan;
pub mod priors;
pub mod reading;
pub mod records;
pub mod report;
pub mod resident;
pub mod safe_write;
pub mod scan;
pub mod stats;
pub mod synth;
pub mod text;
pub mod unknown_values;
pub mod whatif;
