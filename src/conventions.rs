//! Geometric conventions, written once. Every module follows them.
//!
//! # Units
//! Millimetres and degrees at the edges (files, command line, reports); radians inside
//! computations. Design files may state metres or inches; they are converted on reading.
//!
//! # Section frame
//! Unit chord, leading edge at (0, 0), trailing edge at (1, 0); points run from the upper
//! trailing edge over the upper surface to the leading edge and back along the lower
//! surface (counter-clockwise). See [`crate::airfoil::Section`].
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
