//! Import: run a mapping over an archive and collect the person's footprint. Only the
//! entries some source matches are read. A file that cannot be read, or a record that
//! lacks a field, becomes a warning naming the file, record and field; the rest of the
//! import goes on. Breaking a reading limit stops the import with an error that names
//! the limit and how to raise it. A JSON file one source reads with a records query
//! like `$.likes[*]` is cut at its records as it is inflated (records/split.rs) and
//! never held whole; what its records do is staged (import/sink.rs) and kept only if
//! all of the file was as expected, otherwise the file is read again whole, so the
//! footprint, warnings and fingerprint are the same either way.

use std::sync::Arc;
use std::sync::mpsc::Receiver;

use sha2::{Digest, Sha256};

use crate::archive::{self, Archive, CHUNK, ReadBudget};
use crate::footprint::{Footprint, Warning};
use crate::limits::{LimitName, Limits};
use crate::mapping::{Mapping, Source};
use crate::records::{
    Record, RecordSink, SplitPlan, decode_text, read_records, records_found_nothing, split_records,
};

mod sink;

use sink::{Effects, SourceSink, Staged, State};

/// Pieces an entry being split may be read ahead by (1 MiB of the usual pieces).
const PIECES_IN_FLIGHT: usize = 16;

/// What the reading thread hands over of an entry being split: its pieces, then how
/// its read ended (its size, or why it failed). Entries read whole go through a
/// channel of their own.
enum Handover {
    Piece(Vec<u8>),
    End(Result<u64, archive::Error>),
}

/// What became of a split entry, told back to the reading thread.
enum Verdict {
    Taken,
    Again,
}

/// How an import reads (the defaults are what every caller wants; tests compare).
#[derive(Debug, Clone, Copy)]
pub struct Options {
    /// Cut JSON files at their records as they are read, when the mapping allows.
    pub split: bool,
    /// Size of the pieces a split entry is read in.
    pub piece: usize,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            split: true,
            piece: CHUNK,
        }
    }
}

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error(transparent)]
    Archive(#[from] archive::Error),
    #[error(
        "{archive}: more than {limit} records (raise it with --limit records=N if the archive is trusted)"
    )]
    TooManyRecords { archive: String, limit: u64 },
}

/// Import an archive through a mapping.
pub fn import(
    archive: &mut Archive,
    mapping: &Mapping,
    limits: &Limits,
) -> Result<Footprint, Error> {
    import_with_progress(archive, mapping, limits, &mut |_, _| {})
}

/// As [`import`], telling `progress(done, total)` in declared bytes of the mapped
/// entries after each one is read (for a progress bar on long imports).
pub fn import_with_progress(
    archive: &mut Archive,
    mapping: &Mapping,
    limits: &Limits,
    progress: &mut dyn FnMut(u64, u64),
) -> Result<Footprint, Error> {
    import_with_options(archive, mapping, limits, progress, Options::default())
}

