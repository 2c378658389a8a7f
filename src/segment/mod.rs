//! Blades longer than the printer: spanwise segments with planar split faces, a spar
//! channel for a rod or tube, and keyed alignment pins (dowels) at every joint.
//!
//! ```text
//!  root face        joint 1                 joint 2                     tip
//!  |==== segment 1 ====|====== segment 2 ======|======= segment 3 ========|
//!  |  ( channel: rod from the root face or a blind start ... blind end )  |
//!        pins : o   o  |  o   o   (keyed: another layout at each joint)
//! ```
//!
//! * [`spec`]: the `[segments]` and `[spar-channel]` tables of a design file.
//! * [`channel`]: the channel's start, axis (a line parallel to the span through the
//!   point that carries it farthest with the wall kept), reach and rod length.
//! * [`plan`]: the fewest segments that fit the printer (the printer-fit stage's own
//!   search, [`crate::fit::fit_part`]) and why each split radius was chosen; or the
//!   radii given.
//! * [`dowels`]: the pins of each joint: inside the section with the wall kept, one-way
//!   and different at every joint.
//! * [`mesh`]: each segment's closed mesh, built on the skin's grid with rows forced at
//!   the splits, planar caps on those rows with the holes as inner loops, and the holes'
//!   walls on the same vertices: watertight by construction.
//!
//! [`segment`] runs them in that order and checks every segment against the printer on
//! all of its vertices. The pipeline certifies each segment with the genus it reports.
//!
//! # Stage
//! Planning asks the printer-fit search, so this stage sits with [`crate::fit`] and
//! [`crate::check`] below the pipeline (see DEVELOPERS.md): it takes plain values (the
//! skin, its grid, the blade model, the root table, a [`Printer`]) and returns meshes
//! and plain data.

pub mod channel;
pub mod dowels;
pub mod mesh;
pub mod outline;
pub mod plan;
pub mod spec;

pub use channel::{plan_channel, AxisRule, Channel, ChannelInput};
pub use dowels::Joint;
pub use mesh::{BuildInput, SegmentMesh};
pub use outline::{Outline, Outlines};
pub use plan::{Avoid, FitTest, Frame, PassedOver, Planner, Split as SplitChoice};
pub use spec::{ChannelSpec, DowelSpec, SegmentsSpec, Split};

use crate::blade::Blade;
use crate::fit::{fit_extents, fit_part, FitOptions, Printer};
use crate::loft::Skin;
use crate::mesh::TriMesh;
use crate::tessellate::TessellateError;
use dowels::{largest_pin, place, JointAsk, NoLayout, PinInput};
use nalgebra::Point3;
use spec::point_depth;

