//! One scan, end to end: open the archive, find or load its mapping, import the
//! footprint, gather evidence against the priors and set up the live exposure. The CLI,
//! the explorer, the planner and the benchmarks all start here.

use std::path::{Path, PathBuf};

use crate::archive::{self, Archive};
use crate::evidence;
use crate::footprint::Footprint;
use crate::friends_file::{self, merge_friends_file};
use crate::import;
use crate::infer::Exposure;
use crate::limits::Limits;
use crate::mapping::{self, Mapping};
use crate::priors::{self, Priors};
use crate::report::{self, ScanReport};

/// The bundled demo priors (synthetic statistics of the fictional demo network).
pub const DEMO_PRIORS_JSON: &str = include_str!("../reference-priors/demo-priors.json");

/// Name shown for the bundled priors.
pub const DEMO_PRIORS_NAME: &str = "demo-priors.json (bundled)";

/// Load priors from a file (through the binary cache of large files unless
/// [`priors::disable_cache`] was called), or the bundled demo priors when no file is
/// named.
pub fn load_priors(path: Option<&Path>) -> Result<Priors, priors::Error> {
    load_priors_within(path, &Limits::default())
}

/// [`load_priors`] within reading limits (the `--limit` settings).
pub fn load_priors_within(path: Option<&Path>, limits: &Limits) -> Result<Priors, priors::Error> {
    match path {
        Some(p) => Priors::load_cached_within(p, priors::cache_dir().as_deref(), limits),
        None => Priors::parse(DEMO_PRIORS_JSON, DEMO_PRIORS_NAME),
    }
}

/// What to scan.
#[derive(Debug, Clone, Default)]
pub struct ScanInput {
    pub archive: PathBuf,
    /// A mapping file; `None` looks inside and beside the archive.
    pub mapping: Option<PathBuf>,
    pub limits: Limits,
    /// Evidence sources to run (default: all, with the bundled lexicons).
    pub sources: evidence::Sources,
    /// A CSV of some friends' attributes to merge into the archive's friends.
    pub friends_file: Option<PathBuf>,
}

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error(transparent)]
    Archive(#[from] archive::Error),
    #[error(transparent)]
    Mapping(#[from] mapping::Error),
    #[error(transparent)]
    Import(#[from] import::Error),
    #[error(transparent)]
    FriendsFile(#[from] friends_file::Error),
}

/// The result of importing and scoring one archive.
#[derive(Debug, Clone)]
pub struct Scan {
    /// The archive's file or folder name.
    pub archive_name: String,
    /// Where the mapping came from.
    pub mapping_origin: String,
    pub footprint: Footprint,
    pub exposure: Exposure,
}

/// The mapping the input names, or else the one found inside or beside the archive.
fn mapping_for(input: &ScanInput, archive: &mut Archive) -> Result<Mapping, Error> {
    Ok(match &input.mapping {
        Some(p) => Mapping::load_within(p, &input.limits)?,
        None => {
            let found = mapping::locate_within(archive, &input.limits)?;
            Mapping::parse(&found.text, &found.origin)?
        }
    })
}

/// The fingerprint saved decisions are filed under: the archive read through its
/// mapping, nothing scored.
pub fn fingerprint(input: &ScanInput) -> Result<String, Error> {
    let mut archive = Archive::open(&input.archive, &input.limits)?;
    let mapping = mapping_for(input, &mut archive)?;
    let footprint =
        import::import_with_progress(&mut archive, &mapping, &input.limits, &mut |_, _| {})?;
    Ok(footprint.fingerprint)
}

impl Scan {
    /// Import an archive and score it against the priors.
    ///
    /// The priors' attributes are fitted to this footprint: the home place at three
    /// levels (country, region, town) replaces the file's location attribute
    /// ([`evidence::fit_home_levels`]); use the same `priors` for this scan's reports
    /// and plans. A later scan with the same priors fits them anew.
    pub fn run(input: &ScanInput, priors: &mut Priors) -> Result<Scan, Error> {
        Scan::run_with_progress(input, priors, &mut |_, _| {})
    }

    /// As [`Scan::run`], telling `progress(done, total)` in bytes while importing.
    pub fn run_with_progress(
        input: &ScanInput,
        priors: &mut Priors,
        progress: &mut dyn FnMut(u64, u64),
    ) -> Result<Scan, Error> {
        let mut archive = Archive::open(&input.archive, &input.limits)?;
        let mapping = mapping_for(input, &mut archive)?;
        // The bundled lexicons are parsed on a second thread while the archive is read.
        let mut footprint = std::thread::scope(|scope| {
            scope.spawn(|| input.sources.prepare());
            import::import_with_progress(&mut archive, &mapping, &input.limits, progress)
        })?;
        priors.restore_file_attributes();
        if let Some(path) = &input.friends_file {
            merge_friends_file(&mut footprint, path, priors, &input.limits)?;
        }
        Ok(Scan::from_footprint(
            archive.display_name(),
            mapping.origin.clone(),
            footprint,
            priors,
            &input.sources,
        ))
    }

    /// Score an already imported footprint (fitting the priors' home levels to it, as
    /// [`Scan::run`] says).
    pub fn from_footprint(
        archive_name: String,
        mapping_origin: String,
        mut footprint: Footprint,
        priors: &mut Priors,
        sources: &evidence::Sources,
    ) -> Scan {
        priors.restore_file_attributes();
        let gazetteer = sources.places.as_ref().map(evidence::Lexicon::get);
        crate::unknown_values::check_attribute_names(
            &mut footprint,
            priors,
            &mapping_origin,
            gazetteer.as_deref(),
        );
        if let Some(g) = &gazetteer {
            crate::unknown_values::check_location_values(&mut footprint, priors, g);
        }
        crate::resident::trim();
        let mut evidence = evidence::gather(&footprint, priors, sources);
        if let Some(gazetteer) = gazetteer.filter(|_| sources.home_levels) {
            let cues = crate::lexicon::bundled_place_cues();
            evidence = evidence::fit_home_levels(priors, evidence, &gazetteer, &cues);
        }
        crate::resident::trim();
        let exposure = Exposure::new(priors, evidence);
        Scan {
            archive_name,
            mapping_origin,
            footprint,
            exposure,
        }
    }

    /// The report for the current state (hidden items count as hidden).
    pub fn report(&self, priors: &Priors) -> ScanReport {
        report::build(&self.archive_name, &self.footprint, priors, &self.exposure)
    }

    /// The report holding only as many item rows as `rows` says (the text, Markdown
    /// and HTML reports show the first few).
    pub fn report_with(&self, priors: &Priors, rows: report::RowCount) -> ScanReport {
        report::build_with(
            &self.archive_name,
            &self.footprint,
            priors,
            &self.exposure,
            rows,
        )
    }

    /// Write the JSON report, making each item row as it is written (the same bytes as
    /// [`report::write_json`] of [`Scan::report`], without holding every row).
    pub fn write_json(&self, priors: &Priors, out: &mut dyn std::io::Write) -> std::io::Result<()> {
        let head = self.report_with(priors, report::RowCount::Nothing);
        let rows = report::Rows::new(&self.footprint, priors, &self.exposure);
        report::write_json_streamed(&head, &rows, out)
    }
}
