//! The synthetic generator: a reproducible fictional social network ("Lanternwick")
//! with members carrying latent attributes, items with homophilous membership and a
//! spread of homogeneity, and homophilous friendships. From it come the bundled demo
//! priors (marked synthetic), the demo persona archives in two invented layouts, and
//! (for benchmarks and workshops) larger archives and cohorts of labelled archives. Nothing here describes
//! real people or a real platform.

pub mod abroad;
pub mod calibrate;
pub mod catalogue;
pub mod cohort;
mod demo;
pub mod demo_files;
pub mod large;
pub mod large_items;
pub mod layout_a;
pub mod layout_b;
pub mod membership;
pub mod oracle;
pub mod personas;
pub mod places;
pub mod reference;
pub mod sink;
mod words;
pub mod world;

pub use demo::{DemoConfig, DemoOutput, PersonaManifest, generate_demo, stream};
