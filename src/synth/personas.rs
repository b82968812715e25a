//! The demo personas: invented members of the fictional network whose archives ship in
//! demo-exports/. Each has known attributes, a join year, affiliations drawn like any
//! member's (plus a few personal items no reference table lists), dated activity and a
//! friend list drawn with homophily, some friends showing attributes publicly.

use rand::Rng;

use super::catalogue::CatItem;
use super::membership::{Population, affiliations, normal};
use super::places::state_index;
use super::words::{FIRST_NAMES, LAST_NAMES};
use super::world::{AGE_BANDS, POLITICS_VALUES, Profile, RELIGION_VALUES};
use crate::footprint::ItemKind::{self, Event, Group, Like};

/// Which invented archive layout a persona's export uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Layout {
    /// Folders of JSON, NDJSON and CSV (demo-exports/telltale-mapping.toml).
    A,
    /// A zip with semicolon CSV and sectioned, nested JSON (its own mapping).
    B,
}

#[derive(Debug, Clone, Copy)]
pub struct PersonaSpec {
    pub slug: &'static str,
    pub name: &'static str,
    pub role: &'static str,
    /// age band, location, politics, religion value ids.
    pub values: [&'static str; 4],
    pub layout: Layout,
    pub affiliations: usize,
    pub friends: usize,
    pub joined: i32,
    pub personal: &'static [(ItemKind, &'static str)],
}

/// The demo personas. Invented people; any likeness to a real person is chance.
pub const PERSONAS: [PersonaSpec; 4] = [
    PersonaSpec {
        slug: "reporter",
        name: "Noor Haddad-Vance",
        role: "a local reporter",
        values: ["35-44", "US-OR", "centre-left", "none"],
        layout: Layout::A,
        affiliations: 150,
        friends: 320,
        joined: 2011,
        personal: &[
            (Event, "Haddad-Vance Family Reunion 2019"),
            (Group, "Westview High Class of 2004"),
            (Group, "Eugene Press Club Alumni"),
            (Group, "Night Shift Newsroom Crew"),
        ],
    },
    PersonaSpec {
        slug: "organiser",
        name: "Teodoro Quill",
        role: "a union organiser",
        values: ["25-34", "US-OH", "left", "christian"],
        layout: Layout::A,
        affiliations: 110,
        friends: 410,
        joined: 2013,
        personal: &[
            (Group, "Local 4471 Solidarity Hall"),
            (Event, "Quill Family Picnic 2024"),
            (Group, "Dayton Warehouse Workers Unite"),
            (Group, "Parish Youth Ministry Alumni"),
        ],
    },
    PersonaSpec {
        slug: "teacher",
        name: "Margit Ashdown",
        role: "a retired teacher",
        values: ["65+", "US-VT", "centre", "jewish"],
        layout: Layout::A,
        affiliations: 55,
        friends: 140,
        joined: 2010,
        personal: &[
            (Group, "Burlington Retired Educators Lunch"),
            (Like, "Ashdown Grandchildren Photos"),
            (Group, "Class of 1976 Reunion"),
            (Group, "Torah Study at Home"),
        ],
    },
    PersonaSpec {
        slug: "student",
        name: "Kai Okonkwo-Reyes",
        role: "a university student",
        values: ["18-24", "US-TX", "centre-right", "muslim"],
        layout: Layout::B,
        affiliations: 190,
        friends: 520,
        joined: 2019,
        personal: &[
            (Group, "First-Year Engineering 2023"),
            (Group, "Okonkwo-Reyes Cousins Chat"),
            (Like, "Café Olé Study Spot"),
        ],
    },
];

impl PersonaSpec {
    pub fn profile(&self) -> Profile {
        let find =
            |list: &[(&str, &str, f64)], id: &str| list.iter().position(|v| v.0 == id).unwrap_or(0);
        [
            find(&AGE_BANDS, self.values[0]),
            state_index(self.values[1]).unwrap_or(0),
            find(&POLITICS_VALUES, self.values[2]),
            find(&RELIGION_VALUES, self.values[3]),
        ]
    }
}

