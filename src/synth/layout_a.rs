//! Layout A, an archive layout invented for the demo: folders of JSON, NDJSON and CSV.
//! Read by demo-exports/telltale-mapping.toml.

use std::io;

use serde::Serialize;

use super::personas::PersonaArchive;
use super::sink::ArchiveSink;
use super::world::{AGE, LOCATION, POLITICS, RELIGION, value_id, value_label};
use crate::footprint::ItemKind;

/// The mapping file for layout A, as shipped beside the demo archives.
pub const MAPPING: &str = include_str!("../../demo-exports/telltale-mapping.toml");

pub fn rfc3339(t: i64) -> String {
    use time::format_description::well_known::Rfc3339;
    time::OffsetDateTime::from_unix_timestamp(t)
        .ok()
        .and_then(|d| d.format(&Rfc3339).ok())
        .unwrap_or_default()
}

pub fn ymd(t: i64) -> String {
    rfc3339(t).chars().take(10).collect()
}

pub fn json(value: &impl Serialize) -> io::Result<Vec<u8>> {
    let mut v = serde_json::to_vec_pretty(value).map_err(io::Error::other)?;
    v.push(b'\n');
    Ok(v)
}

#[derive(Serialize)]
struct Profile<'a> {
    display_name: &'a str,
    member_since: String,
    network: &'a str,
    note: &'a str,
}

#[derive(Serialize)]
struct AboutMe<'a> {
    age_band: &'a str,
    home: &'a str,
    leaning: &'a str,
    faith: &'a str,
}

#[derive(Serialize)]
struct FriendPublic<'a> {
    #[serde(skip_serializing_if = "Option::is_none")]
    age_range: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    lives_in: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    leaning: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    faith: Option<&'a str>,
}

#[derive(Serialize)]
struct Friend<'a> {
    name: &'a str,
    uid: &'a str,
    since: i64,
    profile: FriendPublic<'a>,
}

#[derive(Serialize)]
struct Friends<'a> {
    friends: Vec<Friend<'a>>,
}

#[derive(Serialize)]
struct Like<'a> {
    title: &'a str,
    page_id: &'a str,
    topic: &'a str,
    liked_at: i64,
}

#[derive(Serialize)]
struct Likes<'a> {
    liked_pages: Vec<Like<'a>>,
}

#[derive(Serialize)]
struct Follow<'a> {
    account: &'a str,
    account_id: &'a str,
    followed_at: String,
}

#[derive(Serialize)]
struct GroupRef<'a> {
    name: &'a str,
    gid: &'a str,
    category: &'a str,
}

#[derive(Serialize)]
struct Membership<'a> {
    group: GroupRef<'a>,
    joined: String,
}

#[derive(Serialize)]
struct Memberships<'a> {
    count: usize,
    items: Vec<Membership<'a>>,
}

#[derive(Serialize)]
struct Groups<'a> {
    memberships: Memberships<'a>,
}

pub const NOTE: &str = "Invented person in the invented Lanternwick network, made by `telltale synth` for demonstrations. Not a real person or a real platform's export.";

/// Placeholder media: a few small files the mapping never reads.
pub fn media_bytes(n: usize, len: usize) -> Vec<u8> {
    (0..len).map(|i| ((i * 31 + n * 17) % 251) as u8).collect()
}

/// Write a persona's archive in layout A.
pub fn write(p: &PersonaArchive, sink: &mut dyn ArchiveSink) -> io::Result<()> {
    write_as(p, p.spec.name, p.spec.role, sink)
}

/// Write an archive in layout A under another display name and role (cohort members
/// share one placeholder spec and get their own invented names).
pub fn write_as(
    p: &PersonaArchive,
    name: &str,
    role: &str,
    sink: &mut dyn ArchiveSink,
) -> io::Result<()> {
    sink.file(
        "README.txt",
        format!("Lanternwick account export (layout A)\n\n{NOTE}\n\nPersona: {name}, {role}.\n")
            .as_bytes(),
    )?;
    sink.file(
        "account/profile.json",
        &json(&Profile {
            display_name: name,
            member_since: rfc3339(p.joined),
            network: "Lanternwick",
            note: NOTE,
        })?,
    )?;
    sink.file(
        "account/about_me.json",
        &json(&AboutMe {
            age_band: value_id(AGE, p.profile[AGE]),
            home: value_id(LOCATION, p.profile[LOCATION]),
            leaning: value_id(POLITICS, p.profile[POLITICS]),
            faith: value_id(RELIGION, p.profile[RELIGION]),
        })?,
    )?;
    let friends = Friends {
        friends: p
            .friends
            .iter()
            .map(|f| {
                let get = |a: usize| {
                    f.public
                        .iter()
                        .find(|x| x.0 == a)
                        .map(|x| value_label(a, x.1))
                };
                Friend {
                    name: &f.name,
                    uid: &f.uid,
                    since: f.since,
                    profile: FriendPublic {
                        age_range: get(AGE),
                        lives_in: get(LOCATION),
                        leaning: get(POLITICS),
                        faith: get(RELIGION),
                    },
                }
            })
            .collect(),
    };
    sink.file("connections/friends.json", &json(&friends)?)?;

    let of = |k: ItemKind| p.items.iter().filter(move |i| i.kind == k);
    let likes = Likes {
        liked_pages: of(ItemKind::Like)
            .map(|i| Like {
                title: &i.name,
                page_id: &i.id,
                topic: &i.category,
                liked_at: i.date,
            })
            .collect(),
    };
    sink.file("activity/likes.json", &json(&likes)?)?;

    let mut follows = Vec::new();
    for i in of(ItemKind::Follow) {
        let line = serde_json::to_string(&Follow {
            account: &i.name,
            account_id: &i.id,
            followed_at: rfc3339(i.date),
        })
        .map_err(io::Error::other)?;
        follows.extend_from_slice(line.as_bytes());
        follows.push(b'\n');
    }
    sink.file("activity/follows.ndjson", &follows)?;

    let items: Vec<Membership> = of(ItemKind::Group)
        .map(|i| Membership {
            group: GroupRef {
                name: &i.name,
                gid: &i.id,
                category: &i.category,
            },
            joined: rfc3339(i.date),
        })
        .collect();
    let groups = Groups {
        memberships: Memberships {
            count: items.len(),
            items,
        },
    };
    sink.file("communities/groups.json", &json(&groups)?)?;

    let mut csv = csv::Writer::from_writer(Vec::new());
    csv.write_record(["event_name", "event_id", "category", "attended_on"])?;
    for i in of(ItemKind::Event) {
        csv.write_record([i.name.as_str(), &i.id, &i.category, &ymd(i.date)])?;
    }
    let bytes = csv
        .into_inner()
        .map_err(|e| io::Error::other(e.to_string()))?;
    sink.file("communities/events.csv", &bytes)?;

    for n in 1..=3 {
        sink.file(
            &format!("media/photos/IMG_{n:04}.jpg"),
            &media_bytes(n, 2048),
        )?;
    }
    Ok(())
}
