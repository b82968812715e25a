//! The what-if session: marks, private real values and alert levels over a scan, with
//! undo and redo. Every change goes through [`Exposure::set_hidden`], so posteriors
//! update in time proportional to the changed item's evidence.

use crate::decisions::{Decisions, Mark, subject_key};
use crate::evidence::Subject;
use crate::footprint::Footprint;
use crate::infer::{Exposure, Posterior};
use crate::priors::Priors;
use crate::report::{self, ScanReport};
use crate::scan::Scan;

/// One undoable step.
#[derive(Debug, Clone, PartialEq)]
enum Step {
    /// Marks of several subjects changed at once: (subject, before, after).
    Marks(Vec<(Subject, Option<Mark>, Option<Mark>)>),
    /// A real value changed: (attribute, before, after).
    RealValue(usize, Option<usize>, Option<usize>),
    /// An alert level changed: (attribute, before, after).
    Target(usize, f64, f64),
}

/// A person's what-if session over one scanned archive.
#[derive(Debug, Clone)]
pub struct Session {
    pub scan: Scan,
    pub priors: Priors,
    /// Current mark per subject slot (items, then the friend list).
    marks: Vec<Option<Mark>>,
    real_values: Vec<Option<usize>>,
    targets: Vec<f64>,
    undo: Vec<Step>,
    redo: Vec<Step>,
    /// Posteriors with nothing hidden, for "was … when everything was visible".
    baseline: Vec<Posterior>,
    /// Saved marks whose items are not in this archive any more (kept, not lost).
    unmatched: Decisions,
    /// Running counts of hide and keep marks.
    hidden_n: usize,
    kept_n: usize,
    /// Subjects whose mark changed since [`Session::take_changed`] last ran; `None`
    /// once more than [`CHANGED_LIST_MAX`] did (a front end then refreshes everything).
    changed: Option<Vec<Subject>>,
    /// Name keys of the items (then the friend list), made on first search or sort by
    /// name and kept: the footprint does not change during a session.
    name_keys: std::sync::OnceLock<Vec<String>>,
    /// Whether real values go into the saved decisions (the person asked).
    remember_real_values: bool,
}

/// Changed subjects listed one by one at most; beyond this, "everything changed".
const CHANGED_LIST_MAX: usize = 4096;

impl Session {
    /// The name key ([`crate::text::name_key`]) of a subject's name, for search and
    /// sorting by name.
    pub fn name_key(&self, subject: Subject) -> &str {
        let keys = self.name_keys.get_or_init(|| {
            let fp = &self.scan.footprint;
            fp.items
                .iter()
                .map(|it| crate::text::name_key(&it.name))
                .chain([crate::text::name_key(subject_name(fp, Subject::FriendList))])
                .collect()
        });
        let slot = match subject {
            Subject::Item(i) => i.min(keys.len() - 1),
            Subject::FriendList => keys.len() - 1,
        };
        &keys[slot]
    }

    /// Start a session and apply saved decisions. Marks for items this import does not
    /// have are carried along unchanged (so saving never drops them).
    pub fn open(scan: Scan, priors: Priors, saved: &Decisions) -> Session {
        let n_slots = scan.footprint.items.len() + 1;
        let n_attr = priors.attributes.len();
        let baseline = (0..n_attr).map(|a| scan.exposure.posterior(a)).collect();
        let mut s = Session {
            marks: vec![None; n_slots],
            real_values: vec![None; n_attr],
            targets: priors.attributes.iter().map(|a| a.threshold).collect(),
            undo: Vec::new(),
            redo: Vec::new(),
            baseline,
            unmatched: Decisions::new(&scan.footprint.fingerprint),
            hidden_n: 0,
            kept_n: 0,
            changed: Some(Vec::new()),
            name_keys: std::sync::OnceLock::new(),
            remember_real_values: saved.remember_real_values,
            scan,
            priors,
        };
        let mut known = std::collections::BTreeSet::new();
        for mark in [Mark::Hide, Mark::Keep] {
            let (subjects, _) = saved.subjects_marked(&s.scan.footprint, mark);
            for subject in subjects {
                known.insert(subject_key(&s.scan.footprint, subject));
                s.apply_mark(subject, Some(mark));
            }
        }
        for (k, m) in &saved.marks {
            if !known.contains(k) {
                s.unmatched.marks.insert(k.clone(), *m);
            }
        }
        for (ai, attr) in s.priors.attributes.iter().enumerate() {
            if let Some(v) = saved.real_values.get(&attr.id) {
                match attr.value_index(v) {
                    Some(vi) => s.real_values[ai] = Some(vi),
                    None => {
                        s.unmatched.real_values.insert(attr.id.clone(), v.clone());
                    }
                }
            }
            if let Some(&t) = saved.targets.get(&attr.id)
                && t > 0.0
                && t <= 1.0
            {
                s.targets[ai] = t;
            }
        }
        s
    }

