//! Home place at three levels, for the whole world: country (ISO 3166-1 alpha-2),
//! first-level region (ISO 3166-2 where the gazetteer has it, else GeoNames' first-level
//! division) and town. Each level is an attribute of its own (`home_country`,
//! `home_region`, `home_town`), so inference, contributions, the planner and every
//! report treat it like any other attribute: its own reading, alert level and line.
//!
//! The levels are fitted to one footprint when it is scanned
//! ([`fit_home_levels`]):
//!
//! - **country**: every country of the gazetteer, base rates from population
//!   (GeoNames);
//! - **region**: the priors file's own location values first (the demo's US states,
//!   `US-OR` …, in the file's order, so their member counts stay table evidence),
//!   then every other region a name in the footprint may stand for, then "elsewhere"
//!   carrying the rest of the world's mass. A priors value's base rate is its share in
//!   the file times its country's share of the world ("refines within its country");
//!   another region's is its country's share times the region's share of the
//!   country's town population;
//! - **town**: the towns the footprint's names may stand for (at most [`TOWN_CAP`],
//!   the most weighed), then "elsewhere"; base rate = population / world population.
//!
//! When the priors' location values are countries, they become the country level
//! (first, in the file's order) instead of the region level.
//!
//! Each named place is weighed by population over the whole world (a name shared by
//! towns in several countries counts for each in proportion: "Aurora" is not sent to
//! Colorado alone), and lands on the value of its country, region and town. A mention
//! `m` landing on value `w` with share `q_m(w)` and confidence `c_m` gives
//! `L_m(v) = c_m·(s_m·q_m(v)/π(v) + 1 − s_m) + (1 − c_m)`, where `s_m` is the share of
//! such items that name the member's home, from the place cues (plain, local life,
//! travel, diaspora home or origin: reference-priors/lexicons/place-cues.toml). An
//! item naming several places takes the mixture `Σ_m (c_m/Σc)·L_m(v)`. The priors
//! table's and friends' evidence about the priors' location attribute is carried over
//! to its level with likelihood ratio 1 for the values it says nothing about.

use std::collections::HashMap;
use std::sync::Arc;

use super::model::{Evidence, EvidenceSet, Nesting, Origin, Subject};
use super::places::{LocationValues, NamedPlaces, PlaceCode, location_attributes, normalise};
use super::sources::SourceKind;
use crate::lexicon::{Gazetteer, PlaceCues, PlaceRef};
use crate::priors::{AttrValue, Attribute, Calibration, Priors};

/// Attribute id of the country level.
pub const HOME_COUNTRY: &str = "home_country";
/// Attribute id of the region level.
pub const HOME_REGION: &str = "home_region";
/// Attribute id of the town level.
pub const HOME_TOWN: &str = "home_town";
/// Value id of the remainder of the region and town levels.
pub const ELSEWHERE: &str = crate::priors::REMAINDER_ID;

/// Towns kept as values of the town level at most (the most weighed by the
/// footprint's names); the rest of their mass goes to "elsewhere" (common practice,
/// no source: keeps the level small enough to plan over).
pub const TOWN_CAP: usize = 200;
/// Calibration temperature of the three levels: names of places are rules of thumb,
/// and many items naming one place are not independent (common practice, no source).
pub const HOME_TEMPERATURE: f64 = 0.7;
/// Default alert levels (common practice, no source): country, region, town.
pub const HOME_THRESHOLDS: [f64; 3] = [0.5, 0.35, 0.35];
/// Largest ratio one item's place names give a town over a value they do not point
/// at: a rule of thumb may not make one item decisive at the town level, where
/// base rates are a few in a million (common practice, no source). Several items
/// naming one place still add up.
pub const HOME_MAX_RATIO: f64 = 50.0;
/// Smallest base rate given to any value (a country GeoNames lists with no people).
const MIN_BASE: f64 = 1e-9;

/// The three levels, in order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Level {
    Country,
    Region,
    Town,
}

impl Level {
    pub const ALL: [Level; 3] = [Level::Country, Level::Region, Level::Town];

    pub fn id(self) -> &'static str {
        match self {
            Level::Country => HOME_COUNTRY,
            Level::Region => HOME_REGION,
            Level::Town => HOME_TOWN,
        }
    }

    fn label(self) -> &'static str {
        match self {
            Level::Country => "Home country",
            Level::Region => "Home region",
            Level::Town => "Home town",
        }
    }

    fn index(self) -> usize {
        self as usize
    }
}

