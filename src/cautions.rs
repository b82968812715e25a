//! The cautions every report and screen carries (what the figures are and are not, and
//! where people at serious risk should turn).

/// Short title for the cautions block.
pub const TITLE: &str = "Before you act on this";

/// The cautions, one sentence each.
pub const CAUTIONS: [&str; 5] = [
    "telltale runs on this computer only: it sends nothing anywhere and needs no network.",
    "Its figures are estimates from reference statistics, not a record of what any particular platform, person or agency knows about you.",
    "Hiding an item changes what others can see from now on; it does not erase what a platform or a third party has already collected or copied.",
    "If you are at serious risk (from a partner, an employer, a government or anyone else), also get help from a digital-security professional or a local support organisation; do not rely on this tool alone.",
    "Your archive holds other people's personal data (friends' names and details): handle and share it, and any report naming them, with care.",
];

/// The warning at the top of every output made knowing the person's real values
/// (plan reports, the explorer's export with such a plan).
pub const REAL_VALUES_WARNING: &str = "PRIVATE: made knowing your real values. Which items it hides, and why, can let a reader work out what you told telltale about yourself. Keep it to yourself: do not share, print, upload or send it.";

/// Added to [`REAL_VALUES_WARNING`] when the person asked for their real values in full.
pub const REAL_VALUES_SHOWN: &str =
    "It names your real values in full, as you asked (--show-real-values).";
