//! Arbitrary query strings through the page/API parameter parser.
#![no_main]
libfuzzer_sys::fuzz_target!(|data: &[u8]| lategame::fuzz_props::situation_query(data));