/// Is this attribute one of the home levels?
pub fn is_home_level(id: &str) -> bool {
    matches!(id, HOME_COUNTRY | HOME_REGION | HOME_TOWN)
}

/// Where a place lands at one level.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
enum Key {
    Country(u32),
    /// A region code (index into the gazetteer's region codes).
    Region(u32),
    City(u32),
}

/// One level being built: its values and, per place, the value it lands on.
struct LevelValues {
    level: Level,
    values: Vec<AttrValue>,
    base: Vec<f64>,
    by_key: HashMap<Key, usize>,
    /// Index of "elsewhere", if the level has one.
    elsewhere: Option<usize>,
    /// Countries the priors' own values cover at this level, with those values'
    /// indices (a country named as a whole spreads over them by base rate).
    covered: HashMap<u32, Vec<usize>>,
}

impl LevelValues {
    fn new(level: Level) -> Self {
        LevelValues {
            level,
            values: Vec::new(),
            base: Vec::new(),
            by_key: HashMap::new(),
            elsewhere: None,
            covered: HashMap::new(),
        }
    }

    fn push(&mut self, key: Option<Key>, id: String, label: String, base: f64) -> usize {
        let at = self.values.len();
        self.values.push(AttrValue { id, label });
        self.base.push(base.max(MIN_BASE));
        if let Some(k) = key {
            self.by_key.entry(k).or_insert(at);
        }
        at
    }

    /// Add "elsewhere" with the rest of the mass, and normalise.
    fn finish(&mut self, with_elsewhere: bool) {
        if with_elsewhere {
            let used: f64 = self.base.iter().sum();
            let at = self.push(
                None,
                ELSEWHERE.into(),
                "Somewhere else".into(),
                (1.0 - used).max(1e-3),
            );
            self.elsewhere = Some(at);
        }
        let total: f64 = self.base.iter().sum();
        self.base.iter_mut().for_each(|b| *b /= total);
    }

    /// Shares of one place over the values: `(value, share)`.
    /// With `coarse`, a place inside a country the priors' own values cover lands on
    /// those values by base rate (only its country counts: the priors table already
    /// spoke for the item inside its coverage).
    fn land(&self, g: &Gazetteer, place: PlaceRef, coarse: bool, into: &mut Vec<(usize, f64)>) {
        into.clear();
        if coarse && self.level == Level::Region {
            let country = match place {
                PlaceRef::City(t) => g.city(t).map(|c| c.country),
                PlaceRef::Region(r) => region_country(g, r),
                PlaceRef::Country(c) => Some(c),
            };
            if let Some(c) = country
                && self.covered.contains_key(&c)
            {
                return self.land(g, PlaceRef::Country(c), false, into);
            }
        }
        let one = |k: Key| self.by_key.get(&k).copied();
        match (self.level, place) {
            (Level::Country, PlaceRef::Country(c)) => {
                into.extend(one(Key::Country(c)).map(|v| (v, 1.0)))
            }
            (Level::Country, PlaceRef::Region(r)) => {
                if let Some(c) = region_country(g, r) {
                    into.extend(one(Key::Country(c)).map(|v| (v, 1.0)));
                }
            }
            (Level::Country, PlaceRef::City(t)) => {
                let c = g.city(t).map_or(0, |c| c.country);
                into.extend(one(Key::Country(c)).map(|v| (v, 1.0)));
            }
            (Level::Region, PlaceRef::Region(r)) => {
                into.extend(one(Key::Region(r)).map(|v| (v, 1.0)));
            }
            (Level::Region, PlaceRef::City(t)) => {
                if let Some(r) = g.city(t).and_then(|c| c.region) {
                    into.extend(one(Key::Region(r)).map(|v| (v, 1.0)));
                }
            }
            (Level::Region, PlaceRef::Country(c)) => {
                // A country the priors' own values cover spreads over them by base
                // rate (no evidence between them); others say nothing at this level.
                if let Some(vs) = self.covered.get(&c) {
                    let total: f64 = vs.iter().map(|&v| self.base[v]).sum();
                    if total > 0.0 {
                        into.extend(vs.iter().map(|&v| (v, self.base[v] / total)));
                    }
                }
            }
            (Level::Town, PlaceRef::City(t)) => {
                into.extend(one(Key::City(t)).or(self.elsewhere).map(|v| (v, 1.0)));
            }
            (Level::Town, _) => {}
        }
    }
}

