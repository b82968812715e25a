//! Naming subjects on the command line: an item by its archive id, its exact name
//! (case-insensitive) or its key ([`Item::key`]); the friend list by "friends" or
//! "friend-list". An unknown name is an error that lists the nearest names.

use crate::evidence::Subject;
use crate::footprint::{Footprint, Item};

/// An item name that matched nothing (or several things).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SelectError {
    #[error("no item is called '{given}'{}", near_list(.near))]
    Unknown { given: String, near: Vec<String> },
    #[error("'{given}' names {count} items; use an id or key instead: {}", .keys.join(", "))]
    Ambiguous {
        given: String,
        count: usize,
        keys: Vec<String>,
    },
}

fn near_list(near: &[String]) -> String {
    if near.is_empty() {
        String::new()
    } else {
        format!("; nearest: {}", near.join(", "))
    }
}

/// Find the subject a user's word names.
pub fn find_subject(footprint: &Footprint, given: &str) -> Result<Subject, SelectError> {
    let g = given.trim();
    if ["friends", "friend-list", "friend list", "friendlist"]
        .iter()
        .any(|w| w.eq_ignore_ascii_case(g))
    {
        return Ok(Subject::FriendList);
    }
    let by = |f: &dyn Fn(&Item) -> bool| -> Vec<usize> {
        footprint
            .items
            .iter()
            .enumerate()
            .filter(|(_, it)| f(it))
            .map(|(i, _)| i)
            .collect()
    };
    for found in [
        by(&|it| it.key() == g),
        by(&|it| it.id.as_deref() == Some(g)),
        by(&|it| it.name.eq_ignore_ascii_case(g)),
    ] {
        match found.len() {
            0 => continue,
            1 => return Ok(Subject::Item(found[0])),
            count => {
                return Err(SelectError::Ambiguous {
                    given: g.to_string(),
                    count,
                    keys: found.iter().map(|&i| footprint.items[i].key()).collect(),
                });
            }
        }
    }
    Err(SelectError::Unknown {
        given: g.to_string(),
        near: nearest(footprint, g, 5),
    })
}

/// Up to `n` item names closest to `given` (edit distance on lower-cased text, names
/// containing it first).
pub fn nearest(footprint: &Footprint, given: &str, n: usize) -> Vec<String> {
    let g = given.to_lowercase();
    let mut scored: Vec<(usize, &str)> = footprint
        .items
        .iter()
        .map(|it| {
            let name = it.name.to_lowercase();
            let d = if !g.is_empty() && name.contains(&g) {
                0
            } else {
                edit_distance(&g, &name)
            };
            (d, &*it.name)
        })
        .collect();
    scored.sort();
    scored.dedup_by(|a, b| a.1 == b.1);
    let limit = (g.chars().count() / 2).max(3);
    scored
        .into_iter()
        .filter(|(d, _)| *d <= limit)
        .take(n)
        .map(|(_, s)| s.to_string())
        .collect()
}

/// Levenshtein distance over characters.
fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for (i, ca) in a.iter().enumerate() {
        cur[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != cb);
            cur[j + 1] = sub.min(prev[j + 1] + 1).min(cur[j] + 1);
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::footprint::{ItemKind, Origin};

    fn item(name: &str, id: Option<&str>) -> Item {
        Item {
            kind: ItemKind::Group,
            name: name.into(),
            id: id.map(Into::into),
            category: None,
            date: None,
            origin: Origin {
                file: "f".into(),
                record: 1,
            },
        }
    }

    #[test]
    fn finds_by_id_name_key_and_suggests() {
        let fp = Footprint {
            items: vec![
                item("Harbour Rowing Club", Some("g1")),
                item("Night Owls", None),
            ],
            ..Footprint::default()
        };
        assert_eq!(find_subject(&fp, "g1"), Ok(Subject::Item(0)));
        assert_eq!(find_subject(&fp, "night owls"), Ok(Subject::Item(1)));
        assert_eq!(
            find_subject(&fp, "group:name:night owls"),
            Ok(Subject::Item(1))
        );
        assert_eq!(find_subject(&fp, "Friends"), Ok(Subject::FriendList));
        match find_subject(&fp, "Harbor Rowing Club") {
            Err(SelectError::Unknown { near, .. }) => {
                assert_eq!(near, vec!["Harbour Rowing Club".to_string()])
            }
            other => panic!("{other:?}"),
        }
        // Levenshtein("kitten", "sitting") = 3 (the textbook example).
        assert_eq!(edit_distance("kitten", "sitting"), 3);
    }
}
