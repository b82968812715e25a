//! Drafting a mapping from an archive's structure (`telltale mapping draft`): inspect
//! every data file for sets of records, guess what each set is and which fields hold
//! the name, id, category and date, and write a commented TOML draft for the user to
//! check. It works from shapes, values and generic words only — no file name of any
//! real platform is known here.

mod assemble;
mod guess;
mod inspect;
mod paths;
mod write;

pub use assemble::{Draft, DraftSource, draft, draft_from};
pub use guess::{KindGuess, Roles, assign_roles, attribute_fields, guess_kind};
pub use inspect::{FieldProfile, Inspection, RecordSet, Step, inspect};
pub use paths::{escape_glob, field_path, records_path};
