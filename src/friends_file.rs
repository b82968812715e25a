//! A user-supplied friends file: a CSV (comma, semicolon or tab separated, with a
//! header row) giving some friends' attributes that the archive does not show, e.g.
//! what the user knows is public on their profiles. Columns: `name` and/or `id`, and
//! one column per priors attribute, headed by its id or label (`location`,
//! `Political leaning` …), holding a value id or label. Rows are matched to the
//! archive's friends by id, then by name (name key); rows that match no one are added
//! as friends. Friends' names are used for matching only and never reach a report.

use std::path::Path;

use std::collections::HashMap;

use crate::footprint::{Footprint, Friend, Origin, Warning};
use crate::limits::{LimitName, Limits, human_bytes, thousands};
use crate::priors::Priors;
use crate::text::name_key;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error("{file}: cannot read the friends file: {cause}")]
    Read {
        file: String,
        /// Said in the message and not also given as `source()`, so a printed error
        /// chain says it once.
        cause: std::io::Error,
    },
    #[error("{file}: {message}")]
    Header { file: String, message: String },
    #[error("{file}: the friends file is {size}, over the limit of {limit} (friends-bytes: the size of a friends file); {hint}",
        size = human_bytes(*size), limit = human_bytes(*limit), hint = LimitName::FriendsBytes.raise_hint())]
    TooBig { file: String, size: u64, limit: u64 },
}

/// What merging a friends file did.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct FriendsFileSummary {
    pub rows: usize,
    /// Rows matched to a friend in the archive.
    pub matched: usize,
    /// Rows added as new friends.
    pub added: usize,
    /// Attribute ids read from the columns.
    pub attributes: Vec<String>,
}

/// Read a friends file and merge it into the footprint; row problems become warnings.
/// A file over the `friends-bytes` limit is refused before it is read.
pub fn merge_friends_file(
    footprint: &mut Footprint,
    path: &Path,
    priors: &Priors,
    limits: &Limits,
) -> Result<FriendsFileSummary, Error> {
    let file = path.display().to_string();
    let read_err = |source| Error::Read {
        file: file.clone(),
        cause: source,
    };
    let size = std::fs::metadata(path).map_err(read_err)?.len();
    if size > limits.friends_bytes {
        return Err(Error::TooBig {
            file,
            size,
            limit: limits.friends_bytes,
        });
    }
    let bytes = std::fs::read(path).map_err(read_err)?;
    let (text, _) = crate::records::decode_text(&bytes);
    merge_friends_csv(footprint, &text, &file, priors, limits)
}

/// A row matches the first friend whose id equals the row's when both have one,
/// else whose name key equals the row's. The friends are indexed by id, by name key,
/// and by name key among those without an id (the first of each wins, as a search
/// from the start would find), and the index follows the rows that add friends, so a
/// long file is merged in one pass rather than a search per row.
#[derive(Default)]
struct FriendIndex {
    by_id: HashMap<String, usize>,
    by_name: HashMap<String, usize>,
    by_name_no_id: HashMap<String, usize>,
}

impl FriendIndex {
    fn add(&mut self, f: &Friend, i: usize) {
        let key = name_key(&f.name);
        match &f.id {
            Some(id) => {
                self.by_id.entry(id.clone()).or_insert(i);
            }
            None => {
                self.by_name_no_id.entry(key.clone()).or_insert(i);
            }
        }
        self.by_name.entry(key).or_insert(i);
    }

    fn find(&self, id: Option<&str>, name: Option<&str>) -> Option<usize> {
        let key = name.map(name_key);
        match id {
            Some(id) => {
                let by_name = key.as_ref().and_then(|k| self.by_name_no_id.get(k));
                self.by_id.get(id).into_iter().chain(by_name).min().copied()
            }
            None => key.as_ref().and_then(|k| self.by_name.get(k)).copied(),
        }
    }
}

/// The delimiter of a header line: the most frequent of `,`, `;` and tab.
fn sniff_delimiter(header: &str) -> u8 {
    [b',', b';', b'\t']
        .into_iter()
        .max_by_key(|d| header.bytes().filter(|b| b == d).count())
        .unwrap_or(b',')
}

