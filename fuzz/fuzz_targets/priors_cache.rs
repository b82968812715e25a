//! Fuzz target: telltale::fuzzing::priors_cache must never panic.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telltale::fuzzing::priors_cache(data);
});
