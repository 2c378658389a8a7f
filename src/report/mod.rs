//! Pictures (SVG) and reports (HTML, JSON).
//!
//! * [`build`] gathers mass properties, balance, section table and the stress estimate
//!   into a [`Report`] and draws the [`Pictures`].
//! * [`html`] renders a self-contained HTML page with the pictures inline.
//! * [`segments_summary`]: a split blade's segment masses, the net section at each joint
//!   (holes removed) and the stress there, with [`JOINT_CAUTIONS`].
//! * The JSON report is `serde_json` of [`Report`]; its schema is [`SCHEMA`]
//!   (`src/report/schema.json`).
//! * [`preview`]: a shaded 3-D picture (PNG, own software renderer) of a blade or an
//!   assembled rotor with the rotation sense and the wind drawn.
//!
//! Files are written by the command through [`crate::atomic`].

mod build;
mod html;
mod joints;
mod model;
mod planform;
pub mod preview;
mod stack;
mod stress_chart;
mod transition;
mod views;

pub use build::{build, Pictures, ReportError, ReportInput, STEPS};
pub use html::html;
pub use joints::{segments_summary, JointSection, JointStress, SegmentsSummary, JOINT_CAUTIONS};
pub use model::{BalanceSummary, PartSummary, Report, Units, SCHEMA, SCHEMA_ID};
pub use planform::{planform_svg, station_thickness};
pub use preview::{preview_png, render, Image, Item, Marks, PreviewOptions, View};
pub use stack::{stack_svg, AXIS_COLOUR};
pub use stress_chart::stress_svg;
pub use transition::transition_svg;
pub use views::{outline_edges, three_view_svg, CREASE_DEGREES};
