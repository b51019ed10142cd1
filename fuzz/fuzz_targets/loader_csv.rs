//! Arbitrary bytes as a CSV play file through the loader and validator.
#![no_main]
libfuzzer_sys::fuzz_target!(|data: &[u8]| lategame::fuzz_props::loader_csv(data));