/// The country (index) of a region code, from its `CC-` or `CC.` prefix.
fn region_country(g: &Gazetteer, r: u32) -> Option<u32> {
    let code = g.region_codes.get(r as usize)?;
    let cc = code.split(['-', '.']).next()?;
    g.countries
        .iter()
        .position(|c| c.code == cc)
        .map(|i| i as u32)
}

/// Populations the base rates are made from.
struct Populations {
    world: f64,
    /// Per country: its population, and the sum of its towns' populations.
    country: Vec<f64>,
    country_towns: Vec<f64>,
    /// Per region code: the sum of its towns' populations.
    region_towns: Vec<f64>,
}

impl Populations {
    fn new(g: &Gazetteer) -> Self {
        let country: Vec<f64> = g.countries.iter().map(|c| c.population as f64).collect();
        let mut country_towns = vec![0.0; g.countries.len()];
        let mut region_towns = vec![0.0; g.region_codes.len()];
        for c in (0..g.city_count() as u32).filter_map(|t| g.city(t)) {
            country_towns[c.country as usize] += c.population as f64;
            if let Some(r) = c.region {
                region_towns[r as usize] += c.population as f64;
            }
        }
        Populations {
            world: country.iter().sum::<f64>().max(1.0),
            country,
            country_towns,
            region_towns,
        }
    }

    fn country_share(&self, c: u32) -> f64 {
        self.country[c as usize] / self.world
    }

    /// A region's share of the world: its country's share times its share of the
    /// country's town population (named regions without towns get their own figure).
    fn region_share(&self, g: &Gazetteer, r: u32) -> f64 {
        let Some(c) = region_country(g, r) else {
            return MIN_BASE;
        };
        let towns = self.country_towns[c as usize];
        let mut inside = self.region_towns[r as usize];
        if inside <= 0.0
            && let Some(named) = g.regions.get(r as usize)
        {
            inside = named.population as f64;
        }
        if towns <= 0.0 {
            return MIN_BASE;
        }
        self.country_share(c) * (inside / towns).min(1.0)
    }
}

/// The label of a region code: its name where the gazetteer has one, else its
/// country's name with GeoNames' division code.
fn region_label(g: &Gazetteer, r: u32) -> String {
    if let Some(named) = g.regions.get(r as usize) {
        let country = region_country(g, r)
            .map(|c| g.countries[c as usize].name.as_str())
            .unwrap_or("");
        return if country.is_empty() {
            named.name.clone()
        } else {
            format!("{}, {country}", named.name)
        };
    }
    let code = &g.region_codes[r as usize];
    match region_country(g, r) {
        Some(c) => format!("{} (division {code})", g.countries[c as usize].name),
        None => code.clone(),
    }
}

fn town_label(g: &Gazetteer, t: u32) -> String {
    let Some(city) = g.city(t) else {
        return format!("town {t}");
    };
    let country = &g.countries[city.country as usize].name;
    match city.region.and_then(|r| g.regions.get(r as usize)) {
        Some(region) => format!("{} ({}, {country})", city.name, region.name),
        None => format!("{} ({country})", city.name),
    }
}

fn town_id(g: &Gazetteer, t: u32) -> String {
    let Some(city) = g.city(t) else {
        return format!("town-{t}");
    };
    let area = city
        .region
        .map(|r| g.region_codes[r as usize].clone())
        .unwrap_or_else(|| g.countries[city.country as usize].code.clone());
    format!("{area}/{}", city.name)
}

/// The place each mention's candidates weigh, by population over the world.
fn weights(g: &Gazetteer, places: &[PlaceRef]) -> Vec<f64> {
    let pops: Vec<f64> = places
        .iter()
        .map(|&p| (g.candidate(p).population as f64).max(1.0))
        .collect();
    let total: f64 = pops.iter().sum();
    pops.into_iter().map(|p| p / total).collect()
}

