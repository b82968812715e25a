//! How every report format cuts a long list: the first `top` entries (`--top`, 15 by
//! default on the command line, 25 in the explorer's export), then one line saying how
//! many were left out and how to see them. Text, Markdown and HTML all cut the same
//! lists at the same place with the same words; the JSON report lists everything.

use crate::reading::count;

/// The entries to show of a list of `total`, and the sentence for the rest (`None`
/// when nothing is left out). `what` names one entry and several ("item", "items").
pub fn cut(total: usize, top: usize, what: (&str, &str)) -> (usize, Option<String>) {
    if total <= top {
        return (total, None);
    }
    let left = total - top;
    (
        top,
        Some(format!(
            "… {} not shown: `telltale scan --top {total}` lists all {total}, and `--format json` always lists every one.",
            count(left, what.0, what.1)
        )),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn short_lists_are_whole_and_long_ones_say_how_to_see_the_rest() {
        assert_eq!(cut(15, 15, ("item", "items")), (15, None));
        let (_, one) = cut(16, 15, ("item", "items"));
        assert!(one.expect("one left").contains("… 1 item not shown"));
        let (shown, more) = cut(
            5_518,
            15,
            ("special-category item", "special-category items"),
        );
        assert_eq!(shown, 15);
        let more = more.expect("a line for the rest");
        assert!(
            more.contains("… 5503 special-category items not shown"),
            "{more}"
        );
        assert!(
            more.contains("--top 5518") && more.contains("--format json"),
            "{more}"
        );
    }
}