/// As [`import_with_progress`], reading as `options` says. The footprint, warnings and
/// fingerprint are the same whatever the options.
pub fn import_with_options(
    archive: &mut Archive,
    mapping: &Mapping,
    limits: &Limits,
    progress: &mut dyn FnMut(u64, u64),
    options: Options,
) -> Result<Footprint, Error> {
    let mut budget = ReadBudget::new(limits);
    let mut state = State::new(limits.records);
    if archive.entries().is_empty() {
        state.footprint.warnings.push(Warning::new(format!(
            "{}: the archive holds no files",
            archive.display_name()
        )));
    }
    for skipped in archive.skipped() {
        state
            .footprint
            .warnings
            .push(Warning::new(format!("{skipped}; left out")));
    }

    // Which entries each source reads, in archive order.
    let entries = archive.entries().to_vec();
    let mut wanted: Vec<(usize, Vec<usize>)> = Vec::new(); // entry index → sources
    for (s_idx, source) in mapping.sources.iter().enumerate() {
        let mut any = false;
        for (e_idx, entry) in entries.iter().enumerate() {
            if source.matches(&entry.path) {
                any = true;
                match wanted.iter_mut().find(|(e, _)| *e == e_idx) {
                    Some((_, list)) => list.push(s_idx),
                    None => wanted.push((e_idx, vec![s_idx])),
                }
            }
        }
        if !any {
            state.footprint.warnings.push(
                Warning::new(format!(
                    "{} matched no file in the archive (files = {:?})",
                    source.label, source.patterns
                ))
                .in_file(&mapping.origin),
            );
        }
    }
    wanted.sort_by_key(|(e, _)| entries[*e].path.clone());

    let total: u64 = wanted.iter().map(|(e, _)| entries[*e].size).sum();
    let mut done = 0u64;
    progress(done, total);
    let archive_name = archive.display_name();
    let too_many = || Error::TooManyRecords {
        archive: archive_name.clone(),
        limit: limits.get(LimitName::Records),
    };
    // Which entries are cut at their records as they are read: those one JSON source
    // reads with a plain records query ending in `[*]`.
    let plans: Vec<Option<SplitPlan>> = wanted
        .iter()
        .map(|(_, sources)| match sources.as_slice() {
            [s] if options.split => SplitPlan::for_source(&mapping.sources[*s]),
            _ => None,
        })
        .collect();
    // The entries are read (and inflated) on a second thread while this one parses.
    // An entry that is split comes in pieces through a bounded channel and is never
    // held whole; any other entry is handed over whole through a rendezvous channel,
    // so at most two are held at once. After a split entry the reading thread
    // waits to hear whether it was taken, or must be read again whole (something in
    // it was not as expected: the whole-file reader then says what).
    let digest = std::thread::scope(|scope| -> Result<_, Error> {
        let (send, received) = std::sync::mpsc::sync_channel(PIECES_IN_FLIGHT);
        let (send_whole, received_whole) = std::sync::mpsc::sync_channel(0);
        let (tell, verdicts) = std::sync::mpsc::channel();
        let (wanted, entries, plans) = (&wanted, &entries, &plans);
        // The reading thread also takes the fingerprint, which covers the path and
        // bytes of every entry read, in order.
        let reader = scope.spawn(move || {
            let mut hasher = Sha256::new();
            for ((e_idx, _), plan) in wanted.iter().zip(plans) {
                let entry = &entries[*e_idx];
                if plan.is_some() {
                    let (hashed, budgeted) = (hasher.clone(), budget.clone());
                    hasher.update(entry.path.as_bytes());
                    hasher.update([0]);
                    let mut gone = false;
                    let read = archive.stream(entry, &mut budget, options.piece, &mut |piece| {
                        hasher.update(piece);
                        gone = send.send(Handover::Piece(piece.to_vec())).is_err();
                        !gone
                    });
                    if gone {
                        break;
                    }
                    match &read {
                        Ok(_) => hasher.update([0]),
                        Err(_) => hasher = hashed.clone(),
                    }
                    let stop = matches!(read, Err(archive::Error::Limit { .. }));
                    if send.send(Handover::End(read)).is_err() || stop {
                        break;
                    }
                    match verdicts.recv() {
                        Ok(Verdict::Taken) => continue,
                        Ok(Verdict::Again) => (hasher, budget) = (hashed, budgeted),
                        Err(_) => break,
                    }
                }
                let read = archive.read(entry, &mut budget);
                if let Ok(bytes) = &read {
                    hasher.update(entry.path.as_bytes());
                    hasher.update([0]);
                    hasher.update(bytes);
                    hasher.update([0]);
                }
                let stop = matches!(read, Err(archive::Error::Limit { .. }));
                if send_whole.send(read).is_err() || stop {
                    break;
                }
            }
            hasher
        });
        for ((e_idx, sources), plan) in wanted.iter().zip(plans) {
            let entry = &entries[*e_idx];
            done += entry.size;
            // One shared path for every record of the entry.
            let path: Arc<str> = entry.path.as_str().into();
            if let Some(plan) = plan {
                let source = &mapping.sources[sources[0]];
                match take_split(&mut state, &received, plan, source, &path, limits) {
                    Taken::Lost => break,
                    Taken::Failed(e) => return Err(e.into()),
                    Taken::Whole => {
                        if tell.send(Verdict::Again).is_err() {
                            break;
                        }
                    }
                    Taken::Split(staged, split) => {
                        if tell.send(Verdict::Taken).is_err() {
                            break;
                        }
                        state.footprint.stats.files_read += 1;
                        state.footprint.stats.bytes_read += split.bytes;
                        staged.replay(&mut state);
                        if split.records == 0
                            && let Some(query) = &source.records
                        {
                            state.warn(records_found_nothing(&entry.path, query));
                        }
                        if state.over_limit {
                            return Err(too_many());
                        }
                        progress(done, total);
                        continue;
                    }
                }
            }
            let Ok(read) = received_whole.recv() else {
                break;
            };
            let bytes = match read {
                Ok(b) => b,
                Err(e @ archive::Error::Limit { .. }) => return Err(e.into()),
                Err(e) => {
                    let text = e.to_string();
                    let prefix = format!("{}: ", entry.path);
                    let text = text.strip_prefix(&prefix).unwrap_or(&text);
                    state
                        .footprint
                        .warnings
                        .push(Warning::new(format!("{text}; file skipped")).in_file(&entry.path));
                    continue;
                }
            };
            state.footprint.stats.files_read += 1;
            state.footprint.stats.bytes_read += bytes.len() as u64;
            let (text, bad) = decode_text(&bytes);
            if bad > 0 {
                state.footprint.warnings.push(
                    Warning::new(format!(
                        "not valid UTF-8 text: {} replaced with �",
                        crate::reading::count(
                            bad,
                            "invalid byte sequence",
                            "invalid byte sequences"
                        )
                    ))
                    .in_file(&entry.path),
                );
            }
            for s_idx in sources {
                let source = &mapping.sources[*s_idx];
                let mut sink = SourceSink {
                    state: &mut state,
                    source,
                    file: &path,
                };
                if let Err(w) = read_records(&text, &entry.path, source, limits, &mut sink) {
                    state.footprint.warnings.push(w);
                }
                if state.over_limit {
                    return Err(too_many());
                }
            }
            progress(done, total);
        }
        drop(tell);
        let hasher = reader
            .join()
            .unwrap_or_else(|e| std::panic::resume_unwind(e));
        Ok(hasher.finalize())
    })?;
    state.footprint.fingerprint = digest[..16].iter().map(|b| format!("{b:02x}")).collect();
    Ok(state.finish())
}