/// Fit the home levels to a footprint's evidence: replace the priors' location
/// attribute (if any) by its level, add the other levels, carry the location
/// attribute's table and friends evidence over, and add each item's place evidence
/// at every level. `priors` must hold the file's attributes (see
/// [`Priors::restore_file_attributes`]); afterwards it holds the fitted ones.
pub fn fit_home_levels(
    priors: &mut Priors,
    mut evidence: EvidenceSet,
    gazetteer: &Gazetteer,
    cues: &PlaceCues,
) -> EvidenceSet {
    priors.restore_file_attributes();
    let g = gazetteer;
    let pops = Populations::new(g);
    let location: Option<LocationValues> = location_attributes(priors, g).into_iter().next();
    let loc_level = location.as_ref().map(|lv| {
        let countries = lv
            .codes
            .iter()
            .filter(|c| matches!(c, Some(PlaceCode::Country(_))))
            .count();
        let regions = lv
            .codes
            .iter()
            .filter(|c| matches!(c, Some(PlaceCode::Region(_))))
            .count();
        if countries > regions {
            Level::Country
        } else {
            Level::Region
        }
    });
    let country_index: HashMap<&str, u32> = g
        .countries
        .iter()
        .enumerate()
        .map(|(i, c)| (c.code.as_str(), i as u32))
        .collect();
    let region_index: HashMap<String, u32> = g
        .region_codes
        .iter()
        .enumerate()
        .map(|(i, c)| (c.to_ascii_uppercase(), i as u32))
        .collect();

    let mut levels: Vec<LevelValues> = Level::ALL.into_iter().map(LevelValues::new).collect();

    // The priors' own values first, refining within their countries.
    if let (Some(lv), Some(level)) = (&location, loc_level) {
        let attr = &priors.attributes[lv.attribute];
        let out = &mut levels[level.index()];
        let mut countries: Vec<u32> = Vec::new();
        for code in lv.codes.iter().flatten() {
            let cc = match code {
                PlaceCode::Country(c) => c.as_str(),
                PlaceCode::Region(r) => r.split('-').next().unwrap_or(r),
            };
            if let Some(&c) = country_index.get(cc)
                && !countries.contains(&c)
            {
                countries.push(c);
            }
        }
        let mass: f64 = match level {
            Level::Country => lv
                .codes
                .iter()
                .flatten()
                .filter_map(|c| match c {
                    PlaceCode::Country(cc) => country_index.get(cc.as_str()),
                    _ => None,
                })
                .map(|&c| pops.country_share(c))
                .sum(),
            _ => countries.iter().map(|&c| pops.country_share(c)).sum(),
        };
        for (v, (value, code)) in attr.values.iter().zip(&lv.codes).enumerate() {
            let key = match code {
                Some(PlaceCode::Country(cc)) => {
                    country_index.get(cc.as_str()).map(|&c| Key::Country(c))
                }
                Some(PlaceCode::Region(r)) => region_index.get(r.as_str()).map(|&r| Key::Region(r)),
                None => None,
            };
            let at = out.push(
                key,
                value.id.clone(),
                value.label.clone(),
                attr.base_rates[v] * mass,
            );
            if let Some(PlaceCode::Region(r)) = code
                && let Some(&c) = country_index.get(r.split('-').next().unwrap_or(r))
            {
                out.covered.entry(c).or_default().push(at);
            }
        }
    }

    // Every country.
    {
        let out = &mut levels[Level::Country.index()];
        for (i, c) in g.countries.iter().enumerate() {
            let key = Key::Country(i as u32);
            if out.by_key.contains_key(&key) {
                continue;
            }
            out.push(
                Some(key),
                c.code.clone(),
                c.name.clone(),
                pops.country_share(i as u32),
            );
        }
        out.finish(false);
    }

    // Regions and towns the footprint's names may stand for, most weighed first.
    let mut region_weight: HashMap<u32, f64> = HashMap::new();
    let mut town_weight: HashMap<u32, f64> = HashMap::new();
    let mut seen: HashMap<*const NamedPlaces, ()> = HashMap::new();
    for (_, named) in &evidence.places {
        if seen.insert(Arc::as_ptr(named), ()).is_some() {
            continue;
        }
        for m in &named.mentions {
            for (&p, w) in m.places.iter().zip(weights(g, &m.places)) {
                let w = w * m.confidence;
                match p {
                    PlaceRef::City(t) => {
                        *town_weight.entry(t).or_default() += w;
                        if let Some(r) = g.city(t).and_then(|c| c.region) {
                            *region_weight.entry(r).or_default() += w;
                        }
                    }
                    PlaceRef::Region(r) => *region_weight.entry(r).or_default() += w,
                    PlaceRef::Country(_) => {}
                }
            }
        }
    }
    {
        let out = &mut levels[Level::Region.index()];
        let mut regions: Vec<(u32, f64)> = region_weight.into_iter().collect();
        regions.sort_by(|a, b| b.1.total_cmp(&a.1).then(a.0.cmp(&b.0)));
        for (r, _) in regions {
            let key = Key::Region(r);
            if out.by_key.contains_key(&key) {
                continue;
            }
            let id = g.region_codes[r as usize].clone();
            out.push(Some(key), id, region_label(g, r), pops.region_share(g, r));
        }
        out.finish(true);
    }
    {
        let out = &mut levels[Level::Town.index()];
        let mut towns: Vec<(u32, f64)> = town_weight.into_iter().collect();
        towns.sort_by(|a, b| b.1.total_cmp(&a.1).then(a.0.cmp(&b.0)));
        towns.truncate(TOWN_CAP);
        for (t, _) in towns {
            let share = g.city(t).map_or(0, |c| c.population) as f64 / pops.world;
            out.push(Some(Key::City(t)), town_id(g, t), town_label(g, t), share);
        }
        out.finish(true);
    }

    // The fitted attributes: the location attribute replaced in place by its level,
    // the other levels after the file's attributes.
    let mut attributes = priors.attributes.clone();
    let mut index_of = [usize::MAX; 3];
    let template = location
        .as_ref()
        .map(|lv| priors.attributes[lv.attribute].clone());
    for level in Level::ALL {
        let lvl = &levels[level.index()];
        let attr = make_attribute(level, lvl, template.as_ref());
        match (&location, loc_level) {
            (Some(lv), Some(l)) if l == level => {
                attributes[lv.attribute] = attr;
                index_of[level.index()] = lv.attribute;
            }
            _ => {
                index_of[level.index()] = attributes.len();
                attributes.push(attr);
            }
        }
    }

    // Carry the location attribute's evidence over (its values come first in its
    // level); drop the old place-name evidence, which the levels replace.
    if let (Some(lv), Some(level)) = (&location, loc_level) {
        let n = levels[level.index()].values.len();
        let base = &levels[level.index()].base;
        let mut carried: HashMap<*const f64, usize> = HashMap::new();
        let old = std::mem::take(&mut evidence.list);
        let mut list = Vec::with_capacity(old.len());
        for e in old {
            if e.attribute() != lv.attribute {
                list.push(e);
                continue;
            }
            if matches!(&e.origin, Origin::Lexicon(r) if r.rule == SourceKind::Places.id()) {
                continue;
            }
            let key = e.log_lr().as_ptr();
            if let Some(&at) = carried.get(&key) {
                let shared: &Evidence = &list[at];
                let e2 = shared.sharing(e.subject(), e.origin.clone());
                list.push(e2);
                continue;
            }
            let mut log_lr = e.log_lr().to_vec();
            log_lr.resize(n, 0.0);
            let dist = normalise(log_lr.iter().zip(base).map(|(l, b)| l.exp() * b));
            carried.insert(key, list.len());
            list.push(Evidence::from_distribution(
                e.subject(),
                lv.attribute,
                dist,
                base,
                e.support(),
                e.origin.clone(),
            ));
        }
        evidence.list = list;
    }
    if let Some(stats) = &mut evidence.friends {
        stats.known.resize(attributes.len(), 0);
        stats.unreadable.resize(attributes.len(), 0);
    }

    // Place evidence at each level.
    let table_covers: Vec<bool> = match &location {
        Some(lv) => {
            let mut t = vec![false; evidence.n_items];
            for e in &evidence.list {
                if let Subject::Item(i) = e.subject()
                    && e.attribute() == lv.attribute
                    && matches!(e.origin, Origin::Table { .. })
                    && i < t.len()
                {
                    t[i] = true;
                }
            }
            t
        }
        None => Vec::new(),
    };
    // Per named places: the evidence at each level, and at the priors' own level the
    // coarse one for items the table covers.
    let mut made: HashMap<*const NamedPlaces, [Option<Evidence>; 4]> = HashMap::new();
    let places = std::mem::take(&mut evidence.places);
    let mut scratch = Vec::new();
    for (i, named) in &places {
        let pieces = made.entry(Arc::as_ptr(named)).or_insert_with(|| {
            let mut make = |level: Level, coarse: bool| {
                level_evidence(
                    g,
                    cues,
                    named,
                    &levels[level.index()],
                    index_of[level.index()],
                    coarse,
                    &mut scratch,
                )
            };
            let coarse = loc_level.and_then(|l| make(l, true));
            [
                make(Level::Country, false),
                make(Level::Region, false),
                make(Level::Town, false),
                coarse,
            ]
        });
        for level in Level::ALL {
            let covered =
                loc_level == Some(level) && table_covers.get(*i).copied().unwrap_or(false);
            let piece = if covered {
                &pieces[3]
            } else {
                &pieces[level.index()]
            };
            if let Some(e) = piece {
                evidence.list.push(e.about(Subject::Item(*i)));
            }
        }
    }
    evidence.places = places;
    evidence.nested = nestings(g, &levels, index_of);
    let evidence = put_levels_together(&mut attributes, evidence, index_of);
    priors.set_fitted_attributes(attributes);
    evidence
}

