//! One module per command: each takes a checked request, asks the library, and hands back a
//! [`Report`](crate::tool::output::report::Report).

pub mod check;
pub mod design;
pub mod plot;
pub mod plot_axes;
pub mod prepare;
pub mod replay;