/// Merge friends CSV text (`file` names it in messages). Rows past the `friends-rows`
/// limit are not read, and a row with a field over the `name-bytes` limit is skipped,
/// each with a warning.
pub fn merge_friends_csv(
    footprint: &mut Footprint,
    text: &str,
    file: &str,
    priors: &Priors,
    limits: &Limits,
) -> Result<FriendsFileSummary, Error> {
    let header_line = text.lines().next().unwrap_or("");
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(sniff_delimiter(header_line))
        .flexible(true)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = reader
        .headers()
        .map_err(|e| Error::Header {
            file: file.into(),
            message: format!("cannot read the header row: {e}"),
        })?
        .iter()
        .map(|h| h.trim().to_string())
        .collect();
    let col = |names: &[&str]| {
        headers
            .iter()
            .position(|h| names.iter().any(|n| h.eq_ignore_ascii_case(n)))
    };
    let name_col = col(&["name", "friend", "full name"]);
    let id_col = col(&["id", "uid", "friend id"]);
    if name_col.is_none() && id_col.is_none() {
        return Err(Error::Header {
            file: file.into(),
            message: "needs a 'name' or an 'id' column to know who each row is".into(),
        });
    }
    let attr_cols: Vec<(usize, String)> = headers
        .iter()
        .enumerate()
        .filter_map(|(i, h)| {
            priors
                .attributes
                .iter()
                .find(|a| a.id.eq_ignore_ascii_case(h) || a.label.eq_ignore_ascii_case(h))
                .map(|a| (i, a.id.clone()))
        })
        .collect();
    if attr_cols.is_empty() {
        let ids: Vec<&str> = priors.attributes.iter().map(|a| a.id.as_str()).collect();
        return Err(Error::Header {
            file: file.into(),
            message: format!(
                "no column is headed by an attribute of the priors ({})",
                ids.join(", ")
            ),
        });
    }
    let mut summary = FriendsFileSummary {
        attributes: attr_cols.iter().map(|(_, a)| a.clone()).collect(),
        ..Default::default()
    };
    let mut index = FriendIndex::default();
    for (i, f) in footprint.friends.iter().enumerate() {
        index.add(f, i);
    }
    let max_field = usize::try_from(limits.name_bytes).unwrap_or(usize::MAX);
    let mut row = csv::StringRecord::new();
    let mut number = 0u64;
    loop {
        if number >= limits.friends_rows {
            if reader.read_record(&mut row).unwrap_or(false) {
                footprint.warnings.push(
                    Warning::new(format!(
                        "more than {} rows, over the limit (friends-rows: the {}); the rest are not read ({})",
                        thousands(limits.friends_rows),
                        LimitName::FriendsRows.describe(),
                        LimitName::FriendsRows.raise_hint()
                    ))
                    .in_file(file),
                );
            }
            break;
        }
        match reader.read_record(&mut row) {
            Ok(false) => break,
            Ok(true) => {}
            Err(e) => {
                footprint
                    .warnings
                    .push(Warning::new(format!("unreadable row: {e}; skipped")).in_file(file));
                continue;
            }
        }
        number += 1;
        summary.rows += 1;
        if let Some(c) = row.iter().position(|f| f.len() > max_field) {
            let column = headers.get(c).map_or("?", String::as_str);
            footprint.warnings.push(
                Warning::new(format!(
                    "field '{}' is {} bytes long, over the limit of {} (name-bytes); row skipped ({})",
                    crate::priors::short_name(column),
                    thousands(row.get(c).map_or(0, str::len) as u64),
                    human_bytes(limits.name_bytes),
                    LimitName::NameBytes.raise_hint()
                ))
                .in_file(file)
                .at_record(number as usize),
            );
            continue;
        }
        let get = |c: Option<usize>| {
            c.and_then(|i| row.get(i))
                .map(str::trim)
                .filter(|s| !s.is_empty())
                .map(str::to_string)
        };
        let (name, id) = (get(name_col), get(id_col));
        if name.is_none() && id.is_none() {
            footprint.warnings.push(
                Warning::new("row names no friend (no name or id); skipped")
                    .in_file(file)
                    .at_record(number as usize),
            );
            continue;
        }
        let found = index.find(id.as_deref(), name.as_deref());
        let index = match found {
            Some(i) => {
                summary.matched += 1;
                i
            }
            None => {
                summary.added += 1;
                footprint.friends.push(Friend {
                    name: name.clone().unwrap_or_default(),
                    id: id.clone(),
                    date: None,
                    attributes: Default::default(),
                    origin: Origin {
                        file: file.into(),
                        record: number as usize,
                    },
                });
                let i = footprint.friends.len() - 1;
                index.add(&footprint.friends[i], i);
                i
            }
        };
        for (c, attr) in &attr_cols {
            if let Some(v) = get(Some(*c)) {
                footprint.friends[index].attributes.insert(attr.clone(), v);
            }
        }
    }
    Ok(summary)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::footprint::Friend;

    fn priors() -> Priors {
        crate::scan::load_priors(None).unwrap()
    }

    fn friend(name: &str, id: Option<&str>) -> Friend {
        Friend {
            name: name.into(),
            id: id.map(str::to_string),
            date: None,
            attributes: Default::default(),
            origin: Origin {
                file: "friends.json".into(),
                record: 1,
            },
        }
    }

    #[test]
    fn rows_merge_by_id_then_name_and_new_rows_are_added() {
        let mut fp = Footprint::default();
        fp.friends.push(friend("Ada Quill", Some("u1")));
        fp.friends.push(friend("Bo Reyes", None));
        let csv = "name;id;Home location;politics;shoe size\n\
                   ;u1;Oregon;;\n\
                   bo reyes;;US-TX;left;44\n\
                   Cy New;;Vermont;;\n\
                   ;;Ohio;;\n";
        let s = merge_friends_csv(&mut fp, csv, "mine.csv", &priors(), &Limits::default()).unwrap();
        assert_eq!(s.rows, 4);
        assert_eq!((s.matched, s.added), (2, 1));
        assert_eq!(s.attributes, vec!["location", "politics"]);
        assert_eq!(fp.friends[0].attributes["location"], "Oregon");
        assert_eq!(fp.friends[1].attributes["politics"], "left");
        assert_eq!(fp.friends[2].attributes["location"], "Vermont");
        assert_eq!(fp.warnings.len(), 1);
        assert_eq!(fp.warnings[0].record, Some(4));
    }

    #[test]
    fn a_file_without_usable_columns_is_refused() {
        let mut fp = Footprint::default();
        let err = merge_friends_csv(
            &mut fp,
            "who,where\na,b\n",
            "x.csv",
            &priors(),
            &Limits::default(),
        );
        assert!(err.unwrap_err().to_string().contains("'name' or an 'id'"));
        let err = merge_friends_csv(
            &mut fp,
            "name,colour\na,b\n",
            "x.csv",
            &priors(),
            &Limits::default(),
        );
        assert!(err.unwrap_err().to_string().contains("no column"));
    }

    #[test]
    fn rows_and_fields_over_the_limits_are_warned_about() {
        let mut fp = Footprint::default();
        let long = "z".repeat(40);
        let csv = format!("name,politics\nAda,left\n{long},right\nBo,left\nCy,right\n");
        let small = Limits {
            name_bytes: 30,
            friends_rows: 3,
            ..Limits::default()
        };
        let s = merge_friends_csv(&mut fp, &csv, "mine.csv", &priors(), &small).unwrap();
        assert_eq!((s.rows, s.added), (3, 2));
        let w: Vec<String> = fp.warnings.iter().map(|w| w.to_string()).collect();
        assert!(
            w[0].contains("mine.csv")
                && w[0].contains("field 'name' is 40 bytes long, over the limit of 30 bytes (name-bytes); row skipped"),
            "{w:?}"
        );
        assert!(
            w[1].contains("more than 3 rows, over the limit (friends-rows")
                && w[1].contains("--limit friends-rows=N"),
            "{w:?}"
        );
    }

    /// Many rows against many friends merge in one pass (an index, not a search per
    /// row), and each row still finds the first friend a search would.
    #[test]
    fn a_long_file_merges_by_index() {
        let mut fp = Footprint::default();
        fp.friends.push(friend("Same Name", Some("u1")));
        fp.friends.push(friend("Same Name", None));
        for i in 0..50_000 {
            fp.friends
                .push(friend(&format!("Friend {i}"), Some(&format!("f{i}"))));
        }
        let mut csv = String::from("name,id,politics\n");
        for i in 0..50_000 {
            csv.push_str(&format!("Friend {i},f{i},left\n"));
        }
        // With an id that matches no one, a row falls back to a friend without an id
        // of that name; without an id, to the first friend of that name.
        csv.push_str("Same Name,u9,right\nsame name,,left\n");
        let s = merge_friends_csv(&mut fp, &csv, "big.csv", &priors(), &Limits::default()).unwrap();
        assert_eq!((s.matched, s.added), (50_002, 0));
        assert_eq!(fp.friends[1].attributes["politics"], "right");
        assert_eq!(fp.friends[0].attributes["politics"], "left");
        assert_eq!(fp.friends[49_999].attributes["politics"], "left");
    }
}
