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

fn tables(c: &mut Criterion) {
    let mut group = c.benchmark_group("table");
    group.sample_size(10);
    group.bench_function("10^4 rows, 50 digits", |b| b.iter(|| table(10_000)));
    group.bench_function("10^5 rows, 50 digits", |b| b.iter(|| table(100_000)));
    group.finish();
}

criterion_group!(benches, tables);
criterion_main!(benches);
