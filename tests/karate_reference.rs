//! The friend vote against networkx on Zachary's karate club graph (Zachary 1977, as
//! networkx's karate_club_graph ships it, edge weights included). For every member,
//! telltale's weighted-vote relational neighbour predicts the faction from the
//! neighbours' factions; the predictions must equal networkx's leave-one-out harmonic
//! function (tests/python/gen_karate.py writes them to tests/data/karate.json), and so
//! must the accuracy.

use serde_json::Value;
use telltale::evidence::relational_neighbour;
use telltale::stats::argmax;

#[test]
fn friend_vote_matches_networkx_on_the_karate_club() {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/karate.json"
    ))
    .expect("tests/data/karate.json is checked in");
    let f: Value = serde_json::from_str(&text).unwrap();
    let factions: Vec<&str> = f["factions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect();
    let class = |s: &str| factions.iter().position(|x| *x == s).unwrap();
    let n = f["nodes"].as_u64().unwrap() as usize;
    let club: Vec<usize> = f["club"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| class(v.as_str().unwrap()))
        .collect();
    let mut neighbours: Vec<Vec<(usize, f64)>> = vec![Vec::new(); n];
    for e in f["edges"].as_array().unwrap() {
        let (u, v) = (
            e[0].as_u64().unwrap() as usize,
            e[1].as_u64().unwrap() as usize,
        );
        let w = e[2].as_f64().unwrap();
        neighbours[u].push((v, w));
        neighbours[v].push((u, w));
    }
    let mut correct = 0;
    for node in 0..n {
        let votes: Vec<(usize, f64)> = neighbours[node]
            .iter()
            .map(|&(m, w)| (club[m], w))
            .collect();
        let shares =
            relational_neighbour(&votes, factions.len()).expect("every member has friends");
        // Ties go to the first faction, as numpy's argmax in networkx does.
        let predicted = argmax(&shares).0;
        let expected = class(f["predicted"][node].as_str().unwrap());
        assert_eq!(predicted, expected, "member {node}: shares {shares:?}");
        correct += usize::from(predicted == club[node]);
    }
    // Source: networkx 3.6.1 harmonic_function, leave-one-out (gen_karate.py).
    assert_eq!(correct as u64, f["correct"].as_u64().unwrap());
    let accuracy = correct as f64 / n as f64;
    assert!((accuracy - f["accuracy"].as_f64().unwrap()).abs() < 1e-12);
    assert_eq!(correct, 33, "33 of 34 members, as networkx finds");
}