    pub fn footprint(&self) -> &Footprint {
        &self.scan.footprint
    }

    pub fn exposure(&self) -> &Exposure {
        &self.scan.exposure
    }

    pub fn n_attributes(&self) -> usize {
        self.priors.attributes.len()
    }

    /// Number of [`Session::subjects`], without walking them.
    pub fn n_subjects(&self) -> usize {
        self.scan.footprint.items.len()
            + usize::from(
                !self
                    .scan
                    .exposure
                    .evidence_of(Subject::FriendList)
                    .is_empty(),
            )
    }

    /// Every subject: items in archive order, then the friend list if anything
    /// about it is known.
    pub fn subjects(&self) -> impl Iterator<Item = Subject> + '_ {
        let n = self.scan.footprint.items.len();
        (0..n).map(Subject::Item).chain(
            (!self
                .scan
                .exposure
                .evidence_of(Subject::FriendList)
                .is_empty())
            .then_some(Subject::FriendList),
        )
    }

    fn slot(&self, subject: Subject) -> usize {
        match subject {
            Subject::Item(i) => i,
            Subject::FriendList => self.scan.footprint.items.len(),
        }
    }

    pub fn mark(&self, subject: Subject) -> Option<Mark> {
        self.marks[self.slot(subject)]
    }

    pub fn is_hidden(&self, subject: Subject) -> bool {
        self.mark(subject) == Some(Mark::Hide)
    }

    pub fn is_kept(&self, subject: Subject) -> bool {
        self.mark(subject) == Some(Mark::Keep)
    }

    pub fn posterior(&self, a: usize) -> Posterior {
        self.scan.exposure.posterior(a)
    }

    /// The posterior with nothing hidden.
    pub fn baseline(&self, a: usize) -> &Posterior {
        &self.baseline[a]
    }

    pub fn real_value(&self, a: usize) -> Option<usize> {
        self.real_values[a]
    }

    pub fn target(&self, a: usize) -> f64 {
        self.targets[a]
    }

    pub fn targets(&self) -> &[f64] {
        &self.targets
    }

    pub fn real_values(&self) -> &[Option<usize>] {
        &self.real_values
    }

    /// Number of hidden subjects (a running count).
    pub fn hidden_count(&self) -> usize {
        self.hidden_n
    }

    /// Number of subjects marked keep (a running count).
    pub fn kept_count(&self) -> usize {
        self.kept_n
    }

    /// The subjects whose mark changed since the last call, each once, and start a new
    /// list; `None` when too many changed to list (treat every subject as changed).
    /// Lets a front end update what it shows in proportion to what changed.
    pub fn take_changed(&mut self) -> Option<Vec<Subject>> {
        let mut list = self.changed.replace(Vec::new())?;
        list.sort_unstable();
        list.dedup();
        Some(list)
    }

    fn apply_mark(&mut self, subject: Subject, mark: Option<Mark>) {
        let slot = self.slot(subject);
        let before = std::mem::replace(&mut self.marks[slot], mark);
        for (m, delta) in [(before, false), (mark, true)] {
            let count = match m {
                Some(Mark::Hide) => &mut self.hidden_n,
                Some(Mark::Keep) => &mut self.kept_n,
                None => continue,
            };
            if delta {
                *count += 1;
            } else {
                *count -= 1;
            }
        }
        if let Some(list) = &mut self.changed {
            if list.len() < CHANGED_LIST_MAX {
                list.push(subject);
            } else {
                self.changed = None;
            }
        }
        self.scan
            .exposure
            .set_hidden(subject, mark == Some(Mark::Hide));
    }

    fn record(&mut self, step: Step) {
        self.undo.push(step);
        self.redo.clear();
    }

    /// Set the marks of several subjects as one undoable step. Returns whether
    /// anything changed.
    pub fn set_marks(&mut self, changes: &[(Subject, Option<Mark>)]) -> bool {
        let mut step = Vec::new();
        for &(subject, after) in changes {
            let before = self.mark(subject);
            if before != after {
                self.apply_mark(subject, after);
                step.push((subject, before, after));
            }
        }
        if step.is_empty() {
            return false;
        }
        self.record(Step::Marks(step));
        true
    }

    /// Hide a visible subject, or show a hidden one (a keep mark becomes hidden).
    pub fn toggle_hidden(&mut self, subject: Subject) -> bool {
        let after = if self.is_hidden(subject) {
            None
        } else {
            Some(Mark::Hide)
        };
        self.set_marks(&[(subject, after)])
    }

    /// Mark a subject as must-keep (shown), or take the keep mark away.
    pub fn toggle_kept(&mut self, subject: Subject) -> bool {
        let after = if self.is_kept(subject) {
            None
        } else {
            Some(Mark::Keep)
        };
        self.set_marks(&[(subject, after)])
    }

    /// Hide every listed subject as one undoable step (accepting a plan).
    pub fn hide_all(&mut self, subjects: &[Subject]) -> bool {
        let changes: Vec<_> = subjects.iter().map(|&s| (s, Some(Mark::Hide))).collect();
        self.set_marks(&changes)
    }

    /// State (or clear) the person's real value for an attribute.
    pub fn set_real_value(&mut self, a: usize, value: Option<usize>) -> bool {
        let before = self.real_values[a];
        if before == value {
            return false;
        }
        self.real_values[a] = value;
        self.record(Step::RealValue(a, before, value));
        true
    }

    /// Change an attribute's alert level (clamped to 1%–99%).
    pub fn set_target(&mut self, a: usize, target: f64) -> bool {
        let target = (target.clamp(0.01, 0.99) * 100.0).round() / 100.0;
        let before = self.targets[a];
        if (before - target).abs() < 1e-9 {
            return false;
        }
        self.targets[a] = target;
        self.record(Step::Target(a, before, target));
        true
    }

    fn apply(&mut self, step: &Step, forward: bool) {
        match step {
            Step::Marks(list) => {
                for &(subject, before, after) in list {
                    self.apply_mark(subject, if forward { after } else { before });
                }
            }
            Step::RealValue(a, before, after) => {
                self.real_values[*a] = if forward { *after } else { *before };
            }
            Step::Target(a, before, after) => {
                self.targets[*a] = if forward { *after } else { *before };
            }
        }
    }

    /// Undo the last change; false when there is nothing to undo.
    pub fn undo(&mut self) -> bool {
        let Some(step) = self.undo.pop() else {
            return false;
        };
        self.apply(&step, false);
        self.redo.push(step);
        true
    }

    /// Redo the last undone change.
    pub fn redo(&mut self) -> bool {
        let Some(step) = self.redo.pop() else {
            return false;
        };
        self.apply(&step, true);
        self.undo.push(step);
        true
    }

    pub fn can_undo(&self) -> bool {
        !self.undo.is_empty()
    }

    /// Save real values with the other decisions (the person asked for it).
    pub fn set_remember_real_values(&mut self, on: bool) {
        self.remember_real_values = on;
    }

    /// Whether real values are saved with the other decisions.
    pub fn remembers_real_values(&self) -> bool {
        self.remember_real_values
    }

    /// The decisions to save: current marks, changed alert levels and (only when the
    /// person asked) real values, plus saved marks for items this import did not have.
    pub fn decisions(&self) -> Decisions {
        let mut d = self.unmatched.clone();
        for s in self.subjects().collect::<Vec<_>>() {
            if let Some(m) = self.mark(s) {
                d.marks.insert(subject_key(&self.scan.footprint, s), m);
            }
        }
        // Real values are saved only when the person asked for it; otherwise even
        // values restored from an older file are left out of the next save.
        if !self.remember_real_values {
            d.real_values.clear();
        }
        d.remember_real_values = self.remember_real_values;
        for (ai, attr) in self.priors.attributes.iter().enumerate() {
            if let Some(v) = self.real_values[ai]
                && self.remember_real_values
            {
                d.real_values
                    .insert(attr.id.clone(), attr.values[v].id.clone());
            }
            if (self.targets[ai] - attr.threshold).abs() > 1e-9 {
                d.targets.insert(attr.id.clone(), self.targets[ai]);
            }
        }
        d
    }

    /// The report of the current state (hidden items count as hidden; real values
    /// are never part of it), with the person's alert levels (the ones
    /// the plan screen uses), so an exported document has one set throughout; `rows`
    /// says how many item rows it holds.
    pub fn report(&self, rows: report::RowCount) -> ScanReport {
        let mut r = report::build_with(
            &self.scan.archive_name,
            &self.scan.footprint,
            &self.priors,
            &self.scan.exposure,
            rows,
        );
        r.set_alert_levels(&self.priors, &self.targets);
        r
    }
}

