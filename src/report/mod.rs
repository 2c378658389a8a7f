//! Pictures (SVG) and reports (HTML, JSON).
//!
//! * [`build`] gathers mass properties, balance, section table and the stress estimate
//!   into a [`Report`] and draws the [`Pictures`].
//! * [`html`] renders a self-contained HTML page with the pictures inline (the preview
//!   PNG as a `data:` URI); its numbers follow [`numbers`].
//! * [`segments_summary`]: a split blade's segment masses, the net section at each joint
//!   (holes removed) and the stress there, with [`JOINT_CAUTIONS`].
//! * The JSON report is `serde_json` of [`Report`]; its schema is [`SCHEMA`]
//!   (`src/report/schema.json`).
//! * [`SummaryRow`], [`summary_csv`], [`summary_json`]: one row per variant of a design
//!   (mass, volume, safety factor, printer fit, time) for a run over its variants.
//! * [`preview`]: a shaded 3-D picture (PNG, own software renderer) of a blade or an
//!   assembled rotor with the rotation sense and the wind drawn.
//!
//! Files are written by the command through [`crate::atomic`].

mod build;
mod datauri;
mod html;
mod joints;
mod model;
pub mod numbers;
mod planform;
pub mod preview;
mod previews;
mod stack;
mod stress_chart;
mod summary;
mod transition;
mod views;

pub use build::{build, Pictures, PreviewPng, ReportError, ReportInput, STEPS};
pub use datauri::{base64, data_uri};
pub use html::html;
pub use joints::{segments_summary, JointSection, JointStress, SegmentsSummary, JOINT_CAUTIONS};
pub use model::{BalanceSummary, PartSummary, Report, Units, SCHEMA, SCHEMA_ID};
pub use planform::{planform_svg, station_thickness};
pub use preview::{preview_png, render, Image, Item, Marks, PreviewOptions, View};
pub use previews::{previews, PREVIEW_VIEW};
pub use stack::{stack_svg, AXIS_COLOUR};
pub use stress_chart::stress_svg;
pub use summary::{summary_csv, summary_json, SummaryError, SummaryRow, COLUMNS};
pub use transition::transition_svg;
pub use views::{outline_edges, three_view_svg, CREASE_DEGREES};
