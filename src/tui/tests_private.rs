//! The explorer's export and saved decisions when the person has stated real values:
//! the exported document starts with the private warning and no figure beside "your
//! value" lets a reader work the value out; one set of alert levels runs through the
//! whole document; the goal chosen with `g` comes back on reopening.

use telltale::reading::percent;
use telltale::whatif::Session;

use super::app::{App, ExportFormat, Goal};
use super::tests::{finish_plan, persona, press};

/// Every place "your value" appears, with what follows it on the line.
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

fn value(app: &App, attribute: &str, id: &str) -> (usize, usize) {
    let a = app
        .session
        .priors
        .attributes
        .iter()
        .position(|x| x.id == attribute)
        .expect("attribute");
    let v = app.session.priors.attributes[a]
        .value_index(id)
        .expect("value");
    (a, v)
}

#[test]
fn export_made_knowing_real_values_warns_first_and_gives_no_figure_away() {
    let dir = tempfile::tempdir().unwrap();
    let mut app = App::new(persona("teacher"));
    // Real values that are and are not the observer's guess.
    let guess_politics = app
        .session
        .exposure()
        .posterior(value(&app, "politics", "left").0);
    let (pol, _) = value(&app, "politics", "left");
    let other = (guess_politics.best + 1) % app.session.priors.attributes[pol].values.len();
    app.session.set_real_value(pol, Some(other));
    let (rel, jewish) = value(&app, "religion", "jewish");
    app.session.set_real_value(rel, Some(jewish));
    press(&mut app, "3");
    let fx = press(&mut app, "g");
    assert_eq!(app.goal, Goal::RealValue);
    finish_plan(&mut app, &fx);
    let plan = app.current_plan().expect("a plan");
    // The real values' own probabilities, which must not appear beside "your value".
    let mut secret_figures = Vec::new();
    for s in plan.outcome.before.iter().chain(&plan.outcome.after) {
        if let Some(p) = s.true_probability {
            secret_figures.push(percent(p));
        }
    }
    assert!(!secret_figures.is_empty());
    let real_labels = [
        app.session.priors.attributes[pol].values[other]
            .label
            .to_lowercase(),
        app.session.priors.attributes[rel].values[jewish]
            .label
            .to_lowercase(),
    ];
    for (format, name) in [
        (ExportFormat::Markdown, "r.md"),
        (ExportFormat::Html, "r.html"),
    ] {
        let path = dir.path().join(name);
        let msg = super::run::export(&app, format, &path);
        assert!(msg.contains("keep it to yourself"), "{msg}");
        let text = std::fs::read_to_string(&path).unwrap();
        let warning = text
            .find("PRIVATE: made knowing your real values")
            .expect("warning");
        let first_heading = text.find("<h1>").or_else(|| text.find("# ")).unwrap();
        assert!(warning < first_heading, "{name}: the warning comes first");
        for tail in after_your_value(&text) {
            assert!(
                !tail.contains('%'),
                "{name}: a figure beside your value: {tail}"
            );
            for l in &real_labels {
                assert!(
                    !tail.contains(l.as_str()),
                    "{name}: the value named: {tail}"
                );
            }
        }
        assert!(
            !text.contains("your value ") || !text.contains("(your value"),
            "{name}"
        );
    }
    // Without real values in the plan, no warning.
    let mut plain = App::new(persona("teacher"));
    let fx = press(&mut plain, "3");
    finish_plan(&mut plain, &fx);
    let path = dir.path().join("plain.md");
    super::run::export(&plain, ExportFormat::Markdown, &path);
    assert!(!std::fs::read_to_string(&path).unwrap().contains("PRIVATE"));
}

#[test]
fn an_exported_document_uses_one_set_of_alert_levels() {
    let dir = tempfile::tempdir().unwrap();
    let mut app = App::new(persona("teacher"));
    let loc = app
        .session
        .priors
        .attributes
        .iter()
        .position(|a| a.id == "location")
        .expect("location");
    let old = app.session.priors.attributes[loc].threshold;
    let new = (old + 0.05).min(0.95);
    assert!(app.session.set_target(loc, new));
    let fx = press(&mut app, "3");
    finish_plan(&mut app, &fx);
    let plan = &app.current_plan().expect("a plan").report;
    let scan = app.session.report(telltale::report::RowCount::First(5));
    for (s, p) in scan.attributes.iter().zip(&plan.attributes) {
        assert_eq!(s.threshold, p.threshold, "{}", s.id);
    }
    let reading = &scan.attributes[loc].reading;
    assert!(reading.contains(&percent(new)), "{reading}");
    assert!(!reading.contains(&percent(old)), "{reading}");
    let path = dir.path().join("r.md");
    super::run::export(&app, ExportFormat::Markdown, &path);
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(text.contains(reading.as_str()));
}

#[test]
fn the_goal_comes_back_on_reopening() {
    let mut app = App::new(persona("teacher"));
    app.session.set_real_value(0, Some(0));
    press(&mut app, "3g");
    assert_eq!(app.goal, Goal::RealValue);
    let saved = app.decisions();
    assert_eq!(
        saved.goal.as_deref(),
        Some(telltale::decisions::GOAL_REAL_VALUE)
    );
    // Real values were not asked to be saved: they are not in the file.
    assert!(saved.real_values.is_empty());
    let s = &app.session;
    let mut again = App::new(Session::open(s.scan.clone(), s.priors.clone(), &saved));
    again.restore_goal(saved.goal.as_deref());
    assert_eq!(again.goal, Goal::RealValue);
    press(&mut again, "3g");
    assert_eq!(
        again.decisions().goal.as_deref(),
        Some(telltale::decisions::GOAL_BEST_GUESS)
    );
}
