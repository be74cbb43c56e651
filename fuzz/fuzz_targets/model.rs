//! cargo-fuzz target `model`: see `telescope::fuzzing::model_pipeline`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telescope::fuzzing::model_pipeline(data);
});