/// Unix time of the demo's "today", 2026-11-30T00:00:00Z.
pub fn demo_now() -> i64 {
    time::macros::datetime!(2026-11-30 0:00 UTC).unix_timestamp()
}

fn year_start(year: i32) -> i64 {
    time::Date::from_calendar_date(year, time::Month::January, 1)
        .map(|d| d.midnight().assume_utc().unix_timestamp())
        .unwrap_or(0)
}

/// The last year from 1950 to the demo's year written in a name ("Jazz Night 2019",
/// "Class of 2004 Reunion").
fn year_in_name(name: &str) -> Option<i32> {
    let bytes = name.as_bytes();
    let mut found = None;
    for start in 0..bytes.len().saturating_sub(3) {
        let digits = &bytes[start..start + 4];
        let bounded = (start == 0 || !bytes[start - 1].is_ascii_digit())
            && bytes.get(start + 4).is_none_or(|b| !b.is_ascii_digit());
        if bounded && digits.iter().all(u8::is_ascii_digit) {
            let year: i32 = digits.iter().fold(0, |y, d| y * 10 + i32::from(d - b'0'));
            if (1950..=super::catalogue::DEMO_YEAR).contains(&year) {
                found = Some(year);
            }
        }
    }
    found
}

/// When an item can be dated, so dates fit names: an event named for a year happened
/// in that year (up to the demo's today); anything else named for a year was joined or
/// liked no earlier than that year; other items any time after the person joined.
fn date_span(kind: ItemKind, name: &str, joined: i64, now: i64) -> std::ops::Range<i64> {
    let Some(year) = year_in_name(name) else {
        return joined..now;
    };
    let (start, end) = (year_start(year), year_start(year + 1).min(now));
    if kind == Event {
        return start..end.max(start + 1);
    }
    let from = joined.max(start);
    if from < now {
        from..now
    } else {
        start..end.max(start + 1)
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct PersonaItem {
    pub kind: ItemKind,
    pub name: String,
    pub id: String,
    pub category: String,
    pub date: i64,
    /// False for personal items no reference table lists.
    pub listed: bool,
}

#[derive(Debug, Clone, PartialEq)]
pub struct PersonaFriend {
    pub name: String,
    pub uid: String,
    pub since: i64,
    /// (attribute, value) pairs shown on the friend's public profile.
    pub public: Vec<(usize, usize)>,
}

#[derive(Debug, Clone)]
pub struct PersonaArchive {
    pub spec: PersonaSpec,
    pub profile: Profile,
    pub joined: i64,
    pub items: Vec<PersonaItem>,
    pub friends: Vec<PersonaFriend>,
}

impl PersonaArchive {
    pub fn count(&self, kind: ItemKind) -> usize {
        self.items.iter().filter(|i| i.kind == kind).count()
    }
}

/// Chances that a friend shows each attribute publicly (common practice, no source:
/// places are shown often, beliefs rarely).
const PUBLIC_SHARE: [f64; 4] = [0.15, 0.35, 0.05, 0.05];

/// Generate one persona's archive content.
pub fn generate(
    rng: &mut impl Rng,
    spec: &PersonaSpec,
    catalogue: &[CatItem],
    population: &Population,
) -> PersonaArchive {
    let profile = spec.profile();
    let joined = year_start(spec.joined) + rng.random_range(0..300) * 86_400;
    let now = demo_now();
    let mut items: Vec<PersonaItem> = affiliations(rng, catalogue, &profile, spec.affiliations)
        .into_iter()
        .map(|i| {
            let c = &catalogue[i as usize];
            PersonaItem {
                kind: c.kind,
                name: c.name.clone(),
                id: c.id.clone(),
                category: c.category.to_string(),
                date: rng.random_range(date_span(c.kind, &c.name, joined, now)),
                listed: true,
            }
        })
        .collect();
    for (n, (kind, name)) in spec.personal.iter().enumerate() {
        items.push(PersonaItem {
            kind: *kind,
            name: name.to_string(),
            id: format!("lw-p-{}-{}", spec.slug, n + 1),
            category: "Personal".into(),
            date: rng.random_range(date_span(*kind, name, joined, now)),
            listed: false,
        });
    }
    items.sort_by_key(|i| i.date);

    // Friends: a homophilous weighted draw from the population without replacement.
    let same = |p: &Profile, a: usize| f64::from(u8::from(p[a] == profile[a]));
    let mut keyed: Vec<(f64, usize)> = population
        .profiles
        .iter()
        .enumerate()
        .map(|(m, p)| {
            let w = 1.6 * same(p, 1) + 0.7 * same(p, 0) + 0.5 * same(p, 2) + 0.3 * same(p, 3);
            let u: f64 = rng.random_range(f64::MIN_POSITIVE..1.0);
            (u.ln() * (-w).exp(), m)
        })
        .collect();
    let n_friends = spec.friends.min(keyed.len());
    if n_friends < keyed.len() {
        keyed.select_nth_unstable_by(n_friends, |a, b| b.0.total_cmp(&a.0));
        keyed.truncate(n_friends);
    }
    keyed.sort_by_key(|k| k.1);
    let mut friends: Vec<PersonaFriend> = keyed
        .into_iter()
        .map(|(_, m)| {
            let p = &population.profiles[m];
            let public = (0..4)
                .filter(|&a| rng.random_bool(PUBLIC_SHARE[a]))
                .map(|a| (a, p[a]))
                .collect();
            let first = FIRST_NAMES[rng.random_range(0..FIRST_NAMES.len())];
            let last = LAST_NAMES[rng.random_range(0..LAST_NAMES.len())];
            // Friendships start after joining, more of them early on.
            let span = (now - joined) as f64;
            let t = joined + (span * (0.5 * normal(rng)).exp().min(2.0) / 2.0) as i64;
            PersonaFriend {
                name: format!("{first} {last}"),
                uid: format!("lw-u{m:06}"),
                since: t.clamp(joined, now - 1),
                public,
            }
        })
        .collect();
    friends.sort_by_key(|f| f.since);
    PersonaArchive {
        spec: *spec,
        profile,
        joined,
        items,
        friends,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;

    fn year_of(t: i64) -> i32 {
        time::OffsetDateTime::from_unix_timestamp(t)
            .map(|d| d.year())
            .unwrap_or(0)
    }

    #[test]
    fn years_are_read_from_names() {
        assert_eq!(year_in_name("Toddler Music Time 2026"), Some(2026));
        assert_eq!(year_in_name("Class of 2004 Reunion"), Some(2004));
        assert_eq!(year_in_name("Route 66 Diner"), None);
        assert_eq!(year_in_name("Studio 54321"), None);
        assert_eq!(year_in_name("Room 1200 Club"), None);
    }

    #[test]
    fn dates_fit_the_years_in_names() {
        let joined = year_start(2011) + 40 * 86_400;
        let now = demo_now();
        let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(3);
        for _ in 0..200 {
            let t = rng.random_range(date_span(Event, "Toddler Music Time 2026", joined, now));
            assert_eq!(year_of(t), 2026);
            assert!(t < now);
            let t = rng.random_range(date_span(Event, "Jazz Night 2009", joined, now));
            assert_eq!(year_of(t), 2009, "an event's date is its year's");
            let t = rng.random_range(date_span(Group, "First-Year Students 2023", joined, now));
            assert!(year_of(t) >= 2023 && t < now);
            let t = rng.random_range(date_span(Like, "Night Owls", joined, now));
            assert!(t >= joined && t < now);
        }
    }
}
