//! Fuzz target: telltale::fuzzing::records must never panic.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telltale::fuzzing::records(data);
});
