//! Fuzz target: telltale::fuzzing::priors_json must never panic.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telltale::fuzzing::priors_json(data);
});
