//! The bundled demo, made in one reproducible run: the catalogue, a counted population,
//! held-out members for calibration, the priors file, and the persona archives with
//! their mappings and a manifest of what was written (manifest.json for the network's
//! members, world-manifest.json for the personas outside the USA).

use std::fs;
use std::io;
use std::path::{Path, PathBuf};

use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

use super::abroad::ABROAD;
use super::calibrate::{Fit, fit};
use super::catalogue;
use super::layout_a;
use super::layout_b;
use super::membership::populate;
use super::personas::{Layout, PERSONAS, generate};
use super::reference::{count, priors_file};
use super::sink::{ArchiveSink, FolderSink, ZipSink};
use crate::footprint::ItemKind;
use crate::priors::write_priors;

/// Sizes and seed of the demo world.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DemoConfig {
    pub seed: u64,
    /// Members counted into the priors.
    pub members: usize,
    /// Separate members used only to fit calibration.
    pub held_out: usize,
    /// Items in the network.
    pub items: usize,
    /// Mean number of items a member joins.
    pub mean_degree: f64,
}

impl Default for DemoConfig {
    fn default() -> Self {
        DemoConfig {
            seed: 7,
            members: 20_000,
            held_out: 3_000,
            items: 1_600,
            mean_degree: 40.0,
        }
    }
}

/// What the generator wrote for one persona (the import must find exactly this).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct PersonaManifest {
    pub slug: String,
    pub name: String,
    pub role: String,
    pub layout: String,
    /// Archive path relative to the exports folder.
    pub archive: String,
    /// Mapping file relative to the exports folder.
    pub mapping: String,
    pub likes: usize,
    pub groups: usize,
    pub follows: usize,
    pub events: usize,
    pub friends: usize,
    /// Items in all: likes + groups + follows + events, the count every report and
    /// the explorer give (no two share a kind and name, so none are merged; the
    /// friend list is not an item).
    pub items: usize,
    /// Of those, the items the reference table lists (the rest are personal items
    /// no table knows).
    pub listed_items: usize,
    /// True attribute values (value ids), as in the archive's self-declared file.
    pub truth: [String; 4],
}

/// What one demo run produced.
#[derive(Debug, Clone)]
pub struct DemoOutput {
    pub fits: Vec<Fit>,
    pub personas: Vec<PersonaManifest>,
    pub priors_items: usize,
    pub priors_path: PathBuf,
}

/// An independent random stream per purpose, so adding a persona does not change the
/// population.
pub fn stream(seed: u64, purpose: u64) -> ChaCha8Rng {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(purpose);
    rng
}

/// Generate the demo priors at `priors_path` and the persona archives under
/// `exports_dir`.
pub fn generate_demo(
    cfg: &DemoConfig,
    priors_path: &Path,
    exports_dir: &Path,
) -> io::Result<DemoOutput> {
    let catalogue = catalogue::build(&mut stream(cfg.seed, 1), cfg.items);
    let population = populate(
        &mut stream(cfg.seed, 2),
        &catalogue,
        cfg.members,
        cfg.mean_degree,
    );
    // Calibration members join more items on average, so the fit also covers the
    // larger footprints real archives have.
    let held_out = populate(
        &mut stream(cfg.seed, 3),
        &catalogue,
        cfg.held_out,
        cfg.mean_degree * 2.0,
    );
    let counts = count(&population, &catalogue);

    let uncalibrated = priors_file(
        &counts,
        &catalogue,
        [(4.0, 0.0, 1.0); 4],
        cfg.members,
        cfg.seed,
    );
    let fits = fit(&uncalibrated, &catalogue, &held_out);
    let mut fitted = [(4.0, 0.0, 1.0); 4];
    for (l, f) in fitted.iter_mut().zip(&fits) {
        *l = (f.smoothing, f.pseudocount, f.lambda);
    }
    let file = priors_file(&counts, &catalogue, fitted, cfg.members, cfg.seed);
    let priors_items = file.items.len();
    if let Some(parent) = priors_path.parent() {
        fs::create_dir_all(parent)?;
    }
    let mut buf = Vec::new();
    write_priors(&file, &mut buf)?;
    fs::write(priors_path, buf)?;

    fs::create_dir_all(exports_dir)?;
    fs::write(exports_dir.join("telltale-mapping.toml"), layout_a::MAPPING)?;
    let mut manifests = Vec::new();
    for (n, spec) in PERSONAS.iter().enumerate() {
        let archive = generate(
            &mut stream(cfg.seed, 100 + n as u64),
            spec,
            &catalogue,
            &population,
        );
        let (archive_name, mapping_name) = match spec.layout {
            Layout::A => {
                let mut sink: Box<dyn ArchiveSink> =
                    Box::new(FolderSink::create(&exports_dir.join(spec.slug))?);
                layout_a::write(&archive, sink.as_mut())?;
                sink.finish()?;
                (spec.slug.to_string(), "telltale-mapping.toml".to_string())
            }
            Layout::B => {
                let zip_name = format!("{}.zip", spec.slug);
                let mapping_name = format!("{}.mapping.toml", spec.slug);
                let mut sink: Box<dyn ArchiveSink> = Box::new(ZipSink::create(
                    &exports_dir.join(&zip_name),
                    zip::CompressionMethod::Deflated,
                )?);
                layout_b::write(&archive, sink.as_mut())?;
                sink.finish()?;
                fs::write(exports_dir.join(&mapping_name), layout_b::MAPPING)?;
                (zip_name, mapping_name)
            }
        };
        manifests.push(PersonaManifest {
            slug: spec.slug.into(),
            name: spec.name.into(),
            role: spec.role.into(),
            layout: match spec.layout {
                Layout::A => "A".into(),
                Layout::B => "B".into(),
            },
            archive: archive_name,
            mapping: mapping_name,
            likes: archive.count(ItemKind::Like),
            groups: archive.count(ItemKind::Group),
            follows: archive.count(ItemKind::Follow),
            events: archive.count(ItemKind::Event),
            friends: archive.friends.len(),
            items: archive.items.len(),
            listed_items: archive.items.iter().filter(|i| i.listed).count(),
            truth: spec.values.map(str::to_string),
        });
    }
    let mut manifest = serde_json::to_vec_pretty(&manifests).map_err(io::Error::other)?;
    manifest.push(b'\n');
    fs::write(exports_dir.join("manifest.json"), manifest)?;
    // The personas outside the USA (hand-written, layout C, their mapping inside).
    let mut abroad = Vec::new();
    for spec in &ABROAD {
        let mut sink: Box<dyn ArchiveSink> =
            Box::new(FolderSink::create(&exports_dir.join(spec.slug))?);
        abroad.push(super::abroad::write(spec, sink.as_mut())?);
        sink.finish()?;
    }
    let mut manifest = serde_json::to_vec_pretty(&abroad).map_err(io::Error::other)?;
    manifest.push(b'\n');
    fs::write(exports_dir.join("world-manifest.json"), manifest)?;
    Ok(DemoOutput {
        fits,
        personas: manifests,
        priors_items,
        priors_path: priors_path.to_path_buf(),
    })
}