/// Why a blade could not be split, or its channel or pins not placed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SegmentError {
    /// A value of the design's tables (or the command line) is wrong: the key and what
    /// to do.
    #[error("{key}: {message}")]
    Key {
        /// Key path in the design file.
        key: String,
        /// What is wrong and how to fix it.
        message: String,
    },
    /// An automatic split needs a printer.
    #[error("segments.split = \"auto\" needs a printer: add a [printer] table to the design (e.g. volume = [220, 220, 250]), or run `spanwright fit` with --printer or --volume, or give the split radii")]
    NeedsPrinter,
    /// No channel keeps the wall.
    #[error("spar channel: {what} (start {start:.1} mm, wall {min_wall} mm); {}", widest(.widest_rod))]
    ChannelTooThin {
        /// What does not fit.
        what: String,
        /// Radius where the channel starts, mm.
        start: f64,
        /// The widest rod that would, mm.
        widest_rod: Option<f64>,
        /// The wall asked for, mm.
        min_wall: f64,
    },
    /// The pins of a joint do not fit (or cannot be keyed).
    #[error("joint {joint} at {radius:.1} mm: {count} pins of {pin} mm {}; {}", if *.keyed { "fit, but every layout that fits repeats an earlier joint's or fits both ways round" } else { "do not fit inside the section with segments.min-wall kept (to the skin, the spar channel and each other)" }, largest(.largest_pin))]
    PinsDoNotFit {
        /// Joint number from the root.
        joint: usize,
        /// Radius of the joint, mm.
        radius: f64,
        /// Pins asked for.
        count: usize,
        /// Pin diameter asked for, mm.
        pin: f64,
        /// True when pins fit but no keyed layout was found.
        keyed: bool,
        /// The largest pin that would fit there, mm.
        largest_pin: Option<f64>,
    },
    /// No plan within the limits.
    #[error("cannot split the blade: {reason}")]
    NoPlan {
        /// Why, with what to change.
        reason: String,
    },
    /// A segment does not fit the printer.
    #[error("segment {index} of {count} ({from:.1} to {to:.1} mm) does not fit the printer: {overshoot:.1} mm too large in its best orientation; split it further (more or other split radii, or segments.split = \"auto\")")]
    DoesNotFit {
        /// Position from the root, from 1.
        index: usize,
        /// Number of segments.
        count: usize,
        /// Inner end, mm.
        from: f64,
        /// Outer end, mm.
        to: f64,
        /// Smallest overshoot found, mm.
        overshoot: f64,
    },
    /// A segment's mesh could not be built.
    #[error("segment mesh: {0}")]
    Mesh(String),
    /// The skin could not be tessellated with the split rows.
    #[error(transparent)]
    Tessellate(#[from] TessellateError),
    /// A mounting feature could not be cut into the root segment.
    #[error(transparent)]
    Mount(#[from] crate::mount::MountError),
}

fn widest(w: &Option<f64>) -> String {
    match w {
        Some(d) => format!(
            "the widest rod that fits is {:.1} mm (spar-channel.diameter)",
            (d * 10.0).floor() / 10.0
        ),
        None => {
            "no rod fits there with that wall; move the start (spar-channel.start) or thin the wall"
                .into()
        }
    }
}

fn largest(w: &Option<f64>) -> String {
    match w {
        Some(d) => format!("the largest pin that fits there is {:.2} mm (segments.dowels.diameter)", (d * 20.0).floor() / 20.0),
        None => "no pin fits there: move the split (segments.split) toward the root or thin segments.min-wall".into(),
    }
}

impl SegmentError {
    /// An error at a design key.
    pub fn key(key: &str, message: impl Into<String>) -> Self {
        SegmentError::Key {
            key: key.to_string(),
            message: message.into(),
        }
    }

    fn mesh(message: String) -> Self {
        SegmentError::Mesh(format!(
            "{message} (please report this with the design file)"
        ))
    }

    /// True when the input was understood but what it asks cannot be made (exit code
    /// 1): no plan, a segment that does not fit, a channel or pins that do not fit.
    /// Bad values are not (exit code 2).
    pub fn is_failed_check(&self) -> bool {
        !matches!(self, SegmentError::Key { .. } | SegmentError::NeedsPrinter)
    }
}

/// What the stage reads of the built blade (plain values).
#[derive(Debug, Clone, Copy)]
pub struct SegmentInput<'a> {
    /// The blade model.
    pub blade: &'a Blade,
    /// The surface model.
    pub skin: &'a Skin,
    /// The tessellation's columns.
    pub us: &'a [f64],
    /// The tessellation's rows.
    pub vs: &'a [f64],
    /// The built blade's mesh (its root features count in the root segment's fit).
    pub mesh: &'a TriMesh,
    /// Mesh tolerance, mm.
    pub tolerance: f64,
}

/// What is asked: the split, the pins and wall, the channel, the printer.
#[derive(Debug, Clone, PartialEq)]
pub struct Request {
    /// The `[segments]` table (or a plain one from the command line's split).
    pub segments: SegmentsSpec,
    /// The `[spar-channel]` table.
    pub channel: Option<ChannelSpec>,
    /// The printer the segments must fit (needed by an automatic split).
    pub printer: Option<Printer>,
}

