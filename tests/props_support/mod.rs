//! The analytic shapes, now in `tests/support/shapes.rs`; kept under this name for the
//! `props_*` tests until they use `support::shapes` (another branch is editing them).

#[path = "../support/shapes.rs"]
mod shapes;
pub use shapes::*;
