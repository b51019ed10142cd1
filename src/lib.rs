//! lategame: late-game passer review for football coaching staffs.
//! Data flows one way: playfile → plays → models → league (scored) →
//! situation → splits → web / api / export / report. No module imports one
//! further up the chain.

pub mod bounded;
pub mod charts;
pub mod cli;
pub mod export;
pub mod fuzz_props;
pub mod layout;
pub mod league;
pub mod models;
pub mod notes;
pub mod numfmt;
pub mod overtime;
pub mod palette;
pub mod playfile;
pub mod plays;
pub mod report;
pub mod sim;
pub mod situation;
pub mod splits;
pub mod stats;
pub mod web;
