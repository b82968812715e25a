//! Key bindings as data: one table maps each action to its keys, the screens where it
//! applies and the words that describe it. The help screen and the footer hints are
//! generated from this table, so they cannot drift from what the keys do.

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};

/// Everything a key can ask for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Action {
    Quit,
    Help,
    Cautions,
    Back,
    Open,
    Up,
    Down,
    PageUp,
    PageDown,
    Top,
    Bottom,
    NextScreen,
    PrevScreen,
    GoOverview,
    GoItems,
    GoPlan,
    GoValues,
    ToggleHide,
    ToggleKeep,
    Undo,
    Redo,
    CycleAttribute,
    CycleKind,
    CycleSort,
    Search,
    ClearFilters,
    Export,
    TargetUp,
    TargetDown,
    SwitchGoal,
    SwitchMethod,
    AcceptPlan,
}

/// A key as the table writes it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Key {
    Char(char),
    Ctrl(char),
    Up,
    Down,
    Left,
    Right,
    PageUp,
    PageDown,
    Home,
    End,
    Enter,
    Esc,
    Tab,
    BackTab,
}

impl Key {
    /// How the key is written on screen.
    pub fn label(self) -> String {
        match self {
            Key::Char(' ') => "Space".into(),
            Key::Char(c) => c.to_string(),
            Key::Ctrl(c) => format!("Ctrl-{}", c.to_ascii_uppercase()),
            Key::Up => "↑".into(),
            Key::Down => "↓".into(),
            Key::Left => "←".into(),
            Key::Right => "→".into(),
            Key::PageUp => "PgUp".into(),
            Key::PageDown => "PgDn".into(),
            Key::Home => "Home".into(),
            Key::End => "End".into(),
            Key::Enter => "Enter".into(),
            Key::Esc => "Esc".into(),
            Key::Tab => "Tab".into(),
            Key::BackTab => "Shift-Tab".into(),
        }
    }

    fn matches(self, ev: &KeyEvent) -> bool {
        let ctrl = ev.modifiers.contains(KeyModifiers::CONTROL);
        match (self, ev.code) {
            (Key::Char(c), KeyCode::Char(k)) => !ctrl && c == k,
            (Key::Ctrl(c), KeyCode::Char(k)) => ctrl && c.eq_ignore_ascii_case(&k),
            (Key::Up, KeyCode::Up)
            | (Key::Down, KeyCode::Down)
            | (Key::Left, KeyCode::Left)
            | (Key::Right, KeyCode::Right)
            | (Key::PageUp, KeyCode::PageUp)
            | (Key::PageDown, KeyCode::PageDown)
            | (Key::Home, KeyCode::Home)
            | (Key::End, KeyCode::End)
            | (Key::Enter, KeyCode::Enter)
            | (Key::Esc, KeyCode::Esc)
            | (Key::BackTab, KeyCode::BackTab) => true,
            (Key::Tab, KeyCode::Tab) => !ev.modifiers.contains(KeyModifiers::SHIFT),
            _ => false,
        }
    }
}

/// Where a binding applies.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scope {
    Everywhere,
    Overview,
    Items,
    Detail,
    Plan,
    Values,
    /// Screens with a list to move in (overview, items, plan, values) and the detail.
    Moving,
    /// The items list and the detail (marking one item).
    Marking,
}

/// The screens, as scopes see them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Place {
    Overview,
    Items,
    Detail,
    Plan,
    Values,
}

impl Scope {
    pub fn applies(self, place: Place) -> bool {
        match self {
            Scope::Everywhere => true,
            Scope::Overview => place == Place::Overview,
            Scope::Items => place == Place::Items,
            Scope::Detail => place == Place::Detail,
            Scope::Plan => place == Place::Plan,
            Scope::Values => place == Place::Values,
            Scope::Moving => true,
            Scope::Marking => matches!(place, Place::Items | Place::Detail),
        }
    }

    fn title(self) -> &'static str {
        match self {
            Scope::Everywhere => "Anywhere",
            Scope::Moving => "Moving around",
            Scope::Marking => "Trying things out (item list and item detail)",
            Scope::Overview => "Overview",
            Scope::Items => "Item list",
            Scope::Detail => "Item detail",
            Scope::Plan => "Hiding plan",
            Scope::Values => "Your real values",
        }
    }
}

/// One row of the key table.
#[derive(Debug, Clone, Copy)]
pub struct Binding {
    pub action: Action,
    pub keys: &'static [Key],
    pub scope: Scope,
    /// What it does, for the help screen.
    pub help: &'static str,
    /// A word or two for the footer; `None` keeps it out of the footer.
    pub hint: Option<&'static str>,
}

use Action as A;
use Key as K;

