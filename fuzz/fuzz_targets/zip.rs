//! Fuzz target: telltale::fuzzing::zip must never panic.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telltale::fuzzing::zip(data);
});
