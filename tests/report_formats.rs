//! The text, Markdown and HTML reports cover the same sections: what each format says
//! about the evidence sources, the special categories of personal data (GDPR Article
//! 9) and the friend list is there in all three (the HTML page once left all three
//! out). Checked on every demo persona.

use std::path::PathBuf;

use telltale::report::{TextOptions, escape_html, write_html, write_markdown, write_text};
use telltale::scan::{Scan, ScanInput, load_priors};

fn render(name: &str) -> (telltale::report::ScanReport, [String; 3]) {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-exports");
    let mapping = name
        .strip_suffix(".zip")
        .map(|stem| dir.join(format!("{stem}.mapping.toml")));
    let input = ScanInput {
        archive: dir.join(name),
        mapping,
        ..ScanInput::default()
    };
    let mut priors = load_priors(None).unwrap();
    let scan = Scan::run(&input, &mut priors).unwrap();
    let report = scan.report(&priors);
    let (mut t, mut m, mut h) = (Vec::new(), Vec::new(), Vec::new());
    write_text(&report, TextOptions::default(), &mut t).unwrap();
    write_markdown(&report, 15, &mut m).unwrap();
    write_html(&report, 15, &mut h).unwrap();
    let s = |b: Vec<u8>| String::from_utf8(b).unwrap();
    (report, [s(t), s(m), s(h)])
}

#[test]
fn every_format_has_the_sources_special_categories_and_friends() {
    let mut checked = [0usize; 3];
    for name in ["reporter", "organiser", "teacher", "student.zip"] {
        let (report, [text, md, html]) = render(name);
        let html_lower = html.to_lowercase();
        for (i, present, heading) in [
            (0, !report.sources.is_empty(), "evidence sources"),
            (
                1,
                report.special_categories.is_some(),
                "special categories of personal data",
            ),
            (2, report.friends.is_some(), "friends"),
        ] {
            if !present {
                continue;
            }
            checked[i] += 1;
            assert!(
                text.to_lowercase().contains(heading),
                "{name}: text lacks '{heading}'"
            );
            assert!(
                md.to_lowercase().contains(heading),
                "{name}: Markdown lacks '{heading}'"
            );
            assert!(
                html_lower.contains(&format!("<h2>{heading}")),
                "{name}: HTML lacks '{heading}'"
            );
        }
        // Every source's label, and every special-category item by name.
        for s in &report.sources {
            assert!(html.contains(&escape_html(&s.label)), "{name}: {}", s.label);
        }
        // The list is cut after `top` entries in every format (report::cut), with a
        // sentence saying how many were left out.
        if let Some(sp) = &report.special_categories {
            for item in sp.items.iter().take(15) {
                assert!(
                    html.contains(&escape_html(&item.name)),
                    "{name}: {}",
                    item.name
                );
                assert!(md.contains(&item.name) || md.contains(&item.name.replace('|', "\\|")));
            }
        }
        if !report.unmatched.is_empty() {
            let n = report.unmatched.len();
            let line = if n == 1 {
                "1 of your items is not recognised".to_string()
            } else {
                format!("{n} of your items are not recognised")
            };
            assert!(html.contains(&line) && md.contains(&line), "{name}: {line}");
        }
    }
    assert!(
        checked.iter().all(|&n| n > 0),
        "some section never came up: {checked:?}"
    );
}
