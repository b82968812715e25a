//! A synthetic cohort: N invented members of the Lanternwick network, each with an
//! archive in layout A (zip files `member-0001.zip`, …) that includes their declared
//! attributes in `account/about_me.json`, and the layout-A mapping beside them. With
//! the demo's seed and item count the catalogue is the demo's, so the bundled demo
//! priors list the same items and serve as the schema. `cohort-generator.json` records
//! the seed and sizes, so `eval` can work out the best possible guesses.

use std::fs;
use std::io;
use std::path::Path;

use rand::Rng;

use super::catalogue;
use super::layout_a;
use super::membership::{affiliations, draw_degree};
use super::personas::{Layout, PersonaArchive, PersonaFriend, PersonaItem, PersonaSpec, demo_now};
use super::sink::{ArchiveSink, ZipSink};
use super::stream;
use super::words::{FIRST_NAMES, LAST_NAMES};
use super::world::{Profile, draw_profile};

/// The file `generate_cohort` leaves beside the invented archives, so that priors
/// built from them say they are synthetic.
pub const SYNTHETIC_MARKER: &str = "telltale-synthetic-cohort.txt";

/// Whether a cohort folder was made by [`generate_cohort`] (it holds
/// [`SYNTHETIC_MARKER`]).
pub fn is_synthetic_cohort(dir: &Path) -> bool {
    dir.join(SYNTHETIC_MARKER).is_file()
}

/// Sizes and seed of a synthetic cohort.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CohortConfig {
    pub seed: u64,
    pub members: usize,
    /// Items in the network (the demo has 1,600).
    pub items: usize,
    /// Mean number of items a member joins.
    pub mean_degree: f64,
}

impl Default for CohortConfig {
    fn default() -> Self {
        CohortConfig {
            seed: 7,
            members: 500,
            items: 1_600,
            mean_degree: 40.0,
        }
    }
}

/// One written member: file name and true values (for tests; never in a priors file).
#[derive(Debug, Clone, PartialEq)]
pub struct CohortMember {
    pub archive: String,
    pub name: String,
    pub profile: Profile,
    pub friend_names: Vec<String>,
}

/// The placeholder spec all cohort members share (names are set per member).
const MEMBER_SPEC: PersonaSpec = PersonaSpec {
    slug: "member",
    name: "",
    role: "an invented cohort member",
    values: ["", "", "", ""],
    layout: Layout::A,
    affiliations: 0,
    friends: 0,
    joined: 2015,
    personal: &[],
};

fn name(rng: &mut impl Rng) -> String {
    let first = FIRST_NAMES[rng.random_range(0..FIRST_NAMES.len())];
    let last = LAST_NAMES[rng.random_range(0..LAST_NAMES.len())];
    format!("{first} {last}")
}

/// Write a cohort of `cfg.members` archives and the mapping into `out_dir`.
pub fn generate_cohort(cfg: &CohortConfig, out_dir: &Path) -> io::Result<Vec<CohortMember>> {
    let catalogue = catalogue::build(&mut stream(cfg.seed, 1), cfg.items);
    fs::create_dir_all(out_dir)?;
    fs::write(out_dir.join("telltale-mapping.toml"), layout_a::MAPPING)?;
    fs::write(
        out_dir.join(SYNTHETIC_MARKER),
        format!(
            "The archives in this folder are invented members of the Lanternwick network (telltale synth cohort, seed {}). Priors built from them are marked synthetic.\n",
            cfg.seed
        ),
    )?;
    let record = super::oracle::GeneratorRecord {
        generator: "telltale synth cohort".into(),
        seed: cfg.seed,
        items: cfg.items,
        mean_degree: cfg.mean_degree,
    };
    let text = serde_json::to_string_pretty(&record).map_err(io::Error::other)?;
    fs::write(out_dir.join(super::oracle::GENERATOR_FILE), text + "\n")?;
    let mut rng = stream(cfg.seed, 4);
    let now = demo_now();
    let width = cfg.members.to_string().len().max(4);
    let mut written = Vec::with_capacity(cfg.members);
    for n in 0..cfg.members {
        let profile = draw_profile(&mut rng);
        let degree = draw_degree(&mut rng, cfg.mean_degree, 400);
        let joined = now - rng.random_range(365..15 * 365) * 86_400;
        let items: Vec<PersonaItem> = affiliations(&mut rng, &catalogue, &profile, degree)
            .into_iter()
            .map(|i| {
                let c = &catalogue[i as usize];
                PersonaItem {
                    kind: c.kind,
                    name: c.name.clone(),
                    id: c.id.clone(),
                    category: c.category.to_string(),
                    date: rng.random_range(joined..now),
                    listed: true,
                }
            })
            .collect();
        let friends: Vec<PersonaFriend> = (0..rng.random_range(3..40))
            .map(|f| PersonaFriend {
                name: name(&mut rng),
                uid: format!("lw-c{n:06}-f{f:03}"),
                since: rng.random_range(joined..now),
                public: Vec::new(),
            })
            .collect();
        let person = name(&mut rng);
        let archive = PersonaArchive {
            spec: MEMBER_SPEC,
            profile,
            joined,
            items,
            friends,
        };
        let file = format!("member-{:0width$}.zip", n + 1);
        let mut sink: Box<dyn ArchiveSink> = Box::new(ZipSink::create(
            &out_dir.join(&file),
            zip::CompressionMethod::Deflated,
        )?);
        layout_a::write_as(&archive, &person, MEMBER_SPEC.role, sink.as_mut())?;
        sink.finish()?;
        written.push(CohortMember {
            archive: file,
            name: person,
            profile,
            friend_names: archive.friends.iter().map(|f| f.name.clone()).collect(),
        });
    }
    Ok(written)
}