/// One segment against the printer: the search's answer on all of its vertices.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct SegmentFit {
    /// True when it fits, margins kept.
    pub fits: bool,
    /// Extents on the bed in the orientation found, mm.
    pub size: [f64; 3],
    /// Largest overshoot, mm (0 when it fits).
    pub overshoot: f64,
}

/// The plan: splits and why, joints, channel (plain data for the commands and reports).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Plan {
    /// Number of segments (1: the blade is not split).
    pub count: usize,
    /// True when the splits were found for the printer.
    pub automatic: bool,
    /// The splits, root to tip, and why each is where it is.
    pub splits: Vec<SplitChoice>,
    /// One per split.
    pub joints: Vec<Joint>,
    /// The spar channel.
    pub channel: Option<Channel>,
    /// The printer the segments were fitted to.
    pub printer: Option<Printer>,
    /// Each segment against the printer (with a printer).
    pub fits: Vec<SegmentFit>,
    /// Printer-fit searches run while planning.
    pub searches: usize,
}

/// A segmented blade: the plan and each segment's mesh.
#[derive(Debug, Clone)]
pub struct Segmented {
    /// The plan.
    pub plan: Plan,
    /// The segments, root first (one: the whole blade with its channel).
    pub segments: Vec<SegmentMesh>,
}

/// Plans and builds the segments (see the module docs).
///
/// # Errors
/// [`SegmentError`]: bad values (exit 2), or a plan, channel, pins or fit that cannot be
/// made (exit 1, [`SegmentError::is_failed_check`]).
pub fn segment(input: &SegmentInput<'_>, request: &Request) -> Result<Segmented, SegmentError> {
    request.segments.validate()?;
    let mut slack = plan::PLAN_SLACK;
    for attempt in 0..3 {
        let out = attempt_plan(input, request, slack)?;
        let printer_ok = out.plan.fits.iter().all(|f| f.fits);
        if printer_ok {
            return Ok(out);
        }
        let bad = out
            .plan
            .fits
            .iter()
            .position(|f| !f.fits)
            .unwrap_or_default();
        let given = !matches!(request.segments.split, Split::Auto);
        if given || attempt == 2 {
            let s = &out.segments[bad];
            return Err(SegmentError::DoesNotFit {
                index: s.index,
                count: s.count,
                from: s.from,
                to: s.to,
                overshoot: out.plan.fits[bad].overshoot,
            });
        }
        slack *= 3.0;
    }
    unreachable!("the loop returns on its last attempt")
}

/// One plan with the planning slack `slack`, built and fitted.
fn attempt_plan(
    input: &SegmentInput<'_>,
    request: &Request,
    slack: f64,
) -> Result<Segmented, SegmentError> {
    let planning = Planning::new(input, request)?;
    let Splits {
        automatic,
        splits,
        searches,
    } = planning.splits(slack)?;
    let channel = planning.channel_clear_of(&splits)?;
    let joints = planning.joints(&splits, channel.as_ref())?;
    let segments = planning.build(&splits, channel.as_ref(), &joints)?;
    let fits = fit_segments(&segments, request.printer.as_ref());
    Ok(Segmented {
        plan: Plan {
            count: segments.len(),
            automatic,
            splits,
            joints,
            channel,
            printer: request.printer,
            fits,
            searches,
        },
        segments,
    })
}

/// What one plan works from: the blade's outlines and the channel as planned before
/// the splits.
struct Planning<'a> {
    input: &'a SegmentInput<'a>,
    request: &'a Request,
    /// The grid rows' outlines.
    outlines: Outlines,
    /// Radius of the part's outer end, mm.
    part_end: f64,
    /// The spar channel as planned before the splits are known.
    planned: Option<Channel>,
}

