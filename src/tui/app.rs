//! The explorer's state and what keys do to it. No I/O happens here: handling a key
//! changes the state and returns [`Effect`]s (save, export, start a plan …) for the
//! event loop to carry out, so every transition is tested by sending keys.

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
use telltale::decisions::Mark;
use telltale::evidence::Subject;
use telltale::plan::Method;
use telltale::whatif::{ItemRow, RowQuery, Session, item_rows, sort_rows};

use super::keys::{Action, action_for};
pub use super::state::{Effect, ExportFormat, Goal, Overlay, PlanResult, PlanState, Screen};

/// The explorer's whole state.
pub struct App {
    pub session: Session,
    pub screen: Screen,
    /// Where Esc goes from the detail.
    pub detail_return: Screen,
    pub overlay: Option<Overlay>,
    pub query: RowQuery,
    /// Typing into the search field.
    pub searching: bool,
    pub rows: Vec<ItemRow>,
    /// Per subject slot (items, then the friend list): its position in `rows`.
    row_at: Vec<Option<u32>>,
    pub item_cursor: usize,
    pub overview_cursor: usize,
    pub values_cursor: usize,
    pub plan_cursor: usize,
    pub detail_scroll: u16,
    pub goal: Goal,
    /// Exact search (default) or the quick greedy method.
    pub method: Method,
    pub plan: PlanState,
    /// How far the plan screen's lower part (items, coarse moves) is scrolled.
    pub plan_scroll: u16,
    /// A one-line message for the footer, until the next key.
    pub status: Option<String>,
    pub quit: bool,
    /// Rows a page holds (set by the renderer from the last frame).
    pub page: usize,
}

impl App {
    /// The decisions to save: the session's, with the plan's goal.
    pub fn decisions(&self) -> telltale::decisions::Decisions {
        let mut d = self.session.decisions();
        d.goal = Some(
            match self.goal {
                Goal::BestGuess => telltale::decisions::GOAL_BEST_GUESS,
                Goal::RealValue => telltale::decisions::GOAL_REAL_VALUE,
            }
            .to_string(),
        );
        d
    }

    /// Take up a saved goal. "My real value" stays chosen even when the real values
    /// themselves were not saved: attributes without a stated value fall back to the
    /// best guess until the person states it again.
    pub fn restore_goal(&mut self, saved: Option<&str>) {
        self.goal = match saved {
            Some(telltale::decisions::GOAL_REAL_VALUE) => Goal::RealValue,
            _ => Goal::BestGuess,
        };
    }

    pub fn new(session: Session) -> App {
        let mut app = App {
            session,
            screen: Screen::Overview,
            detail_return: Screen::Items,
            overlay: None,
            query: RowQuery::default(),
            searching: false,
            rows: Vec::new(),
            row_at: Vec::new(),
            item_cursor: 0,
            overview_cursor: 0,
            values_cursor: 0,
            plan_cursor: 0,
            detail_scroll: 0,
            goal: Goal::default(),
            method: Method::Exact,
            plan: PlanState::Stale,
            plan_scroll: 0,
            status: None,
            quit: false,
            page: 10,
        };
        app.refresh_rows();
        app
    }

    /// Show the cautions as the first thing (first run on this computer).
    pub fn show_cautions_first(&mut self) {
        self.overlay = Some(Overlay::Cautions { first_run: true });
    }

    /// Rebuild the item list from scratch (after the query changed).
    pub fn refresh_rows(&mut self) {
        let keep = self.rows.get(self.item_cursor).map(|r| r.subject);
        self.session.take_changed();
        self.rows = item_rows(&self.session, &self.query);
        let n_items = self.session.footprint().items.len();
        self.row_at.clear();
        self.row_at.resize(n_items + 1, None);
        for (i, r) in self.rows.iter().enumerate() {
            self.row_at[slot(r.subject, n_items)] = Some(i as u32);
        }
        self.item_cursor = keep
            .and_then(|s| self.row_at[slot(s, n_items)])
            .map_or(self.item_cursor, |i| i as usize)
            .min(self.rows.len().saturating_sub(1));
    }

