//! lategame: late-game passer review for football coaching staffs.
//! Data flows one way: playfile → plays → models → league (scored) →
//! situation → splits → web / api / export / report. No module imports one
//! further up the chain.

pub mod charts;
pub mod export;
pub mod playfile;
pub mod plays;
pub mod report;
pub mod situation;
pub mod splits;
pub mod stats;