/// Which values of each level lie inside which of a coarser one: a region in its
/// country, a town in its region and its country (attribute indices as `index_of`
/// gives them).
fn nestings(g: &Gazetteer, levels: &[LevelValues], index_of: [usize; 3]) -> Vec<Nesting> {
    let keys = |l: &LevelValues| {
        let mut k: Vec<Option<Key>> = vec![None; l.values.len()];
        for (key, &v) in &l.by_key {
            if let Some(slot) = k.get_mut(v) {
                *slot = Some(*key);
            }
        }
        k
    };
    let country = &levels[Level::Country.index()];
    let region = &levels[Level::Region.index()];
    let town = &levels[Level::Town.index()];
    let in_country = |c: u32| country.by_key.get(&Key::Country(c)).copied();
    let region_keys = keys(region);
    let town_keys = keys(town);
    let region_in_country: Vec<Option<usize>> = region_keys
        .iter()
        .map(|k| match k {
            Some(Key::Region(r)) => region_country(g, *r).and_then(in_country),
            _ => None,
        })
        .collect();
    let town_in = |to_region: bool| -> Vec<Option<usize>> {
        town_keys
            .iter()
            .map(|k| match k {
                Some(Key::City(t)) => g.city(*t).and_then(|c| {
                    if to_region {
                        c.region
                            .and_then(|r| region.by_key.get(&Key::Region(r)).copied())
                    } else {
                        in_country(c.country)
                    }
                }),
                _ => None,
            })
            .collect()
    };
    let mut out = Vec::new();
    let (c, r, t) = (
        index_of[Level::Country.index()],
        index_of[Level::Region.index()],
        index_of[Level::Town.index()],
    );
    if let Some(rest) = region.elsewhere {
        out.push(Nesting {
            child: r,
            parent: c,
            parent_of: region_in_country,
            remainder: rest,
        });
    }
    if let Some(rest) = town.elsewhere {
        out.push(Nesting {
            child: t,
            parent: r,
            parent_of: town_in(true),
            remainder: rest,
        });
        out.push(Nesting {
            child: t,
            parent: c,
            parent_of: town_in(false),
            remainder: rest,
        });
    }
    out
}

