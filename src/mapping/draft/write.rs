//! Writing a draft as commented TOML: a header saying what the draft is and how to try
//! it, then one `[[source]]` table per guessed source with the records found and the
//! reasons for its kind, a note beside every field, and at the end what was left out.
//! Sources whose kind nothing pointed to are written commented out, for the user to
//! decide. The text always parses as a mapping when at least one source was guessed.

use super::assemble::{Draft, DraftSource};
use super::inspect::{FieldProfile, RecordSet};
use super::paths::{field_path, records_path};
use crate::mapping::{Format, MAPPING_FILE_NAME, SourceKind};
use crate::reading::count;

/// Comment lines are wrapped at this width.
const WIDTH: usize = 88;

fn toml_string(s: &str) -> String {
    toml::Value::String(s.to_string()).to_string()
}

/// Append `text` as comment lines, wrapped at [`WIDTH`]; continuation lines are
/// indented by `indent` more spaces.
fn comment(o: &mut String, text: &str, indent: usize) {
    let mut line = String::from("#");
    let mut empty = true;
    for word in text.split_whitespace() {
        if !empty && line.chars().count() + 1 + word.chars().count() > WIDTH {
            o.push_str(&line);
            o.push('\n');
            line = format!("#{}", " ".repeat(indent));
        }
        line.push(' ');
        line.push_str(word);
        empty = false;
    }
    o.push_str(&line);
    o.push('\n');
}

fn field_ref(set: &RecordSet, f: &FieldProfile) -> String {
    match set.format {
        Format::Csv => f.keys.join("."),
        Format::Json | Format::Ndjson => field_path(&f.keys),
    }
}

fn field_note(f: &FieldProfile, records: usize, role: &str) -> String {
    match role {
        "name" => format!(
            "text in {} of {records} records, {} different",
            f.present,
            f.distinct()
        ),
        "id" => format!("different in every record ({} values)", f.distinct()),
        "category" => {
            let mut top: Vec<(&String, &usize)> = f.values.iter().collect();
            top.sort_by(|a, b| b.1.cmp(a.1).then(a.0.cmp(b.0)));
            let shown: Vec<String> = top
                .iter()
                .take(3)
                .map(|(v, _)| format!("'{}'", clip(v, 24)))
                .collect();
            format!(
                "{} different values, e.g. {}",
                f.distinct(),
                shown.join(", ")
            )
        }
        "date" => format!("reads as a date in {} of {records} records", f.dates),
        _ => String::new(),
    }
}

fn clip(s: &str, n: usize) -> String {
    if s.chars().count() <= n {
        s.to_string()
    } else {
        format!("{}…", s.chars().take(n).collect::<String>())
    }
}

impl Draft {
    /// Problems met while inspecting, one line each naming the file: data files that
    /// could not be read or parsed, entries left out while listing.
    pub fn warnings(&self) -> Vec<String> {
        let mut out: Vec<String> = self
            .inspection
            .unreadable
            .iter()
            .map(|(file, why)| format!("{file}: {why}"))
            .collect();
        out.extend(
            self.inspection
                .skipped
                .iter()
                .map(|s| format!("{s}; left out")),
        );
        out
    }

    /// Data files read while inspecting.
    pub fn data_files(&self) -> usize {
        self.inspection.data_files
    }