    /// Put the item list in the query's new order, from the top. The rows are up to
    /// date unless marks changed since they were made (then it is rebuilt); only their
    /// order changes, so they are sorted again rather than worked out again.
    pub fn resort(&mut self) {
        if self
            .session
            .take_changed()
            .is_none_or(|list| !list.is_empty())
        {
            self.requery();
            return;
        }
        sort_rows(&self.session, &mut self.rows, self.query.sort);
        let n_items = self.session.footprint().items.len();
        for (i, r) in self.rows.iter().enumerate() {
            self.row_at[slot(r.subject, n_items)] = Some(i as u32);
        }
        self.item_cursor = 0;
    }

    /// Rebuild the item list for a changed query (order, filter, search) and start at
    /// its top: the rows before are no guide to where to look in the new list.
    pub fn requery(&mut self) {
        self.refresh_rows();
        self.item_cursor = 0;
    }

    /// Bring the item list up to date after marks changed. Every row's figure is a
    /// leave-one-out change of a best guess ([`telltale::effect`]), so hiding or
    /// showing anything moves other rows' figures and order too: then the list is
    /// rebuilt. A keep (or clearing one) changes nothing the observer sees, only its
    /// own row's mark column, so that is updated in place; either way the list is the
    /// same as a rebuild would give.
    fn update_rows(&mut self) {
        let changed = self.session.take_changed();
        let n_items = self.session.footprint().items.len();
        let is_hide = |m: Option<Mark>| m == Some(Mark::Hide);
        let in_place = changed.as_ref().is_some_and(|list| {
            list.iter().all(|&s| {
                self.row_at[slot(s, n_items)].is_some_and(|i| {
                    is_hide(self.rows[i as usize].mark) == is_hide(self.session.mark(s))
                })
            })
        });
        match changed {
            Some(list) if in_place => {
                for s in list {
                    if let Some(i) = self.row_at[slot(s, n_items)] {
                        self.rows[i as usize].mark = self.session.mark(s);
                    }
                }
            }
            _ => self.refresh_rows(),
        }
    }

    /// The subject under the cursor (items list or detail).
    pub fn current_subject(&self) -> Option<Subject> {
        match self.screen {
            Screen::Detail(s) => Some(s),
            Screen::Items => self.rows.get(self.item_cursor).map(|r| r.subject),
            _ => None,
        }
    }

    /// Handle one key press.
    pub fn handle_key(&mut self, ev: KeyEvent) -> Vec<Effect> {
        self.status = None;
        if let Some(overlay) = self.overlay.clone() {
            return self.handle_overlay(overlay, ev);
        }
        if self.searching {
            return self.handle_search(ev);
        }
        match action_for(&ev, self.screen.place()) {
            Some(a) => self.act(a),
            None => Vec::new(),
        }
    }

    fn handle_search(&mut self, ev: KeyEvent) -> Vec<Effect> {
        match ev.code {
            KeyCode::Enter => self.searching = false,
            KeyCode::Esc => {
                self.searching = false;
                self.query.search.clear();
                self.refresh_rows();
            }
            KeyCode::Backspace => {
                self.query.search.pop();
                self.requery();
            }
            KeyCode::Down | KeyCode::Up => {
                self.searching = false;
                return self.handle_key(ev);
            }
            KeyCode::Char(c) if !ev.modifiers.contains(KeyModifiers::CONTROL) => {
                self.query.search.push(c);
                self.requery();
            }
            KeyCode::Char('c') => self.quit = true,
            _ => {}
        }
        Vec::new()
    }

    /// After any change to marks, values or targets: refresh views and save.
    pub(super) fn changed(&mut self) -> Vec<Effect> {
        self.update_rows();
        let mut fx = vec![Effect::SaveDecisions];
        fx.extend(self.plan_effects());
        fx
    }

    fn go(&mut self, screen: Screen) -> Vec<Effect> {
        self.screen = screen;
        self.searching = false;
        self.plan_effects()
    }