/// Put the three levels side by side, country, region, town, where the priors'
/// location attribute was (or after the file's attributes when there was none), so
/// every report and screen lists them together; the evidence and the friends'
/// counts follow their attributes.
fn put_levels_together(
    attributes: &mut Vec<Attribute>,
    mut evidence: EvidenceSet,
    index_of: [usize; 3],
) -> EvidenceSet {
    let first = index_of.iter().copied().min().unwrap_or(attributes.len());
    let mut order: Vec<usize> = Vec::with_capacity(attributes.len());
    for i in 0..attributes.len() {
        if i == first {
            order.extend(index_of);
        } else if !index_of.contains(&i) {
            order.push(i);
        }
    }
    if order.len() != attributes.len() || order.iter().enumerate().all(|(n, &o)| n == o) {
        return evidence;
    }
    let mut new_index = vec![0; attributes.len()];
    for (n, &o) in order.iter().enumerate() {
        new_index[o] = n;
    }
    let old = std::mem::take(attributes);
    let mut slots: Vec<Option<Attribute>> = old.into_iter().map(Some).collect();
    *attributes = order.iter().filter_map(|&o| slots[o].take()).collect();
    for e in &mut evidence.list {
        let a = e.attribute();
        if let Some(&n) = new_index.get(a) {
            e.move_to_attribute(n);
        }
    }
    for n in &mut evidence.nested {
        n.child = new_index[n.child];
        n.parent = new_index[n.parent];
    }
    if let Some(stats) = &mut evidence.friends {
        let permute = |v: &[usize]| -> Vec<usize> {
            order
                .iter()
                .map(|&o| v.get(o).copied().unwrap_or(0))
                .collect()
        };
        stats.known = permute(&stats.known);
        stats.unreadable = permute(&stats.unreadable);
    }
    evidence
}

