//! Fuzz target: arbitrary bytes through reading, checking, a small solve
//! and the reports. Any panic is a bug; errors are expected answers.
#![no_main]

use libfuzzer_sys::fuzz_target;

mod exercise;

fuzz_target!(|data: &[u8]| {
    let _ = exercise::exercise(data);
});