/// The splits of a plan.
struct Splits {
    /// True when they were found for the printer.
    automatic: bool,
    /// Root to tip.
    splits: Vec<SplitChoice>,
    /// Printer-fit searches run to find them.
    searches: usize,
}

impl<'a> Planning<'a> {
    /// The outlines and the planned channel.
    fn new(input: &'a SegmentInput<'a>, request: &'a Request) -> Result<Self, SegmentError> {
        let outlines = Outlines::of_grid(input.skin, input.us, input.vs);
        let (_, part_end) = outlines.span();
        let mut planning = Planning {
            input,
            request,
            outlines,
            part_end,
            planned: None,
        };
        planning.planned = match &request.channel {
            Some(c) => Some(plan_channel(&planning.channel_input(), c)?),
            None => None,
        };
        Ok(planning)
    }

    fn spec(&self) -> &'a SegmentsSpec {
        &self.request.segments
    }

    fn channel_input(&self) -> ChannelInput<'_> {
        let blade = self.input.blade;
        ChannelInput {
            skin: self.input.skin,
            us: self.input.us,
            outlines: &self.outlines,
            root: blade.root(),
            root_face: blade.root_face(),
            tolerance: self.input.tolerance,
        }
    }

    fn pin_input<'c>(&'c self, channel: Option<&'c Channel>) -> PinInput<'c> {
        PinInput {
            blade: self.input.blade,
            skin: self.input.skin,
            us: self.input.us,
            outlines: &self.outlines,
            channel,
            tolerance: self.input.tolerance,
        }
    }

    /// How far a joint's pins reach into a segment: the hole and its drill point, mm.
    fn pin_reach(&self) -> f64 {
        let spec = self.spec();
        spec.dowels.depth + point_depth(spec.pin_hole_radius(), spec.dowels.point_angle)
    }

    /// Where splits may go: clear of the root's features, the tip and the planned
    /// channel's start.
    fn frame(&self) -> Frame<'_> {
        let blade = self.input.blade;
        let root = blade.root();
        let face = blade.root_face();
        let pin_reach = self.pin_reach();
        let wall = self.spec().min_wall;
        let features = channel::root_features_end(root, face).max(blade.skin_start());
        let mut joint_lo = features + pin_reach + wall;
        if let Some(c) = self.planned.as_ref().filter(|c| !c.opens_at_root) {
            joint_lo = joint_lo.max(c.start + c.engagement());
        }
        let joint_range = (joint_lo, self.part_end - pin_reach - wall);
        let transition = root.map(|r| {
            let first = blade.root_radius();
            (first - r.transition_length, first)
        });
        Frame {
            skin: self.input.skin,
            us: self.input.us,
            outlines: &self.outlines,
            mesh: self.input.mesh,
            part_start: face,
            skin_start: blade.skin_start(),
            part_end: self.part_end,
            joint_range,
            transition,
            min_length: 2.0 * pin_reach + wall,
            first_joint_max: self.planned.as_ref().map(|c| c.end - c.engagement()),
        }
    }

    /// Whether a joint at `r` could take its pins (with the planned channel).
    fn can_join(&self, pin_input: &PinInput<'_>, r: f64) -> bool {
        let spec = self.spec();
        let crosses = |c: &Channel| {
            (c.opens_at_root || c.start + c.engagement() <= r + 1e-9)
                && c.end >= r + c.engagement() - 1e-9
        };
        let through = self.planned.as_ref().is_some_and(crosses);
        let n = spec.dowels.count.unwrap_or(if through { 2 } else { 3 });
        (n + usize::from(through) >= 3)
            && place(
                pin_input,
                spec,
                JointAsk {
                    radius: r,
                    index: 1,
                    count: n,
                    channel: through,
                },
                &[],
                None,
            )
            .is_ok()
    }

    /// The splits: none, the given ones, or the fewest that fit the printer (with its
    /// margin widened by `slack`); root to tip.
    fn splits(&self, slack: f64) -> Result<Splits, SegmentError> {
        let frame = self.frame();
        let (automatic, mut splits, searches) = match &self.spec().split {
            Split::None => (false, Vec::new(), 0),
            Split::At(radii) => (false, given_splits(radii, &frame)?, 0),
            Split::Auto => {
                let printer = self
                    .request
                    .printer
                    .as_ref()
                    .ok_or(SegmentError::NeedsPrinter)?;
                let pin_input = self.pin_input(self.planned.as_ref());
                let can_join = |r: f64| self.can_join(&pin_input, r);
                let test = FitTest::new(&frame, printer, slack);
                let planner = Planner::new(&frame, &test, &can_join);
                let splits = planner.plan(self.spec().max_count)?;
                (true, splits, test.calls())
            }
        };
        splits.sort_by(|a, b| a.radius.total_cmp(&b.radius));
        Ok(Splits {
            automatic,
            splits,
            searches,
        })
    }

    /// The planned channel ended clear of every split: not within its wall and drill
    /// point below a split, nor a rod's engagement beyond it (it then stops below);
    /// checked that a rod can reach it.
    fn channel_clear_of(&self, splits: &[SplitChoice]) -> Result<Option<Channel>, SegmentError> {
        let channel = self.planned.clone().map(|mut c| {
            for s in splits.iter().rev() {
                let r = s.radius;
                if c.end > r - c.min_wall - c.point_depth && c.end < r + c.engagement() {
                    c.end = r - c.min_wall - c.point_depth;
                }
            }
            channel::finish(c, &self.outlines.rows)
        });
        check_channel(channel.as_ref(), splits, || {
            let r = splits[0].radius;
            let spec = self.request.channel.as_ref()?;
            channel::widest_reaching(&self.channel_input(), spec, r)
        })?;
        Ok(channel)
    }

    /// The joints' pins, root to tip, each keyed against the earlier ones.
    fn joints(
        &self,
        splits: &[SplitChoice],
        channel: Option<&Channel>,
    ) -> Result<Vec<Joint>, SegmentError> {
        let spec = self.spec();
        let pin_input = self.pin_input(channel);
        let mut joints: Vec<Joint> = Vec::new();
        for (k, s) in splits.iter().enumerate() {
            let r = s.radius;
            let through = channel.is_some_and(|c| c.start < r && c.end > r);
            let n = spec.dowels.count.unwrap_or(if through { 2 } else { 3 });
            if n + usize::from(through) < 3 {
                return Err(SegmentError::key(
                    "segments.dowels.count",
                    format!("{n} pins at joint {} ({r:.1} mm), which the spar channel does not cross: two pins alone fit either way round; use 3 or more", k + 1),
                ));
            }
            let ask = JointAsk {
                radius: r,
                index: k + 1,
                count: n,
                channel: through,
            };
            match place(&pin_input, spec, ask, &joints, None) {
                Ok(j) => joints.push(j),
                Err(why) => {
                    return Err(SegmentError::PinsDoNotFit {
                        joint: k + 1,
                        radius: r,
                        count: n,
                        pin: spec.dowels.diameter,
                        keyed: why == NoLayout::NotKeyed,
                        largest_pin: largest_pin(&pin_input, spec, ask, &joints),
                    })
                }
            }
        }
        Ok(joints)
    }

    /// Each segment's mesh.
    fn build(
        &self,
        splits: &[SplitChoice],
        channel: Option<&Channel>,
        joints: &[Joint],
    ) -> Result<Vec<SegmentMesh>, SegmentError> {
        let blade = self.input.blade;
        let radii: Vec<f64> = splits.iter().map(|s| s.radius).collect();
        mesh::build(
            &BuildInput {
                skin: self.input.skin,
                us: self.input.us,
                vs: self.input.vs,
                root: blade.root(),
                root_face: blade.root_face(),
                tolerance: self.input.tolerance,
            },
            &radii,
            channel,
            joints,
        )
    }
}