fn make_attribute(level: Level, lvl: &LevelValues, template: Option<&Attribute>) -> Attribute {
    let threshold = match template {
        Some(t) if level == Level::Region => t.threshold,
        _ => HOME_THRESHOLDS[level.index()],
    };
    Attribute {
        id: level.id().to_string(),
        label: level.label().to_string(),
        values: lvl.values.clone(),
        log_base: lvl.base.iter().map(|b| b.ln()).collect(),
        member_rates: lvl.base.clone(),
        base_rates: lvl.base.clone(),
        threshold,
        smoothing: template.map_or(crate::priors::DEFAULT_SMOOTHING, |t| t.smoothing),
        pseudocount: template.map_or(1.0, |t| t.pseudocount),
        special_category: None,
        calibration: Calibration::Temperature {
            lambda: HOME_TEMPERATURE,
        },
    }
}

/// One item's evidence at one level (see the module notes), or `None` when none of
/// its places lands on the level.
fn level_evidence(
    g: &Gazetteer,
    cues: &PlaceCues,
    named: &NamedPlaces,
    lvl: &LevelValues,
    attribute: usize,
    coarse: bool,
    scratch: &mut Vec<(usize, f64)>,
) -> Option<Evidence> {
    let k = lvl.values.len();
    let mut mixture = vec![0.0; k];
    let mut weight = 0.0;
    let mut q = vec![0.0; k];
    let mut best: Option<(f64, &str)> = None;
    let mut words = Vec::new();
    for m in &named.mentions {
        // A town counts as home only where the item is about local life there (or a
        // diaspora living there); a town named in passing speaks for its country and
        // region only (common practice, no source).
        if lvl.level == Level::Town
            && !matches!(
                m.role,
                crate::lexicon::PlaceRole::Local | crate::lexicon::PlaceRole::DiasporaHome
            )
        {
            continue;
        }
        q.iter_mut().for_each(|x| *x = 0.0);
        let mut landed = 0.0;
        for (&p, w) in m.places.iter().zip(weights(g, &m.places)) {
            lvl.land(g, p, coarse, scratch);
            for &(v, share) in scratch.iter() {
                q[v] += w * share;
                landed += w * share;
            }
        }
        if landed <= 0.0 {
            continue;
        }
        q.iter_mut().for_each(|x| *x /= landed);
        let c = m.confidence;
        let s = cues.strength(m.role);
        for v in 0..k {
            mixture[v] += c * (c * (s * q[v] / lvl.base[v] + 1.0 - s) + 1.0 - c);
        }
        weight += c;
        let n = m.places.len();
        let mut word = format!("'{}'", m.text);
        if n > 1 {
            word.push_str(&format!(" ({n} places of that name)"));
        }
        if m.role != crate::lexicon::PlaceRole::Plain {
            word.push_str(&format!(" ({})", m.role.as_str()));
        }
        words.push(word);
        let (v, share) = crate::stats::argmax(&q);
        if best.is_none_or(|(b, _)| share * c > b) {
            best = Some((share * c, lvl.values[v].label.as_str()));
        }
    }
    if weight <= 0.0 {
        return None;
    }
    let lr: Vec<f64> = mixture.into_iter().map(|x| x / weight).collect();
    // At most HOME_MAX_RATIO times the ratio of a value no place points at.
    let floor = lr.iter().copied().fold(f64::INFINITY, f64::min);
    let lr: Vec<f64> = lr
        .into_iter()
        .map(|l| l.min(floor * HOME_MAX_RATIO))
        .collect();
    let dist = normalise(lr.iter().zip(&lvl.base).map(|(l, b)| l * b));
    let detail = format!(
        "{} → {} (GeoNames, weighted by population over the world)",
        words.join(", "),
        best.map_or("", |(_, l)| l)
    );
    Some(Evidence::from_distribution(
        Subject::Item(0),
        attribute,
        dist,
        &lvl.base,
        named.mentions.len() as f64,
        Origin::lexicon(SourceKind::Places.id(), detail),
    ))
}

#[cfg(test)]
mod tests;