/// A subject's display name.
pub fn subject_name(footprint: &Footprint, subject: Subject) -> &str {
    match subject {
        Subject::Item(i) => footprint.items.get(i).map(|it| &*it.name).unwrap_or("?"),
        Subject::FriendList => "your friend list",
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use crate::scan::{ScanInput, load_priors};

    /// The reporter persona from the bundled demo.
    pub(crate) fn demo_session() -> Session {
        let mut priors = load_priors(None).unwrap();
        let input = ScanInput {
            archive: concat!(env!("CARGO_MANIFEST_DIR"), "/demo-exports/reporter").into(),
            ..ScanInput::default()
        };
        let scan = Scan::run(&input, &mut priors).unwrap();
        let fp = scan.footprint.fingerprint.clone();
        Session::open(scan, priors, &Decisions::new(&fp))
    }

    #[test]
    fn hide_undo_redo_restore_posteriors_exactly() {
        let mut s = demo_session();
        let before: Vec<_> = (0..s.n_attributes()).map(|a| s.posterior(a)).collect();
        let item = Subject::Item(0);
        assert!(s.toggle_hidden(item));
        assert!(s.is_hidden(item));
        assert_eq!(s.hidden_count(), 1);
        assert!(s.undo());
        assert!(!s.is_hidden(item));
        for (a, p) in before.iter().enumerate() {
            for (x, y) in p.probs.iter().zip(&s.posterior(a).probs) {
                assert!((x - y).abs() < 1e-12);
            }
        }
        assert!(s.redo());
        assert!(s.is_hidden(item));
        assert!(!s.redo());
    }

    #[test]
    fn decisions_round_trip_through_a_new_session() {
        let mut s = demo_session();
        s.toggle_hidden(Subject::Item(3));
        s.toggle_kept(Subject::Item(5));
        s.set_real_value(0, Some(2));
        s.set_target(1, 0.3);
        // Real values are not saved unless the person asks.
        let unasked = s.decisions();
        assert!(unasked.real_values.is_empty() && !unasked.remember_real_values);
        let reopened = Session::open(s.scan.clone(), s.priors.clone(), &unasked);
        assert_eq!(reopened.real_value(0), None);
        s.set_remember_real_values(true);
        let saved = s.decisions();
        assert_eq!(saved.marks.len(), 2);
        let reopened = Session::open(s.scan.clone(), s.priors.clone(), &saved);
        assert!(reopened.is_hidden(Subject::Item(3)));
        assert!(reopened.is_kept(Subject::Item(5)));
        assert_eq!(reopened.real_value(0), Some(2));
        assert!(reopened.remembers_real_values());
        assert!((reopened.target(1) - 0.3).abs() < 1e-12);
        assert_eq!(reopened.decisions(), saved);
        // A file from before the question (real values, no consent recorded): they are
        // used this session and left out of the next save.
        let mut old = saved.clone();
        old.remember_real_values = false;
        let reopened = Session::open(s.scan.clone(), s.priors.clone(), &old);
        assert_eq!(reopened.real_value(0), Some(2));
        assert!(reopened.decisions().real_values.is_empty());
    }

    #[test]
    fn running_counts_and_changed_subjects_follow_every_change() {
        let mut s = demo_session();
        assert_eq!(s.n_subjects(), s.subjects().count());
        assert_eq!(s.take_changed(), Some(Vec::new()));
        let (a, b) = (Subject::Item(2), Subject::Item(4));
        s.toggle_hidden(a);
        s.toggle_kept(b);
        s.toggle_kept(a); // hidden → kept
        let direct = |s: &Session, m: Mark| s.subjects().filter(|&x| s.mark(x) == Some(m)).count();
        assert_eq!((s.hidden_count(), s.kept_count()), (0, 2));
        assert_eq!(direct(&s, Mark::Keep), 2);
        assert_eq!(s.take_changed(), Some(vec![a, b]));
        assert_eq!(s.take_changed(), Some(Vec::new()));
        s.undo();
        assert_eq!((s.hidden_count(), s.kept_count()), (1, 1));
        assert_eq!(direct(&s, Mark::Hide), 1);
        assert_eq!(s.take_changed(), Some(vec![a]));
        // More changes than are worth listing: "everything changed", then a fresh list.
        for _ in 0..=CHANGED_LIST_MAX {
            s.toggle_hidden(b);
        }
        assert_eq!(s.take_changed(), None);
        assert_eq!(s.take_changed(), Some(Vec::new()));
        assert_eq!(s.hidden_count(), direct(&s, Mark::Hide));
        assert_eq!(s.kept_count(), direct(&s, Mark::Keep));
    }

    #[test]
    fn marks_for_missing_items_survive_saving() {
        let s = demo_session();
        let mut saved = s.decisions();
        saved
            .marks
            .insert("like:id:not-in-this-archive".into(), Mark::Hide);
        let reopened = Session::open(s.scan.clone(), s.priors.clone(), &saved);
        assert_eq!(reopened.hidden_count(), 0);
        assert!(
            reopened
                .decisions()
                .marks
                .contains_key("like:id:not-in-this-archive")
        );
    }
}
