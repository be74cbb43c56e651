//! `telescope report` of examples/citation_growth.rule with rho = 3/10 (10^4 rows at 30 digits,
//! both plots). Goals (README): the whole process in at most 200 ms, the page at most 500 kB.

use std::process::Command;

use criterion::{criterion_group, criterion_main, Criterion};

use telescope::html_report::{build_report, ReportRequest};
use telescope::render::html::report_html;
use telescope::session::read_input;

const MODEL: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/citation_growth.rule");

fn request() -> ReportRequest {
    ReportRequest {
        input_arg: MODEL.to_string(),
        params: vec!["rho=3/10".to_string()],
        digits: 30,
        k: None,
        terms: 2,
        prob: Vec::new(),
        budget: telescope::budget::Budget::default(),
    }
}

fn page() -> String {
    let input = read_input(MODEL).unwrap();
    report_html(&build_report(&input, &request()).unwrap())
}

fn whole_process() -> usize {
    let out = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args(["report", MODEL, "--param", "rho=3/10", "-o", "-"])
        .output()
        .expect("the binary runs");
    assert!(out.status.success());
    out.stdout.len()
}

fn reports(c: &mut Criterion) {
    let size = page().len();
    assert!(size <= 500_000, "the page has {size} bytes");
    eprintln!("report page: {size} bytes");
    let mut group = c.benchmark_group("report");
    group.sample_size(10);
    group.bench_function("citation_growth rho=3/10, library", |b| b.iter(page));
    group.bench_function("citation_growth rho=3/10, whole process", |b| {
        b.iter(whole_process)
    });
    group.finish();
}

criterion_group!(benches, reports);
criterion_main!(benches);
