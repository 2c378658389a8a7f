//! Geometric conventions, written once. Every module follows them.
//!
//! # Units
//! Millimetres and degrees at the edges (files, command line, reports); radians inside
//! computations. Design files may state metres or inches; they are converted on reading.
//!
//! # Section frame
//! Unit chord along the **chord line**, the x axis from (0, 0) to the trailing edge at
//! (1, 0) (the midpoint of a blunt trailing edge); y toward the upper surface. Twist,
//! stacking fraction, thickness and camber all refer to this line. Which line of the
//! outline it is depends only on where the section comes from, one rule everywhere:
//!
//! * **Generated NACA 4- and 5-digit sections**: the published chord line, from the mean
//!   line's origin to the trailing edge (NACA Reports 460 and 537); their tabulated
//!   ordinates, camber and thickness refer to it.
//! * **Coordinate files already normalised** (the outline passes within
//!   [`NORMALISED_TOLERANCE`](crate::airfoil::NORMALISED_TOLERANCE) = 1e-3 chord of
//!   (0, 0) and the trailing-edge midpoint lies that close to (1, 0)): the file's own x
//!   axis; the coordinates are kept as given. The files in `profiles/` are written this
//!   way, in the published frame, so a file and the designation it holds give the same
//!   blade.
//! * **Any other coordinate file** (in millimetres, turned, shifted): normalised. The
//!   chord line is drawn from the trailing-edge midpoint to the point of the outline
//!   farthest from it, and a similarity (move, turn, uniform scale) puts those two points
//!   on (0, 0) and (1, 0).
//!
//! [`Section::chord_line`](crate::airfoil::Section::chord_line) records which, and
//! `spanwright section measure` prints it. The leading-edge point, where the upper and
//! lower surface meet, is the outline's foremost point (smallest x): (0, 0) for a section
//! normalised to its farthest point, a little ahead of and above it for a cambered NACA
//! section (about (-0.0003, 0.003) for a 4412). Points run from the upper trailing edge
//! over the upper surface to the leading edge and back along the lower surface
//! (counter-clockwise). See [`crate::airfoil::Section`].
//!
//! # Blade frame (right-handed, millimetres)
//!
//! ```text
//!             z (span: radius from the rotor axis, root at small z, tip at large z)
//!             ^
//!             |   tip
//!          .--+--.
//!          |  |  |     the blade turns toward -x (its leading edge leads),
//!          |  |  |     so the rotor turns about -y ...
//!   LE  <- |  o  | -> TE        o = stacking axis (x = 0, y = 0 before offsets)
//!          '--+--'
//!             +-------> x (chordwise, leading edge -> trailing edge at zero twist)
//!            /
//!           y (along the rotor axis, pointing downstream: the way the flow goes)
//! ```
//!
//! * The rotor axis is the line x = 0, z = 0 (along y). The flow moves toward +y.
//! * Every section lies in a plane z = radius; its stacking point sits on the z axis,
//!   moved by the station's sweep (+x) and prebend (+y) offsets. The stacking point is
//!   one of (`blade.stacking`, per station `station[i].stacking`, see
//!   [`crate::design::Stacking`]):
//!   - a chord fraction `f`: the point `(f, 0)` on the chord line;
//!   - the quarter chord `(0.25, 0)`, the default: the aerodynamic centre of thin-airfoil
//!     theory (Abbott & von Doenhoff, *Theory of Wing Sections*, 1959, ch. 4);
//!   - the area centroid of the section `(s_cx, s_cy)` (off the chord line when the
//!     section is cambered): each section's centrifugal force then passes through the
//!     axis and does not bend a straight blade (common practice);
//!   - the thickest point `(x_t, 0)`: on the chord line below the largest thickness.
//!
//!   Named rules are found on each section's own shape; between stations see
//!   [`crate::blade::stacking`].
//! * The section's leading edge points toward -x, the direction of motion, so the
//!   blade as built turns **counter-clockwise seen from upstream**. A clockwise rotor is
//!   the mirror image in x (the mesh is re-oriented so it still faces outward).
//! * Turbine: the pressure (lower) side faces upstream (-y), the suction (upper) side
//!   downstream (+y). Propeller or fan: the suction side faces upstream (-y).
//! * Twist (and pitch): positive turns the leading edge toward upstream (-y), a rotation
//!   about the stacking point in the section plane. With twist theta, the chord line makes
//!   the angle theta with the plane of rotation (the x-z plane).
//!
//! A section point `(s_x, s_y)` (unit chord) at a station with chord `c`, twist `theta`,
//! stacking point `(f_x, f_y)` (unit chord; `f_y = 0` except for the centroid), sweep
//! `d_x` and prebend `d_y` lands at
//!
//! ```text
//! u = (s_x - f_x) * c,   v = side * (s_y - f_y) * c   side = +1 turbine, -1 propeller
//! x = u cos(theta) - v sin(theta) + d_x              (a right-hand rotation about +z)
//! y = u sin(theta) + v cos(theta) + d_y              (leading edge u < 0 goes to -y)
//! z = radius
//! ```
//! then `x -> -x` for a clockwise rotor.
//!
//! # Smallest triangle
//! A triangle is degenerate when its area is below [`DEGENERATE_AREA`] `* d²`, `d` the
//! diagonal of its mesh's bounding box: relative, so it holds in any unit and size, and
//! about where single-precision STL (24-bit mantissas) stops telling a thin triangle's
//! corners apart. The solid check refuses such triangles; the tessellation merges grid
//! vertices well before a cell gets that thin.

/// Relative area below which a triangle counts as degenerate (see the module docs).
pub const DEGENERATE_AREA: f64 = 1e-12;
