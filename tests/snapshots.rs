//! Snapshots of the rendered output (text, LaTeX, JSON) for every model in `examples/`.
//! Reviewed like code: a change here is a change users see.

use std::collections::BTreeMap;

use telescope::model::build_problem;
use telescope::render::{self, SolveLayout};
use telescope::solve::solve;

fn examples() -> Vec<(String, String)> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/examples");
    let mut out: Vec<(String, String)> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .map(|e| e.path())
        .filter(|p| p.extension().map(|x| x == "rule").unwrap_or(false))
        .map(|p| {
            let name = p.file_stem().unwrap().to_string_lossy().into_owned();
            (name, std::fs::read_to_string(&p).unwrap())
        })
        .collect();
    out.sort();
    out
}

#[test]
fn every_example_renders_in_every_format() {
    let all = examples();
    assert!(all.len() >= 3);
    for (name, text) in all {
        let problem = build_problem(&text).unwrap_or_else(|e| panic!("{name}: {e}"));
        let solution = solve(&problem, &BTreeMap::new()).unwrap();
        insta::assert_snapshot!(
            format!("{name}_text"),
            render::solve_text(&problem, &solution)
        );
        insta::assert_snapshot!(
            format!("{name}_latex"),
            render::solve_latex(&problem, &solution)
        );
        insta::assert_json_snapshot!(
            format!("{name}_json"),
            render::solve_json(&problem, &solution)
        );
        let steps = SolveLayout {
            steps: true,
            standalone: false,
        };
        insta::assert_snapshot!(
            format!("{name}_steps_text"),
            render::solve_text_with(&problem, &solution, steps)
        );
        insta::assert_snapshot!(
            format!("{name}_steps_latex"),
            render::solve_latex_with(&problem, &solution, steps)
        );
    }
}