    /// The draft as TOML, with comments.
    pub fn to_toml(&self) -> String {
        let mut o = String::new();
        comment(
            &mut o,
            &format!(
                "DRAFT mapping for {}, written by `telltale mapping draft` from the \
                 archive's structure alone: file and folder names, the shape of the \
                 records and their values. Every setting is a guess. Check each source \
                 against the files (docs/mapping.md explains every setting), then see \
                 what it finds with:",
                self.archive
            ),
            0,
        );
        o.push_str(&format!(
            "#   telltale mapping check {} --mapping THIS-FILE\n",
            self.path.display()
        ));
        let save_as = crate::mapping::beside_mapping(&self.path)
            .map(|p| format!("as {} (beside the archive, with its name)", p.display()))
            .unwrap_or_else(|| "beside the archive".into());
        comment(
            &mut o,
            &format!(
                "Once it is right, save it {save_as} or as {MAPPING_FILE_NAME} inside or \
                 beside the archive: telltale then finds it without --mapping."
            ),
            0,
        );
        if let Some(top) = &self.top_folder {
            comment(
                &mut o,
                &format!(
                    "Every file sits in the folder '{top}', written `*` below so the \
                     mapping also fits an archive of this layout whose top folder has \
                     another name."
                ),
                0,
            );
        }
        o.push_str("format = 1\n");
        o.push_str(&format!(
            "label = {}\n",
            toml_string(&format!("Draft for {}", self.archive))
        ));
        if self.guessed().next().is_none() {
            o.push('\n');
            if self.undecided().next().is_some() {
                comment(
                    &mut o,
                    "No kind could be guessed, so this file is not a usable mapping yet: a \
                     mapping needs at least one [[source]]. Decide the kind of the \
                     commented-out sources below.",
                    0,
                );
            } else {
                comment(
                    &mut o,
                    "No set of records with names was found, so this file is not a usable \
                     mapping yet: a mapping needs at least one [[source]]. Write one by \
                     hand (docs/mapping.md), for example:",
                    0,
                );
                o.push_str(
                    "#   [[source]]\n#   kind = \"like\"\n#   files = [\"folder/file.json\"]\n\
                     #   records = \"$.list[*]\"\n#   name = \"$.title\"\n",
                );
            }
        }
        for s in self.guessed() {
            o.push('\n');
            write_source(&mut o, s);
        }
        let undecided: Vec<&DraftSource> = self.undecided().collect();
        if !undecided.is_empty() {
            o.push('\n');
            comment(
                &mut o,
                "LEFT FOR YOU TO DECIDE: nothing in the names below says what these \
                 records are. If one holds your likes, groups, follows, events or \
                 friends, remove the leading '# ' from its lines and set its kind.",
                0,
            );
            for s in undecided {
                o.push('\n');
                let mut block = String::new();
                write_source(&mut block, s);
                for line in block.lines() {
                    if line.starts_with('#') {
                        o.push_str(line);
                    } else {
                        o.push_str("# ");
                        o.push_str(line);
                    }
                    o.push('\n');
                }
            }
        }
        if !self.unused.is_empty() {
            o.push('\n');
            comment(&mut o, "Records found but not drafted as sources:", 0);
            for (place, why) in &self.unused {
                comment(&mut o, &format!("- {place}: {why}"), 2);
            }
        }
        let other = &self.inspection.other_files;
        if !other.is_empty() {
            o.push('\n');
            let shown: Vec<&str> = other.iter().take(3).map(String::as_str).collect();
            let more = if other.len() > shown.len() {
                ", …"
            } else {
                ""
            };
            comment(
                &mut o,
                &format!(
                    "{} not read (not JSON, NDJSON or CSV): {}{more}",
                    count(other.len(), "file", "files"),
                    shown.join(", ")
                ),
                2,
            );
        }
        for w in self.warnings() {
            comment(&mut o, &format!("Could not use {w}"), 2);
        }
        o
    }
}

