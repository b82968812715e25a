//! Layout B, a second archive layout invented for the demo, shaped differently from A:
//! one top folder, a semicolon CSV whose text was damaged by a Latin-1 round trip, a
//! JSON file with typed sections (selected with a JSONPath filter), and friends in CSV.
//! Read by demo-exports/student.mapping.toml.

use std::io;

use serde::Serialize;

use super::layout_a::{NOTE, json, media_bytes, rfc3339, ymd};
use super::personas::PersonaArchive;
use super::sink::ArchiveSink;
use super::world::{AGE, LOCATION, POLITICS, RELIGION, value_id, value_label};
use crate::footprint::ItemKind;

/// The mapping file for layout B.
pub const MAPPING: &str = include_str!("../../demo-exports/student.mapping.toml");

/// UTF-8 text as an exporter that decoded it as Latin-1 would write it.
pub fn mojibake(s: &str) -> String {
    s.bytes().map(char::from).collect()
}

#[derive(Serialize)]
struct Meta<'a> {
    title: &'a str,
    #[serde(rename = "ref")]
    reference: &'a str,
}

#[derive(Serialize)]
struct Entry<'a> {
    meta: Meta<'a>,
    ts: i64,
}

#[derive(Serialize)]
struct Section<'a> {
    #[serde(rename = "type")]
    kind: &'a str,
    entries: Vec<Entry<'a>>,
}

#[derive(Serialize)]
struct Export<'a> {
    version: u32,
    generated: &'a str,
    note: &'a str,
    sections: Vec<Section<'a>>,
}

#[derive(Serialize)]
struct ExportFile<'a> {
    export: Export<'a>,
}

#[derive(Serialize)]
struct Account<'a> {
    display: &'a str,
    handle: String,
    since: String,
}

#[derive(Serialize)]
struct Accounts<'a> {
    accounts: Vec<Account<'a>>,
}

#[derive(Serialize)]
struct Following<'a> {
    following: Accounts<'a>,
}

#[derive(Serialize)]
struct About<'a> {
    age: &'a str,
    state: &'a str,
    politics: &'a str,
    religion: &'a str,
}

#[derive(Serialize)]
struct Declared<'a> {
    about: About<'a>,
}

fn handle(name: &str) -> String {
    let slug: String = name
        .chars()
        .filter(|c| c.is_alphanumeric())
        .flat_map(char::to_lowercase)
        .collect();
    format!("@{slug}")
}

/// Write a persona's archive in layout B (all under `export/`).
pub fn write(p: &PersonaArchive, sink: &mut dyn ArchiveSink) -> io::Result<()> {
    let of = |k: ItemKind| p.items.iter().filter(move |i| i.kind == k);
    sink.file(
        "export/ABOUT.txt",
        format!(
            "Lanternwick data export (layout B)\n\n{NOTE}\n\nPersona: {}, {}.\n",
            p.spec.name, p.spec.role
        )
        .as_bytes(),
    )?;

    let mut csv = csv::WriterBuilder::new()
        .delimiter(b';')
        .from_writer(Vec::new());
    csv.write_record(["Liked item", "Kind", "Date"])?;
    for i in of(ItemKind::Like) {
        csv.write_record([mojibake(&i.name).as_str(), "Page", &i.date.to_string()])?;
    }
    sink.file(
        "export/Likes.csv",
        &csv.into_inner()
            .map_err(|e| io::Error::other(e.to_string()))?,
    )?;

    let section = |kind: &'static str, k: ItemKind| Section {
        kind,
        entries: of(k)
            .map(|i| Entry {
                meta: Meta {
                    title: &i.name,
                    reference: &i.id,
                },
                ts: i.date,
            })
            .collect(),
    };
    let export = ExportFile {
        export: Export {
            version: 2,
            generated: "2026-11-30",
            note: NOTE,
            sections: vec![
                section("groups", ItemKind::Group),
                section("events", ItemKind::Event),
            ],
        },
    };
    sink.file("export/data/social/groups_export.json", &json(&export)?)?;

    let following = Following {
        following: Accounts {
            accounts: of(ItemKind::Follow)
                .map(|i| Account {
                    display: &i.name,
                    handle: handle(&i.name),
                    since: ymd(i.date),
                })
                .collect(),
        },
    };
    sink.file("export/data/social/follows.json", &json(&following)?)?;

    let mut csv = csv::Writer::from_writer(Vec::new());
    csv.write_record([
        "Full name",
        "Connected on",
        "Home state",
        "Age group",
        "Faith",
        "Leaning",
    ])?;
    for f in &p.friends {
        let get = |a: usize| {
            f.public
                .iter()
                .find(|x| x.0 == a)
                .map(|x| value_label(a, x.1))
                .unwrap_or("")
        };
        csv.write_record([
            f.name.as_str(),
            &rfc3339(f.since),
            get(LOCATION),
            get(AGE),
            get(RELIGION),
            get(POLITICS),
        ])?;
    }
    sink.file(
        "export/people.csv",
        &csv.into_inner()
            .map_err(|e| io::Error::other(e.to_string()))?,
    )?;

    sink.file(
        "export/me/declared.json",
        &json(&Declared {
            about: About {
                age: value_id(AGE, p.profile[AGE]),
                state: value_id(LOCATION, p.profile[LOCATION]),
                politics: value_id(POLITICS, p.profile[POLITICS]),
                religion: value_id(RELIGION, p.profile[RELIGION]),
            },
        })?,
    )?;
    sink.file("export/media/clip_0001.mp4", &media_bytes(9, 4096))?;
    Ok(())
}