    fn move_cursor(&mut self, delta: isize) {
        let page = self.page.max(1) as isize;
        let step = |cur: usize, len: usize, d: isize| -> usize {
            if len == 0 {
                return 0;
            }
            let d = match d {
                isize::MIN => -(len as isize),
                isize::MAX => len as isize,
                d => d,
            };
            (cur as isize + d).clamp(0, len as isize - 1) as usize
        };
        let paging = delta == 2 || delta == -2;
        let delta = match delta {
            2 => page,
            -2 => -page,
            d => d,
        };
        match self.screen {
            Screen::Overview => {
                self.overview_cursor =
                    step(self.overview_cursor, self.session.n_attributes(), delta)
            }
            Screen::Items => self.item_cursor = step(self.item_cursor, self.rows.len(), delta),
            Screen::Values => {
                self.values_cursor = step(self.values_cursor, self.session.n_attributes(), delta)
            }
            Screen::Plan if paging => {
                self.plan_scroll = if delta < 0 {
                    self.plan_scroll.saturating_sub(page as u16)
                } else {
                    self.plan_scroll.saturating_add(page as u16).min(2000)
                }
            }
            Screen::Plan => self.plan_cursor = step(self.plan_cursor, self.plan_rows(), delta),
            Screen::Detail(_) => {
                self.detail_scroll = if delta < 0 {
                    self.detail_scroll
                        .saturating_sub(delta.unsigned_abs().min(u16::MAX as usize) as u16)
                } else {
                    self.detail_scroll
                        .saturating_add(delta.min(500) as u16)
                        .min(500)
                }
            }
        }
    }

