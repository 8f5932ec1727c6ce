//! Running a case: the library's [`flashduty::case::run`], shared by every front end.

pub use flashduty::case::run::*;
