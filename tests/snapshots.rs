//! Snapshots of the rendered output (text, LaTeX, JSON) for every model in `examples/`.
//! Reviewed like code: a change here is a change users see.

mod common;
use common::{breakpoint_values, examples};

use std::collections::BTreeMap;

use telescope::model::build_model;
use telescope::piecewise::solve_model;
use telescope::render::{self, SolveLayout};

#[test]
fn every_example_renders_in_every_format() {
    let all = examples();
    assert!(all.len() >= 3);
    for (name, text) in all {
        let model = build_model(&text).unwrap_or_else(|e| panic!("{name}: {e}"));
        if model.is_piecewise() {
            // Breakpoints need values; the example's own comment says which.
            piecewise_snapshots(&name, &model);
            continue;
        }
        let solved = solve_model(&model, &BTreeMap::new()).unwrap();
        let (problem, solution) = (&solved.pieces[0].problem, &solved.pieces[0].solution);
        if render::has_derivation(&model) {
            insta::assert_snapshot!(
                format!("{name}_derivation"),
                render::derivation_text(&model) + &render::derivation_latex(&model)
            );
            insta::assert_json_snapshot!(
                format!("{name}_derivation_json"),
                render::derivation_json(&model)
            );
        }
        insta::assert_snapshot!(
            format!("{name}_text"),
            render::solve_text(problem, solution)
        );
        insta::assert_snapshot!(
            format!("{name}_latex"),
            render::solve_latex(problem, solution)
        );
        insta::assert_json_snapshot!(
            format!("{name}_json"),
            render::solve_json(problem, solution)
        );
        let steps = SolveLayout {
            steps: true,
            standalone: false,
        };
        insta::assert_snapshot!(
            format!("{name}_steps_text"),
            render::solve_text_with(problem, solution, steps)
        );
        insta::assert_snapshot!(
            format!("{name}_steps_latex"),
            render::solve_latex_with(problem, solution, steps)
        );
    }
}

/// A piecewise example solved with every integer breakpoint parameter set to 3, rendered as
/// `telescope solve` prints it (pieces, then the whole model's analysis).
fn piecewise_snapshots(name: &str, model: &telescope::model::Model) {
    let values = breakpoint_values(model);
    let solved = solve_model(model, &values).unwrap_or_else(|e| panic!("{name}: {e}"));
    let analysis = telescope::probability::analyse_model(&solved, &Default::default())
        .unwrap_or_else(|e| panic!("{name}: {e:?}"));
    let report = render::SolveReport {
        analysis: Some(&analysis),
        digits: 30,
        probabilities: &[],
    };
    let layout = render::SolveLayout::default();
    let out = |format| render::solve_report(model, &solved, &report, format, layout);
    insta::assert_snapshot!(format!("{name}_text"), out(render::SolveFormat::Text));
    insta::assert_snapshot!(format!("{name}_latex"), out(render::SolveFormat::Latex));
    let json: serde_json::Value = serde_json::from_str(&out(render::SolveFormat::Json)).unwrap();
    insta::assert_json_snapshot!(format!("{name}_json"), json);
}