    /// Carry out an action.
    pub fn act(&mut self, action: Action) -> Vec<Effect> {
        match action {
            Action::Quit => self.quit = true,
            Action::Help => self.overlay = Some(Overlay::Help { scroll: 0 }),
            Action::Cautions => self.overlay = Some(Overlay::Cautions { first_run: false }),
            Action::Back => match self.screen {
                Screen::Plan
                    if matches!(
                        self.plan,
                        PlanState::Running {
                            stopping: false,
                            ..
                        }
                    ) =>
                {
                    if let PlanState::Running { stopping, .. } = &mut self.plan {
                        *stopping = true;
                    }
                    self.status =
                        Some("Stopping the search; the best plan found so far will show.".into());
                    return vec![Effect::StopPlan];
                }
                Screen::Detail(_) => {
                    self.screen = self.detail_return;
                    return self.plan_effects();
                }
                Screen::Items if self.query != RowQuery::default() => {
                    self.query = RowQuery::default();
                    self.refresh_rows();
                    self.status = Some("Filters cleared.".into());
                }
                Screen::Overview => {}
                _ => return self.go(Screen::Overview),
            },
            Action::Open => match self.screen {
                Screen::Overview => {
                    self.query = RowQuery {
                        attribute: Some(self.overview_cursor),
                        ..RowQuery::default()
                    };
                    self.requery();
                    return self.go(Screen::Items);
                }
                Screen::Items => {
                    if let Some(s) = self.current_subject() {
                        self.detail_return = Screen::Items;
                        self.detail_scroll = 0;
                        self.screen = Screen::Detail(s);
                    }
                }
                Screen::Values => {
                    let a = self.values_cursor;
                    let cursor = self.session.real_value(a).map_or(0, |v| v + 1);
                    self.overlay = Some(Overlay::PickValue {
                        attribute: a,
                        cursor,
                    });
                }
                _ => {}
            },
            Action::Up => self.move_cursor(-1),
            Action::Down => self.move_cursor(1),
            Action::PageUp => self.move_cursor(-2),
            Action::PageDown => self.move_cursor(2),
            Action::Top => self.move_cursor(isize::MIN),
            Action::Bottom => self.move_cursor(isize::MAX),
            Action::NextScreen | Action::PrevScreen => {
                let n = Screen::TABS.len();
                let t = self.screen.tab();
                let next = if action == Action::NextScreen {
                    (t + 1) % n
                } else {
                    (t + n - 1) % n
                };
                return self.go(Screen::TABS[next].0);
            }
            Action::GoOverview => return self.go(Screen::Overview),
            Action::GoItems => return self.go(Screen::Items),
            Action::GoPlan => return self.go(Screen::Plan),
            Action::GoValues => return self.go(Screen::Values),
            Action::ToggleHide => {
                if let Some(s) = self.current_subject() {
                    self.session.toggle_hidden(s);
                    let name =
                        telltale::whatif::subject_name(self.session.footprint(), s).to_string();
                    let name = telltale::text::truncate_to_width(&name, 40);
                    self.status = Some(if self.session.is_hidden(s) {
                        format!("Hidden (what-if): {name}. u undoes.")
                    } else {
                        format!("Shown again: {name}.")
                    });
                    return self.changed();
                }
            }
            Action::ToggleKeep => {
                if let Some(s) = self.current_subject() {
                    self.session.toggle_kept(s);
                    self.status = Some(if self.session.is_kept(s) {
                        "Marked must-keep: plans will not suggest hiding it.".into()
                    } else {
                        "Keep mark removed.".into()
                    });
                    return self.changed();
                }
            }
            Action::Undo => {
                if self.session.undo() {
                    self.status = Some("Undone.".into());
                    return self.changed();
                }
                self.status = Some("Nothing to undo.".into());
            }
            Action::Redo => {
                if self.session.redo() {
                    self.status = Some("Redone.".into());
                    return self.changed();
                }
                self.status = Some("Nothing to redo.".into());
            }
            Action::CycleAttribute => {
                let n = self.session.n_attributes();
                self.query.attribute = match self.query.attribute {
                    None if n > 0 => Some(0),
                    Some(a) if a + 1 < n => Some(a + 1),
                    _ => None,
                };
                self.requery();
            }
            Action::CycleKind => {
                self.query.kind = self.query.kind.next();
                self.requery();
            }
            Action::CycleSort => {
                self.query.sort = self.query.sort.next();
                self.resort();
            }
            Action::Search => self.searching = true,
            Action::ClearFilters => {
                self.query = RowQuery::default();
                self.refresh_rows();
            }
            Action::Export => {
                let stem: String = self
                    .session
                    .scan
                    .archive_name
                    .chars()
                    .map(|c| if c.is_alphanumeric() { c } else { '-' })
                    .collect();
                let stem = stem.trim_matches('-');
                let stem = if stem.is_empty() { "archive" } else { stem };
                self.overlay = Some(Overlay::Export {
                    format: ExportFormat::Html,
                    path: format!("telltale-{stem}.html"),
                });
            }
            Action::TargetUp | Action::TargetDown => {
                let a = self.plan_cursor;
                let step = if action == Action::TargetUp {
                    0.05
                } else {
                    -0.05
                };
                let t = self.session.target(a) + step;
                if self.session.set_target(a, t) {
                    return self.changed();
                }
            }
            Action::SwitchGoal => {
                if self.session.real_values().iter().all(Option::is_none)
                    && self.goal == Goal::BestGuess
                {
                    self.status =
                        Some("State at least one real value first (screen 4, Your values).".into());
                    return Vec::new();
                }
                self.goal = match self.goal {
                    Goal::BestGuess => Goal::RealValue,
                    Goal::RealValue => Goal::BestGuess,
                };
                // The goal is a decision like the others: saved, restored on reopening.
                let mut fx = self.plan_effects();
                fx.push(Effect::SaveDecisions);
                return fx;
            }
            Action::AcceptPlan => {
                let Some(result) = self.current_plan() else {
                    self.status = Some("The plan is not ready yet.".into());
                    return Vec::new();
                };
                let hide = result
                    .outcome
                    .plan
                    .as_ref()
                    .map(|p| p.subjects())
                    .unwrap_or_default();
                if hide.is_empty() {
                    self.status = Some(if result.outcome.plan.is_some() {
                        "Nothing to hide.".into()
                    } else {
                        "There is no plan to accept.".into()
                    });
                    return Vec::new();
                }
                self.session.hide_all(&hide);
                self.status = Some(format!(
                    "Hid {}. u undoes all of them at once.",
                    telltale::reading::count(hide.len(), "item", "items")
                ));
                return self.changed();
            }
            Action::SwitchMethod => {
                self.method = match self.method {
                    Method::Exact => Method::Greedy,
                    Method::Greedy => Method::Exact,
                };
                return self.plan_effects();
            }
        }
        Vec::new()
    }
}

/// A subject's place in per-subject tables: items in order, then the friend list.
fn slot(subject: Subject, n_items: usize) -> usize {
    match subject {
        Subject::Item(i) => i,
        Subject::FriendList => n_items,
    }
}
