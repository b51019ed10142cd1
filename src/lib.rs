//! lategame: late-game passer review for football coaching staffs.
//! Data flows one way: playfile → plays → models → scored → situation →
//! splits → web / report. No module imports one further up the chain.

pub mod models;
pub mod playfile;
pub mod plays;