/// What a split entry gave.
struct SplitEntry {
    records: usize,
    bytes: u64,
}

enum Taken {
    /// Read and split: what its records do, not done yet.
    Split(Staged, SplitEntry),
    /// To be read again whole.
    Whole,
    /// A reading limit stopped it (the import stops).
    Failed(archive::Error),
    /// The reading thread stopped.
    Lost,
}

/// Take one entry's pieces and cut it at its records, staging what they do. Every
/// piece of the entry is taken, whatever happens.
fn take_split(
    state: &mut State,
    received: &Receiver<Handover>,
    plan: &SplitPlan,
    source: &Source,
    file: &Arc<str>,
    limits: &Limits,
) -> Taken {
    let mut staged = Staged::on(state);
    let mut end = None;
    let mut lost = false;
    let mut fill = |buf: &mut Vec<u8>| {
        if end.is_some() || lost {
            return false;
        }
        match received.recv() {
            Ok(Handover::Piece(piece)) => {
                buf.extend_from_slice(&piece);
                true
            }
            Ok(Handover::End(read)) => {
                end = Some(read);
                false
            }
            Err(_) => {
                lost = true;
                false
            }
        }
    };
    let mut sink = SourceSink {
        state: &mut staged,
        source,
        file,
    };
    let mut number = 0;
    let split = split_records(plan, limits.json_depth, &mut fill, &mut |value| {
        number += 1;
        sink.record(Record::Json {
            number,
            line: None,
            value: &value,
        })
    });
    // The rest of the entry, when the split stopped early.
    let mut rest = Vec::new();
    while fill(&mut rest) {
        rest.clear();
    }
    match (end, split) {
        (None, _) => Taken::Lost,
        (Some(Err(e @ archive::Error::Limit { .. })), _) => Taken::Failed(e),
        (Some(Ok(bytes)), Ok(split)) => Taken::Split(
            staged,
            SplitEntry {
                records: split.records,
                bytes,
            },
        ),
        (Some(_), _) => Taken::Whole,
    }
}
