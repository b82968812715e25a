//! Styles. Colours are few and standard (the terminal's own red, yellow, green), so
//! they read on dark and light backgrounds alike; every colour is doubled by a word, a
//! symbol or a text attribute, so the screens mean the same without colour. With
//! `NO_COLOR` set, only bold, dim, reverse and underline are used.

use ratatui::style::{Color, Modifier, Style};
use telltale::reading::Level;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Theme {
    pub colour: bool,
}

impl Theme {
    /// Colour unless `NO_COLOR` is set to anything non-empty (no-color.org).
    pub fn from_env() -> Theme {
        Theme {
            colour: std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty()),
        }
    }

    #[cfg(test)]
    pub fn plain() -> Theme {
        Theme { colour: false }
    }

    fn fg(self, c: Color) -> Style {
        if self.colour {
            Style::default().fg(c)
        } else {
            Style::default()
        }
    }

    pub fn title(self) -> Style {
        Style::default().add_modifier(Modifier::BOLD)
    }

    pub fn dim(self) -> Style {
        Style::default().add_modifier(Modifier::DIM)
    }

    pub fn selected(self) -> Style {
        Style::default().add_modifier(Modifier::REVERSED)
    }

    pub fn tab_active(self) -> Style {
        Style::default().add_modifier(Modifier::REVERSED | Modifier::BOLD)
    }

    pub fn key(self) -> Style {
        self.fg(Color::Cyan).add_modifier(Modifier::BOLD)
    }

    pub fn level(self, level: Level) -> Style {
        match level {
            Level::Exposed => self.fg(Color::Red).add_modifier(Modifier::BOLD),
            Level::Leaning => self.fg(Color::Yellow),
            Level::Quiet => self.fg(Color::Green),
        }
    }

    /// The marker for the population rate in a bar.
    pub fn base_mark(self) -> Style {
        self.fg(Color::Magenta).add_modifier(Modifier::BOLD)
    }

    pub fn hidden(self) -> Style {
        Style::default().add_modifier(Modifier::DIM | Modifier::CROSSED_OUT)
    }

    pub fn kept(self) -> Style {
        self.fg(Color::Green)
    }

    pub fn warning(self) -> Style {
        self.fg(Color::Yellow).add_modifier(Modifier::BOLD)
    }

    /// Bars use the terminal's own text colour: readable on any background.
    pub fn bar(self) -> Style {
        Style::default()
    }
}

/// The level as a symbol and word, so it reads without colour.
pub fn level_tag(level: Level) -> &'static str {
    match level {
        Level::Exposed => "▲ EXPOSED",
        Level::Leaning => "◆ leaning",
        Level::Quiet => "○ quiet",
    }
}
