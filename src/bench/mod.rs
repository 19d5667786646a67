//! The bench stage: the engineering after synthesis, as plain data.
//!
//! Given a ranked design (from `search`), this stage confirms it with the
//! independent nodal solver (`crosscheck`), sizes its capacitors (`caps`),
//! works out each part's duty, the ratings to buy and the cautions
//! (`ratings`), and gathers every number the outputs print into views
//! (`summary` for the ranked table and JSON, `view` for one design taken to
//! the bench). `report` formats these views and `cli` prints or writes them;
//! neither computes.
//!
//! This stage computes; it prints nothing and writes no file.

pub mod bias;
pub mod bom;
pub mod caps;
pub mod crosscheck;
pub mod deck;
pub mod ratings;
pub mod response;
pub mod summary;
pub mod view;

pub use view::{bench_view, BenchView};