/// Each segment against the printer, in parallel (none for a single segment or without
/// a printer).
fn fit_segments(segments: &[SegmentMesh], printer: Option<&Printer>) -> Vec<SegmentFit> {
    match printer {
        Some(p) if segments.len() > 1 => std::thread::scope(|scope| {
            let handles: Vec<_> = segments
                .iter()
                .map(|s| scope.spawn(move || segment_fit(&s.hull, p)))
                .collect();
            handles
                .into_iter()
                .map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)))
                .collect()
        }),
        _ => Vec::new(),
    }
}

/// The printer-fit search on a segment's hull points, with its default options (the
/// smallest overshoot from the full search when it does not fit).
fn segment_fit(points: &[Point3<f64>], printer: &Printer) -> SegmentFit {
    if let Some(size) = fit_extents(points, printer, &FitOptions::DEFAULT) {
        return SegmentFit {
            fits: true,
            size,
            overshoot: 0.0,
        };
    }
    let cloud = TriMesh {
        vertices: points.to_vec(),
        triangles: Vec::new(),
    };
    match fit_part("segment", &cloud, printer, &FitOptions::DEFAULT) {
        Ok(f) => SegmentFit {
            fits: f.fits,
            size: f.size,
            overshoot: f.overshoot,
        },
        Err(_) => SegmentFit {
            fits: false,
            size: [0.0; 3],
            overshoot: f64::INFINITY,
        },
    }
}

