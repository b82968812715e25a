//! Outputs made knowing the person's real values (`telltale plan --true …`): every
//! format starts with the private warning, and nothing in it lets a reader work the
//! value out — no name, no probability beside "your value" (so the guess's figure
//! cannot be matched against it), no real value in the JSON. `--show-real-values`
//! puts them in, still under the warning. Error messages never repeat what was given
//! with --true. The HTML page (`--format html`, the explorer's export) carries the
//! warning in its title and before its heading. Run on several demo personas, each real value once as the observer's
//! guess and once not. (The explorer's export: src/tui/tests_private.rs.)

use std::process::{Command, Output};

fn telltale(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(args)
        .output()
        .expect("run telltale")
}

fn ok(o: &Output) -> String {
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// What follows each "your value" on its line (up to 40 characters).
fn after_your_value(text: &str) -> Vec<String> {
    let lower = text.to_lowercase();
    lower
        .match_indices("your value")
        .map(|(i, m)| {
            lower[i + m.len()..]
                .chars()
                .take_while(|c| *c != '\n')
                .take(40)
                .collect()
        })
        .collect()
}

const WARNING: &str = "PRIVATE: made knowing your real values";

/// (persona, attribute, value, the value's label) cases: the guess and not the guess.
fn cases() -> Vec<(&'static str, String, String, String)> {
    let mut out = Vec::new();
    for persona in ["teacher", "reporter", "organiser", "student.zip"] {
        let archive = format!("demo-exports/{persona}");
        let scan: serde_json::Value =
            serde_json::from_str(&ok(&telltale(&["scan", &archive, "--format", "json"])))
                .expect("scan JSON");
        for attr in scan["attributes"].as_array().unwrap() {
            let id = attr["id"].as_str().unwrap();
            if !matches!(id, "politics" | "religion") {
                continue;
            }
            let dist = attr["distribution"].as_array().unwrap();
            let guess = attr["best_guess"].as_str().unwrap();
            let other = dist
                .iter()
                .find(|v| v["id"].as_str() != Some(guess))
                .unwrap();
            for v in [
                dist.iter()
                    .find(|v| v["id"].as_str() == Some(guess))
                    .unwrap(),
                other,
            ] {
                out.push((
                    persona,
                    id.to_string(),
                    v["id"].as_str().unwrap().to_string(),
                    v["label"].as_str().unwrap().to_string(),
                ));
            }
        }
    }
    out
}

#[test]
fn plan_outputs_made_with_a_real_value_warn_first_and_never_give_it_away() {
    let cases = cases();
    assert!(cases.len() >= 8, "{cases:?}");
    for (persona, attr, value, label) in &cases {
        let archive = format!("demo-exports/{persona}");
        let truth = format!("{attr}={value}");
        let threshold = format!("{attr}=30%");
        let base = [
            "plan",
            archive.as_str(),
            "--true",
            truth.as_str(),
            "--threshold",
            threshold.as_str(),
            "--method",
            "greedy",
        ];
        let run = |extra: &[&str]| {
            let mut args = base.to_vec();
            args.extend_from_slice(extra);
            ok(&telltale(&args))
        };
        // The figures that must not appear: the real value's own probabilities.
        let shown: serde_json::Value =
            serde_json::from_str(&run(&["--format", "json", "--show-real-values"])).unwrap();
        assert!(shown["warning"].as_str().unwrap().starts_with(WARNING));
        assert_eq!(shown["real_values"], "shown");
        let full = run(&["--show-real-values"]);
        assert!(full.starts_with("PRIVATE"), "{full}");
        assert!(full.contains("in full"), "{full}");

        let json_text = run(&["--format", "json"]);
        assert!(
            json_text
                .trim_start()
                .starts_with("{\n  \"warning\": \"PRIVATE"),
            "{persona} {truth}: the warning is the JSON's first field"
        );
        let json: serde_json::Value = serde_json::from_str(&json_text).unwrap();
        assert_eq!(json["real_values"], "withheld");
        assert!(
            !json_text.contains("true_value_probability"),
            "{persona} {truth}"
        );
        for a in json["attributes"].as_array().unwrap() {
            if a["id"] == attr.as_str() {
                assert_eq!(a["true_value_given"], true);
            }
        }
        // No reason or obstacle names the real value or gives its figures.
        for item in json["plan"]["items"].as_array().into_iter().flatten() {
            for r in item["reasons"].as_array().unwrap() {
                if r["attribute"] == attr.as_str() {
                    assert_ne!(r["value"], value.as_str(), "{persona} {truth}");
                }
            }
        }
        for b in json["infeasible"]["blocked"]
            .as_array()
            .into_iter()
            .flatten()
        {
            if b["attribute"] == attr.as_str() && b["value_label"] == "your value" {
                assert!(b["probability"].is_null() && b["prior_probability"].is_null());
            }
        }

        // The HTML page (the explorer's export): the warning in its title and before
        // its heading.
        let html = run(&["--format", "html"]);
        assert!(html.contains("<title>PRIVATE: "), "{persona} {truth} html");
        let warned = html.find(&format!("<p class=\"private\"><strong>{WARNING}"));
        let heading = html.find("<h1>");
        assert!(
            warned.is_some() && warned < heading,
            "{persona} {truth} html: the warning before the heading"
        );
        for (format, text) in [
            ("text", run(&[])),
            ("markdown", run(&["--format", "markdown"])),
            ("json", json_text.clone()),
            ("html", html.clone()),
        ] {
            let head = text.trim_start_matches(['>', ' ', '*', '{', '\n', '"']);
            let head = if format == "html" { WARNING } else { head };
            assert!(
                head.starts_with("PRIVATE") || head.starts_with("warning\": \"PRIVATE"),
                "{persona} {truth} {format}: the warning first:\n{}",
                &text[..text.len().min(300)]
            );
            for tail in after_your_value(&text) {
                // No probability: an item's bits toward the value may follow (they
                // say how much one item adds, not where the value stands).
                assert!(
                    !tail.contains('%') && !tail.contains("probab"),
                    "{persona} {truth} {format}: a figure beside your value: {tail}"
                );
                assert!(
                    !tail.contains(&label.to_lowercase()),
                    "{persona} {truth} {format}: the value named: {tail}"
                );
            }
        }
    }
}

#[test]
fn messages_never_repeat_what_was_given_with_true() {
    for (given, secret) in [
        ("religion=jewsh", "jewsh"),
        ("jewish", "jewish"),
        ("relig=jewish", "jewish"),
    ] {
        let o = telltale(&["plan", "demo-exports/teacher", "--true", given]);
        assert!(!o.status.success());
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains("--true"), "{err}");
        assert!(!err.to_lowercase().contains(secret), "{err}");
    }
}
