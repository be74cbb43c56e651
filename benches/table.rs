//! Tables at 50 digits. Goal (see DEVELOPERS.md): 10^5 rows in at most 0.25 s on one core.

use std::collections::BTreeMap;

use criterion::{criterion_group, criterion_main, Criterion};
use num_bigint::BigInt;

use telescope::algebra::{parse_q, Q};
use telescope::model::build_problem;
use telescope::solve::solve;
use telescope::table::{build_table, TableRequest};

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
    let table = build_table(&problem, &solution, &request).unwrap();
    telescope::render::table_csv(&table).len()
}

/// The baseline the table is measured against: a bare MPFR loop that only multiplies the
/// running product by (k−1)/(k+5/2) and prints every row to 50 digits (no error bound, no
/// sampling, no closed form).
fn bare_mpfr_loop(rows: u32) -> usize {
    use rug::Float;
    use std::fmt::Write;
    let prec = 50 * 34 / 10 + 40;
    let mut a = Float::with_val(prec, 1);
    let mut out = String::from("k,direct\n");
    writeln!(out, "1,{}", a.to_string_radix(10, Some(50))).unwrap();
    for k in 2..=rows {
        a *= k - 1;
        a /= Float::with_val(prec, k) + 2.5f64;
        writeln!(out, "{k},{}", a.to_string_radix(10, Some(50))).unwrap();
    }
    out.len()
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
    group.finish();
}

criterion_group!(benches, tables);
criterion_main!(benches);