/// Split radii given in the design or on the command line, checked against where joints
/// can be.
fn given_splits(radii: &[f64], frame: &Frame<'_>) -> Result<Vec<SplitChoice>, SegmentError> {
    let mut r: Vec<f64> = radii.to_vec();
    r.sort_by(f64::total_cmp);
    let (lo, hi) = frame.joint_range;
    for &x in &r {
        if x < lo - 1e-9 || x > hi + 1e-9 {
            return Err(SegmentError::key(
                "segments.split",
                format!("{x:.1} mm: a joint can lie from {lo:.1} to {hi:.1} mm (its pins, with their drill points and the wall, must clear the root's features and the tip)"),
            ));
        }
    }
    for w in r.windows(2) {
        if w[1] - w[0] < frame.min_length {
            return Err(SegmentError::key(
                "segments.split",
                format!(
                    "{:.1} and {:.1} mm are {:.1} mm apart: segments between two joints need at least {:.1} mm for the pins of both ends",
                    w[0],
                    w[1],
                    w[1] - w[0],
                    frame.min_length
                ),
            ));
        }
    }
    Ok(r.into_iter()
        .map(|radius| SplitChoice {
            radius,
            given: true,
            window: None,
            target: None,
            passed_over: Vec::new(),
        })
        .collect())
}

/// A channel must be reachable (open at the root face or crossing a split) and, on a
/// split blade, join the first joint; `widest()` finds the widest rod that would.
fn check_channel(
    channel: Option<&Channel>,
    splits: &[SplitChoice],
    widest: impl FnOnce() -> Option<f64>,
) -> Result<(), SegmentError> {
    let Some(c) = channel else { return Ok(()) };
    match splits.first().map(|s| s.radius) {
        None if !c.opens_at_root => Err(SegmentError::key(
            "spar-channel.start",
            format!("the channel starts inside the blade at {:.1} mm (the root's flange, bore or cross holes own the root face), so no rod could be put in: split the blade ([segments]) or remove those features so the channel opens at the root face", c.start),
        )),
        Some(r) if c.end < r + c.engagement() - 1e-9 => Err(SegmentError::ChannelTooThin {
            what: format!(
                "the channel ends at {:.1} mm, before the first joint at {r:.1} mm plus a rod's engagement of {:.1} mm: it would join nothing",
                c.end,
                c.engagement()
            ),
            start: c.start,
            widest_rod: widest(),
            min_wall: c.min_wall,
        }),
        _ => Ok(()),
    }
}
