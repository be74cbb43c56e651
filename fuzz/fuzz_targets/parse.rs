//! cargo-fuzz target `parse`: see `telescope::fuzzing::parse_bytes`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telescope::fuzzing::parse_bytes(data);
});