/// The key table. Screen-specific rows come before general ones so they win.
pub const BINDINGS: &[Binding] = &[
    // Screen-specific first.
    Binding {
        action: A::Open,
        keys: &[K::Enter],
        scope: Scope::Overview,
        help: "list the items that feed this attribute",
        hint: Some("items"),
    },
    Binding {
        action: A::Open,
        keys: &[K::Enter],
        scope: Scope::Items,
        help: "open the item's detail",
        hint: Some("detail"),
    },
    Binding {
        action: A::Open,
        keys: &[K::Enter],
        scope: Scope::Values,
        help: "state your real value for this attribute",
        hint: Some("choose"),
    },
    Binding {
        action: A::AcceptPlan,
        keys: &[K::Enter],
        scope: Scope::Plan,
        help: "accept the whole plan: hide every item in it (one undo step)",
        hint: Some("accept all"),
    },
    Binding {
        action: A::TargetUp,
        keys: &[K::Char('+'), K::Right],
        scope: Scope::Plan,
        help: "raise the alert level of the selected attribute by 5 points",
        hint: Some("alert"),
    },
    Binding {
        action: A::TargetDown,
        keys: &[K::Char('-'), K::Left],
        scope: Scope::Plan,
        help: "lower the alert level of the selected attribute by 5 points",
        hint: None,
    },
    Binding {
        action: A::SwitchGoal,
        keys: &[K::Char('g')],
        scope: Scope::Plan,
        help: "switch the goal: no confident best guess, or your real value not guessable",
        hint: Some("goal"),
    },
    Binding {
        action: A::SwitchMethod,
        keys: &[K::Char('m')],
        scope: Scope::Plan,
        help: "switch the method: exact search (proves the smallest) or the quick greedy one",
        hint: Some("method"),
    },
    Binding {
        action: A::ToggleHide,
        keys: &[K::Char('x'), K::Char(' ')],
        scope: Scope::Marking,
        help: "hide the item (what-if), or show it again",
        hint: Some("hide/show"),
    },
    Binding {
        action: A::ToggleKeep,
        keys: &[K::Char('m')],
        scope: Scope::Marking,
        help: "mark the item must-keep: plans never suggest hiding it",
        hint: Some("keep"),
    },
    Binding {
        action: A::Search,
        keys: &[K::Char('/')],
        scope: Scope::Items,
        help: "search names as you type (Enter keeps it, Esc clears it)",
        hint: Some("search"),
    },
    Binding {
        action: A::CycleAttribute,
        keys: &[K::Char('a')],
        scope: Scope::Items,
        help: "show only items about one attribute (cycles)",
        hint: Some("attribute"),
    },
    Binding {
        action: A::CycleKind,
        keys: &[K::Char('t')],
        scope: Scope::Items,
        help: "show only one kind: likes, groups, follows, events (cycles)",
        hint: Some("kind"),
    },
    Binding {
        action: A::CycleSort,
        keys: &[K::Char('o')],
        scope: Scope::Items,
        help: "change the order: most revealing, informative, alike, newest, name",
        hint: Some("order"),
    },
    Binding {
        action: A::ClearFilters,
        keys: &[K::Char('0')],
        scope: Scope::Items,
        help: "clear filters and search",
        hint: None,
    },
    // Moving.
    Binding {
        action: A::Up,
        keys: &[K::Up, K::Char('k')],
        scope: Scope::Moving,
        help: "move up",
        hint: None,
    },
    Binding {
        action: A::Down,
        keys: &[K::Down, K::Char('j')],
        scope: Scope::Moving,
        help: "move down",
        hint: None,
    },
    Binding {
        action: A::PageUp,
        keys: &[K::PageUp],
        scope: Scope::Moving,
        help: "one page up (plan screen: scrolls its lists)",
        hint: None,
    },
    Binding {
        action: A::PageDown,
        keys: &[K::PageDown],
        scope: Scope::Moving,
        help: "one page down (plan screen: scrolls its lists)",
        hint: None,
    },
    Binding {
        action: A::Top,
        keys: &[K::Home],
        scope: Scope::Moving,
        help: "to the top",
        hint: None,
    },
    Binding {
        action: A::Bottom,
        keys: &[K::End],
        scope: Scope::Moving,
        help: "to the bottom",
        hint: None,
    },
    // Anywhere.
    Binding {
        action: A::GoOverview,
        keys: &[K::Char('1')],
        scope: Scope::Everywhere,
        help: "overview: what an observer could guess",
        hint: None,
    },
    Binding {
        action: A::GoItems,
        keys: &[K::Char('2')],
        scope: Scope::Everywhere,
        help: "item list: what gives you away",
        hint: None,
    },
    Binding {
        action: A::GoPlan,
        keys: &[K::Char('3')],
        scope: Scope::Everywhere,
        help: "hiding plan: what to hide to stay under your alert levels",
        hint: None,
    },
    Binding {
        action: A::GoValues,
        keys: &[K::Char('4')],
        scope: Scope::Everywhere,
        help: "your real values (private, for the plan)",
        hint: None,
    },
    Binding {
        action: A::NextScreen,
        keys: &[K::Tab],
        scope: Scope::Everywhere,
        help: "next screen",
        hint: None,
    },
    Binding {
        action: A::PrevScreen,
        keys: &[K::BackTab],
        scope: Scope::Everywhere,
        help: "previous screen",
        hint: None,
    },
    Binding {
        action: A::Back,
        keys: &[K::Esc],
        scope: Scope::Everywhere,
        help: "go back; close a window; stop a plan search",
        hint: None,
    },
    Binding {
        action: A::Undo,
        keys: &[K::Char('u')],
        scope: Scope::Everywhere,
        help: "undo the last change",
        hint: Some("undo"),
    },
    Binding {
        action: A::Redo,
        keys: &[K::Char('r'), K::Ctrl('r')],
        scope: Scope::Everywhere,
        help: "redo what was undone",
        hint: None,
    },
    Binding {
        action: A::Export,
        keys: &[K::Char('e')],
        scope: Scope::Everywhere,
        help: "export a report of the current state (Markdown or HTML)",
        hint: Some("export"),
    },
    Binding {
        action: A::Cautions,
        keys: &[K::Char('c')],
        scope: Scope::Everywhere,
        help: "read the cautions: what these figures are and are not",
        hint: Some("cautions"),
    },
    Binding {
        action: A::Help,
        keys: &[K::Char('?')],
        scope: Scope::Everywhere,
        help: "all keys",
        hint: Some("help"),
    },
    Binding {
        action: A::Quit,
        keys: &[K::Char('q'), K::Ctrl('c')],
        scope: Scope::Everywhere,
        help: "quit (your decisions are already saved)",
        hint: Some("quit"),
    },
];

