//! Fuzz target: telltale::fuzzing::mapping must never panic.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telltale::fuzzing::mapping(data);
});
