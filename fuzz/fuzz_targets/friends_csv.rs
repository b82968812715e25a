//! Fuzz target: telltale::fuzzing::friends_csv must never panic.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    telltale::fuzzing::friends_csv(data);
});