/// The action a key asks for on a screen.
pub fn action_for(ev: &KeyEvent, place: Place) -> Option<Action> {
    BINDINGS
        .iter()
        .find(|b| b.scope.applies(place) && b.keys.iter().any(|k| k.matches(ev)))
        .map(|b| b.action)
}

/// The first key of an action on a screen, as written on screen.
pub fn key_label(action: Action, place: Place) -> Option<String> {
    BINDINGS
        .iter()
        .find(|b| b.action == action && b.scope.applies(place))
        .and_then(|b| b.keys.first())
        .map(|k| k.label())
}

/// Footer hints for a screen: ("x", "hide/show") pairs, screen-specific first.
pub fn hints(place: Place) -> Vec<(String, &'static str)> {
    BINDINGS
        .iter()
        .filter(|b| b.scope.applies(place))
        .filter_map(|b| Some((b.keys.first()?.label(), b.hint?)))
        .collect()
}

/// The help text: (section title, [(keys, description)]), in table order.
pub fn help_sections() -> Vec<(&'static str, Vec<(String, &'static str)>)> {
    let order = [
        Scope::Moving,
        Scope::Everywhere,
        Scope::Marking,
        Scope::Overview,
        Scope::Items,
        Scope::Plan,
        Scope::Values,
        Scope::Detail,
    ];
    order
        .iter()
        .filter_map(|&scope| {
            let rows: Vec<(String, &'static str)> = BINDINGS
                .iter()
                .filter(|b| b.scope == scope)
                .map(|b| {
                    let keys: Vec<String> = b.keys.iter().map(|k| k.label()).collect();
                    (keys.join(" "), b.help)
                })
                .collect();
            (!rows.is_empty()).then(|| (scope.title(), rows))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn key(c: KeyCode) -> KeyEvent {
        KeyEvent::new(c, KeyModifiers::NONE)
    }

    #[test]
    fn screen_specific_keys_win() {
        assert_eq!(
            action_for(&key(KeyCode::Enter), Place::Plan),
            Some(Action::AcceptPlan)
        );
        assert_eq!(
            action_for(&key(KeyCode::Enter), Place::Items),
            Some(Action::Open)
        );
        assert_eq!(action_for(&key(KeyCode::Char('x')), Place::Overview), None);
        assert_eq!(
            action_for(&key(KeyCode::Char('j')), Place::Detail),
            Some(Action::Down)
        );
        let ctrl_c = KeyEvent::new(KeyCode::Char('c'), KeyModifiers::CONTROL);
        assert_eq!(action_for(&ctrl_c, Place::Items), Some(Action::Quit));
        assert_eq!(
            action_for(&key(KeyCode::Char('c')), Place::Items),
            Some(Action::Cautions)
        );
    }

    #[test]
    fn no_key_is_bound_twice_on_one_screen() {
        for place in [
            Place::Overview,
            Place::Items,
            Place::Detail,
            Place::Plan,
            Place::Values,
        ] {
            let mut seen: Vec<(Key, Action)> = Vec::new();
            for b in BINDINGS.iter().filter(|b| b.scope.applies(place)) {
                for k in b.keys {
                    if let Some((_, other)) = seen.iter().find(|(s, _)| s == k) {
                        // Only the first binding is reachable; a shadowed one is a bug.
                        panic!("{k:?} on {place:?}: {other:?} shadows {:?}", b.action);
                    }
                    seen.push((*k, b.action));
                }
            }
        }
    }

    #[test]
    fn help_lists_every_binding() {
        let n: usize = help_sections().iter().map(|(_, r)| r.len()).sum();
        assert_eq!(n, BINDINGS.len());
    }
}
