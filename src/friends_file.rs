//! A user-supplied friends file: a CSV (comma, semicolon or tab separated, with a
//! header row) giving some friends' attributes that the archive does not show, e.g.
//! what the user knows is public on their profiles. Columns: `name` and/or `id`, and
//! one column per priors attribute, headed by its id or label (`location`,
//! `Political leaning` …), holding a value id or label. Rows are matched to the
//! archive's friends by id, then by name (name key); rows that match no one are added
//! as friends. Friends' names are used for matching only and never reach a report.

use std::path::Path;

use crate::footprint::{Footprint, Friend, Origin, Warning};
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
pub fn merge_friends_file(
    footprint: &mut Footprint,
    path: &Path,
    priors: &Priors,
) -> Result<FriendsFileSummary, Error> {
    let file = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|source| Error::Read {
        file: file.clone(),
        cause: source,
    })?;
    let (text, _) = crate::records::decode_text(&bytes);
    merge_friends_csv(footprint, &text, &file, priors)
}

/// The delimiter of a header line: the most frequent of `,`, `;` and tab.
fn sniff_delimiter(header: &str) -> u8 {
    [b',', b';', b'\t']
        .into_iter()
        .max_by_key(|d| header.bytes().filter(|b| b == d).count())
        .unwrap_or(b',')
}

/// Merge friends CSV text (`file` names it in messages).
pub fn merge_friends_csv(
    footprint: &mut Footprint,
    text: &str,
    file: &str,
    priors: &Priors,
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
    let mut row = csv::StringRecord::new();
    let mut number = 0;
    loop {
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
                    .at_record(number),
            );
            continue;
        }
        let found = footprint.friends.iter().position(|f| match (&id, &f.id) {
            (Some(a), Some(b)) => a == b,
            _ => name
                .as_ref()
                .is_some_and(|n| name_key(n) == name_key(&f.name)),
        });
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
                        record: number,
                    },
                });
                footprint.friends.len() - 1
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
        let s = merge_friends_csv(&mut fp, csv, "mine.csv", &priors()).unwrap();
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
        let err = merge_friends_csv(&mut fp, "who,where\na,b\n", "x.csv", &priors());
        assert!(err.unwrap_err().to_string().contains("'name' or an 'id'"));
        let err = merge_friends_csv(&mut fp, "name,colour\na,b\n", "x.csv", &priors());
        assert!(err.unwrap_err().to_string().contains("no column"));
    }
}
