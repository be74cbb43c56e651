//! Replays the cargo-fuzz seed corpora (`fuzz/corpus/`) through the same entry functions as
//! the fuzz targets (`telescope::fuzzing`), so that CI exercises every target on stable Rust
//! without libFuzzer. A panic here is a fuzz finding.

use std::fs;
use std::path::Path;

fn replay(target: &str, run: fn(&[u8])) -> usize {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz/corpus")
        .join(target);
    let mut count = 0;
    let mut entries: Vec<_> = fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .map(|e| e.unwrap().path())
        .collect();
    entries.sort();
    for path in entries {
        let data = fs::read(&path).unwrap();
        run(&data);
        count += 1;
    }
    count
}

#[test]
fn parse_corpus() {
    assert!(replay("parse", telescope::fuzzing::parse_bytes) > 100);
}

#[test]
fn model_corpus() {
    assert!(replay("model", telescope::fuzzing::model_pipeline) > 100);
}

#[test]
fn claim_corpus() {
    assert!(replay("claim", telescope::fuzzing::claim_check) >= 9);
}
