//! Keys while a window (help, cautions, export, value picker) is open over a screen.

use std::path::PathBuf;

use crossterm::event::{KeyCode, KeyEvent, KeyModifiers};

use super::app::App;
use super::state::{Effect, ExportFormat, Overlay};

impl App {
    pub(super) fn handle_overlay(&mut self, overlay: Overlay, ev: KeyEvent) -> Vec<Effect> {
        let ctrl_c = ev.modifiers.contains(KeyModifiers::CONTROL) && ev.code == KeyCode::Char('c');
        if ctrl_c {
            self.quit = true;
            return Vec::new();
        }
        match overlay {
            Overlay::Help { scroll } => match ev.code {
                KeyCode::Down | KeyCode::Char('j') => {
                    self.overlay = Some(Overlay::Help { scroll: scroll + 1 })
                }
                KeyCode::Up | KeyCode::Char('k') => {
                    self.overlay = Some(Overlay::Help {
                        scroll: scroll.saturating_sub(1),
                    })
                }
                KeyCode::PageDown => {
                    self.overlay = Some(Overlay::Help {
                        scroll: scroll + self.page as u16,
                    })
                }
                KeyCode::PageUp => {
                    self.overlay = Some(Overlay::Help {
                        scroll: scroll.saturating_sub(self.page as u16),
                    })
                }
                KeyCode::Char('q') => self.quit = true,
                _ => self.overlay = None,
            },
            Overlay::Cautions { first_run } => {
                if ev.code == KeyCode::Char('q') && !first_run {
                    self.quit = true;
                }
                self.overlay = None;
                if first_run {
                    return vec![Effect::MarkCautionsSeen];
                }
            }
            Overlay::Export { format, mut path } => match ev.code {
                KeyCode::Esc => {
                    self.overlay = None;
                    self.status = Some("Export cancelled.".into());
                }
                KeyCode::Enter => {
                    self.overlay = None;
                    let path = path.trim().to_string();
                    if path.is_empty() {
                        self.status = Some("No file name given; nothing exported.".into());
                        return Vec::new();
                    }
                    let home = directories::BaseDirs::new().map(|b| b.home_dir().to_path_buf());
                    return vec![Effect::Export {
                        format,
                        path: expand_home(&path, home.as_deref()),
                    }];
                }
                KeyCode::Tab | KeyCode::BackTab | KeyCode::Left | KeyCode::Right => {
                    let other = match format {
                        ExportFormat::Html => ExportFormat::Markdown,
                        ExportFormat::Markdown => ExportFormat::Html,
                    };
                    let old_ext = format!(".{}", format.extension());
                    if let Some(stem) = path.strip_suffix(&old_ext) {
                        path = format!("{stem}.{}", other.extension());
                    }
                    self.overlay = Some(Overlay::Export {
                        format: other,
                        path,
                    });
                }
                KeyCode::Backspace => {
                    path.pop();
                    self.overlay = Some(Overlay::Export { format, path });
                }
                KeyCode::Char(c) if !ev.modifiers.contains(KeyModifiers::CONTROL) => {
                    path.push(c);
                    self.overlay = Some(Overlay::Export { format, path });
                }
                _ => {}
            },
            Overlay::PickValue { attribute, cursor } => {
                let n = self.session.priors.attributes[attribute].values.len() + 1;
                match ev.code {
                    KeyCode::Esc => self.overlay = None,
                    KeyCode::Down | KeyCode::Char('j') => {
                        self.overlay = Some(Overlay::PickValue {
                            attribute,
                            cursor: (cursor + 1).min(n - 1),
                        })
                    }
                    KeyCode::Up | KeyCode::Char('k') => {
                        self.overlay = Some(Overlay::PickValue {
                            attribute,
                            cursor: cursor.saturating_sub(1),
                        })
                    }
                    KeyCode::PageDown => {
                        self.overlay = Some(Overlay::PickValue {
                            attribute,
                            cursor: (cursor + self.page).min(n - 1),
                        })
                    }
                    KeyCode::PageUp => {
                        self.overlay = Some(Overlay::PickValue {
                            attribute,
                            cursor: cursor.saturating_sub(self.page),
                        })
                    }
                    KeyCode::Home => {
                        self.overlay = Some(Overlay::PickValue {
                            attribute,
                            cursor: 0,
                        })
                    }
                    KeyCode::End => {
                        self.overlay = Some(Overlay::PickValue {
                            attribute,
                            cursor: n - 1,
                        })
                    }
                    KeyCode::Enter => {
                        self.overlay = None;
                        let value = cursor.checked_sub(1);
                        if self.session.set_real_value(attribute, value) {
                            self.status = Some(if self.session.remembers_real_values() {
                                "Saved on this computer only, as you asked; never in a report."
                            } else {
                                "Not saved: kept until you quit (--remember-real-values saves it)."
                            }
                            .into());
                            return self.changed();
                        }
                    }
                    KeyCode::Char(c) if c.is_alphanumeric() => {
                        // Jump to the next value whose label starts with the letter.
                        let attr = &self.session.priors.attributes[attribute];
                        let lc = c.to_lowercase().next().unwrap_or(c);
                        let found = (1..n).map(|k| (cursor + k) % n).find(|&row| {
                            row > 0 && attr.values[row - 1].label.to_lowercase().starts_with(lc)
                        });
                        if let Some(row) = found {
                            self.overlay = Some(Overlay::PickValue {
                                attribute,
                                cursor: row,
                            });
                        }
                    }
                    _ => {}
                }
            }
        }
        Vec::new()
    }
}

/// A typed file name with a leading `~` (alone or followed by `/`) meaning the home
/// folder, as in a shell; `~user` and a `~` later in the name are left as typed.
fn expand_home(typed: &str, home: Option<&std::path::Path>) -> PathBuf {
    match (typed.strip_prefix('~'), home) {
        (Some(""), Some(home)) => home.to_path_buf(),
        (Some(rest), Some(home)) if rest.starts_with('/') => {
            home.join(rest.trim_start_matches('/'))
        }
        _ => PathBuf::from(typed),
    }
}

#[cfg(test)]
mod tests {
    use super::expand_home;
    use std::path::{Path, PathBuf};

    #[test]
    fn a_leading_tilde_is_the_home_folder() {
        let home = Some(Path::new("/home/ada"));
        assert_eq!(
            expand_home("~/reports/me.html", home),
            PathBuf::from("/home/ada/reports/me.html")
        );
        assert_eq!(expand_home("~", home), PathBuf::from("/home/ada"));
        assert_eq!(
            expand_home("~bob/x.html", home),
            PathBuf::from("~bob/x.html")
        );
        assert_eq!(expand_home("a~/x.html", home), PathBuf::from("a~/x.html"));
        assert_eq!(expand_home("~/x.html", None), PathBuf::from("~/x.html"));
    }
}
