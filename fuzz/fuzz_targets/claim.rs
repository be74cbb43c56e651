//! cargo-fuzz target `claim`: see `telescope::fuzzing::claim_check`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telescope::fuzzing::claim_check(data);
});
