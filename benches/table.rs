//! Tables at 50 digits. Goals (see DEVELOPERS.md and the README): 10^5 rows in at most 0.25 s
//! on one core; the Yule–Simon table of 20,000 rows as a whole process within 1.5× of a bare
//! MPFR loop that only multiplies and prints, also run as a whole process.

use std::collections::BTreeMap;

use std::io::Write as _;
use std::process::Command;

use criterion::{criterion_group, Criterion};
use num_bigint::BigInt;

use telescope::algebra::{parse_q, Q};
use telescope::model::build_problem;
use telescope::solve::solve;
use telescope::table::{build_table, build_table_into, TableRequest};

fn table(rows: i64) -> usize {
    let problem = build_problem("n(k)/n(k-1) = (1-rho)(k-1)/(1+(1-rho)k)").unwrap();
    let mut values = BTreeMap::new();
    values.insert("rho".to_string(), parse_q("3/10").unwrap());
    let solution = solve(&problem, &values).unwrap();
    let request = TableRequest {
        from: BigInt::from(1),
        to: BigInt::from(rows),
        digits: 50,
        base_value: Q::from_integer(1.into()),
        check_all: false,
    };
    build_table(&problem, &solution, &request)
        .unwrap()
        .rows
        .len()
}

const YULE_SIMON: &str = "a(k)/a(k-1) = (k-1)/(k+5/2) for k >= 2";

/// The whole table as the CLI makes it: the Yule–Simon rule (k−1)/(k+5/2), 20,000 rows at 50
/// digits, rendered as CSV.
fn yule_simon_csv(rows: i64) -> usize {
    let problem = build_problem(YULE_SIMON).unwrap();
    let solution = solve(&problem, &BTreeMap::new()).unwrap();
    let request = TableRequest {
        from: BigInt::from(1),
        to: BigInt::from(rows),
        digits: 50,
        base_value: Q::from_integer(1.into()),
        check_all: false,
    };
    // As the CLI makes it: rows written as they come, never all held.
    let mut csv = telescope::render::CsvRows::new(request.digits);
    build_table_into(&problem, &solution, &request, &mut csv).unwrap();
    csv.finish().len()
}

/// The baseline the table is measured against: a bare MPFR loop that only multiplies the
/// running product by (k−1)/(k+5/2) and prints every row to 50 digits (no error bound, no
/// sampling, no closed form).
fn bare_mpfr_loop(rows: u32) -> usize {
    let mut out = String::new();
    bare_mpfr_loop_into(rows, &mut out);
    out.len()
}

fn bare_mpfr_loop_into(rows: u32, out: &mut String) {
    use rug::Float;
    use std::fmt::Write;
    let prec = 50 * 34 / 10 + 40;
    let mut a = Float::with_val(prec, 1);
    out.push_str("k,direct\n");
    writeln!(out, "1,{}", a.to_string_radix(10, Some(50))).unwrap();
    for k in 2..=rows {
        a *= k - 1;
        a /= Float::with_val(prec, k) + 2.5f64;
        writeln!(out, "{k},{}", a.to_string_radix(10, Some(50))).unwrap();
    }
}

/// The bare loop as a whole process: this bench binary runs itself with `BARE_LOOP_ROWS` set
/// (see `main`), and the loop prints every row to standard output.
fn bare_loop_process(rows: u32) -> usize {
    let out = Command::new(std::env::current_exe().expect("the bench binary"))
        .env("BARE_LOOP_ROWS", rows.to_string())
        .output()
        .expect("the bench binary runs");
    assert!(out.status.success());
    out.stdout.len()
}

/// `telescope table` as a user runs it: the same rule and rows, CSV on standard output.
fn table_process(rows: u32) -> usize {
    let out = Command::new(env!("CARGO_BIN_EXE_telescope"))
        .args([
            "table",
            YULE_SIMON,
            "--k",
            &format!("1..{rows}"),
            "--digits",
            "50",
            "--format",
            "csv",
        ])
        .output()
        .expect("the binary runs");
    assert!(out.status.success());
    out.stdout.len()
}

fn tables(c: &mut Criterion) {
    let mut group = c.benchmark_group("table");
    group.sample_size(10);
    group.bench_function("10^4 rows, 50 digits", |b| b.iter(|| table(10_000)));
    group.bench_function("10^5 rows, 50 digits", |b| b.iter(|| table(100_000)));
    group.bench_function("yule-simon 20000 rows csv, 50 digits", |b| {
        b.iter(|| yule_simon_csv(20_000))
    });
    group.bench_function("bare MPFR loop 20000 rows, 50 digits", |b| {
        b.iter(|| bare_mpfr_loop(20_000))
    });
    group.bench_function("yule-simon 20000 rows csv, 50 digits, whole process", |b| {
        b.iter(|| table_process(20_000))
    });
    group.bench_function("bare MPFR loop 20000 rows, 50 digits, whole process", |b| {
        b.iter(|| bare_loop_process(20_000))
    });
    group.finish();
}

criterion_group!(benches, tables);

fn main() {
    if let Some(rows) = std::env::var_os("BARE_LOOP_ROWS") {
        let rows = rows.to_string_lossy().parse().expect("a row count");
        let mut out = String::new();
        bare_mpfr_loop_into(rows, &mut out);
        std::io::stdout()
            .lock()
            .write_all(out.as_bytes())
            .expect("stdout");
        return;
    }
    benches();
    Criterion::default().configure_from_args().final_summary();
}