fn write_source(o: &mut String, s: &DraftSource) {
    let set = &s.set;
    let found = if set.single {
        "one object".to_string()
    } else {
        let sampled = if set.profiled < set.records {
            format!(" (fields judged on the first {})", set.profiled)
        } else if s.paths.len() > 1 {
            " (the field notes are from the first file)".to_string()
        } else {
            String::new()
        };
        format!("{}{sampled}", count(s.records, "record", "records"))
    };
    // The files themselves (the globs may hide a top folder or stand for several).
    let files = if s.paths.len() == 1 {
        s.paths[0].clone()
    } else {
        format!(
            "{} files like {}",
            s.paths.len(),
            s.paths.first().map(String::as_str).unwrap_or("")
        )
    };
    let place = match &set.steps {
        Some(steps) if !set.single => format!(" under {}", records_path(steps)),
        Some(steps) => format!(" at {}", records_path(steps)),
        None => String::new(),
    };
    comment(o, &format!("{files}: {found}{place}."), 2);
    if s.kind.sure {
        comment(
            o,
            &format!(
                "Kind: {}, guessed from {}.",
                s.kind.kind,
                s.kind.reasons.join("; ")
            ),
            2,
        );
    } else {
        comment(
            o,
            "Kind: yours to choose (like, group, follow, event or friend); `like` is \
             only a placeholder.",
            2,
        );
    }
    match s.kind.kind {
        SourceKind::Friend => comment(
            o,
            "Check: these should be people you are connected to; their names are never \
             put in reports.",
            2,
        ),
        SourceKind::SelfDeclared => comment(
            o,
            "Check: this should be your own statement of who you are; it stays on this \
             computer and lets telltale compare its guesses with the truth.",
            2,
        ),
        SourceKind::Item(_) => {}
    }
    o.push_str("[[source]]\n");
    o.push_str(&format!("kind = {}\n", toml_string(s.kind.kind.as_str())));
    let files: Vec<String> = s.files.iter().map(|f| toml_string(f)).collect();
    o.push_str(&format!("files = [{}]\n", files.join(", ")));
    o.push_str(&format!("format = {}\n", toml_string(set.format.as_str())));
    if set.format == Format::Csv && set.delimiter != b',' {
        let d = if set.delimiter == b'\t' {
            "\\t".to_string()
        } else {
            (set.delimiter as char).to_string()
        };
        // A basic string, so that "\t" is a tab.
        o.push_str(&format!("delimiter = \"{d}\"\n"));
    }
    if let Some(steps) = &set.steps {
        o.push_str(&format!(
            "records = {}\n",
            toml_string(&records_path(steps))
        ));
    }
    let roles = [
        ("name", s.roles.name),
        ("id", s.roles.id),
        ("category", s.roles.category),
        ("date", s.roles.date),
    ];
    for (role, field) in roles {
        if let Some(i) = field {
            let f = &set.fields[i];
            o.push_str(&format!(
                "{role} = {}   # {}\n",
                toml_string(&field_ref(set, f)),
                field_note(f, set.profiled, role)
            ));
        }
    }
    if matches!(s.kind.kind, SourceKind::Item(_) | SourceKind::Friend) && s.roles.id.is_none() {
        o.push_str("# id: no field differs in every record; names are matched instead\n");
    }
    if matches!(s.kind.kind, SourceKind::Item(_) | SourceKind::Friend) && s.roles.date.is_none() {
        o.push_str("# date: no field reads as dates (Unix seconds, RFC 3339 or YYYY-MM-DD)\n");
    }
    if set.fields.iter().any(|f| f.mojibake > 0) {
        o.push_str("repair = \"latin1-mojibake\"   # some text looks like UTF-8 read as Latin-1\n");
    }
    if !s.roles.attributes.is_empty() {
        o.push_str("[source.attributes]   # fields holding values the priors know; check each\n");
        for (attr, i) in &s.roles.attributes {
            let f = &set.fields[*i];
            o.push_str(&format!(
                "{} = {}   # in {} of {}\n",
                attr,
                toml_string(&field_ref(set, f)),
                f.present,
                count(set.profiled, "record", "records")
            ));
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn comments_wrap_at_the_width_and_keep_every_word() {
        let text = "word ".repeat(40);
        let mut o = String::new();
        comment(&mut o, &text, 2);
        assert!(o.lines().count() > 1);
        for line in o.lines() {
            assert!(line.chars().count() <= WIDTH, "{line}");
            assert!(line.starts_with('#'));
        }
        assert_eq!(o.matches("word").count(), 40);
        assert!(o.lines().nth(1).is_some_and(|l| l.starts_with("#   word")));
    }
}
