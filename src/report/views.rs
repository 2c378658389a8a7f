//! Three-view drawing of a part with its overall dimensions.
//!
//! Each view draws the outline edges of the mesh seen along one axis: silhouette edges
//! (one neighbouring triangle faces the viewer, the other faces away), open edges, and
//! creases sharper than [`CREASE_DEGREES`]. No hidden-line removal.
//!
//! Layout (third-angle style, views aligned): the plan view (looking downstream, along
//! +y: radius z to the right, chordwise x up) at the top left, the edge view (looking
//! along -x: z to the right, y up) below it, the end view from the tip (looking along -z:
//! y to the right, x up) on the right. One scale for all three, as large as the width
//! allows with every view and its title inside the picture; the picture is as tall as
//! its views (at most 900 px wide).
//!
//! When the stacking axis is given (points root to tip in the blade frame, see
//! [`crate::blade::Blade::stacking_axis`]) it is drawn in every view: an orange line in
//! the plan and edge views, a cross where it passes through the end view.

use std::collections::HashMap;

use nalgebra::{Point3, Vector3};

use super::numbers::{fixed, number, Decimals};
use super::stack::AXIS_COLOUR;
use crate::mesh::{Aabb, TriMesh};
use crate::svg::Svg;

/// Dihedral angle above which an edge is drawn as a crease, degrees. Default 40.
pub const CREASE_DEGREES: f64 = 40.0;

/// Largest picture width, px (the HTML report's column is 960 px wide).
const MAX_WIDTH: f64 = 900.0;
/// Smallest picture width, px (room for the line of overall sizes).
const MIN_WIDTH: f64 = 720.0;
/// Largest height of the two stacked views together, px.
const MAX_VIEWS_HEIGHT: f64 = 720.0;
/// Left edge of the plan and edge views, px (room for the x dimension's label).
const LEFT: f64 = 80.0;
/// Top edge of the plan and end views, px (room for the title and the y dimension).
const TOP: f64 = 70.0;
/// Gap between views, px (room for a view's title under it).
const GAP: f64 = 50.0;
/// Right margin, px.
const RIGHT: f64 = 20.0;
/// Width kept for the end view's title ("from the tip, looking along -z" at 10 px).
const END_TITLE: f64 = 200.0;
/// Distance of the z dimension line below the edge view, px.
const DIM_BELOW: f64 = 40.0;
/// Height from the z dimension line to the bottom, px (its label and the line of
/// overall sizes).
const FOOT: f64 = 48.0;

/// Where the views go: one scale for all three (aligned views), as large as the width
/// allows with the end view's title kept inside, the stacked views no taller than
/// [`MAX_VIEWS_HEIGHT`]; the picture as tall as its content (nothing left empty).
struct Layout {
    scale: f64,
    width: f64,
    height: f64,
    /// Left edge of the end view, px.
    x_end: f64,
    /// Top edge of the edge view, px.
    y_edge: f64,
}

impl Layout {
    /// The layout for a part of extents `ex`, `ey`, `ez` (mm, positive).
    fn new(ex: f64, ey: f64, ez: f64) -> Layout {
        let avail = MAX_WIDTH - LEFT - GAP - RIGHT;
        // The plan (ez wide) and the end view (ey wide, at least its title) side by side.
        let by_width = (avail / (ez + ey)).min((avail - END_TITLE) / ez);
        let by_height = MAX_VIEWS_HEIGHT / (ex + ey);
        let scale = by_width.min(by_height);
        let x_end = LEFT + scale * ez + GAP;
        let width = (x_end + (scale * ey).max(END_TITLE) + RIGHT).clamp(MIN_WIDTH, MAX_WIDTH);
        let y_edge = TOP + scale * ex + GAP;
        let height = y_edge + scale * ey + DIM_BELOW + FOOT;
        Layout {
            scale,
            width: width.ceil(),
            height: height.ceil(),
            x_end,
            y_edge,
        }
    }
}

/// Edges of `mesh` that outline it when seen along `dir`.
pub fn outline_edges(mesh: &TriMesh, dir: &Vector3<f64>) -> Vec<(Point3<f64>, Point3<f64>)> {
    let mut faces: HashMap<(u32, u32), Vec<usize>> = HashMap::new();
    for (t, tri) in mesh.triangles.iter().enumerate() {
        for k in 0..3 {
            let (a, b) = (tri[k], tri[(k + 1) % 3]);
            faces.entry((a.min(b), a.max(b))).or_default().push(t);
        }
    }
    let normals: Vec<Vector3<f64>> = (0..mesh.len())
        .map(|t| {
            mesh.scaled_normal(t)
                .try_normalize(0.0)
                .unwrap_or_else(Vector3::zeros)
        })
        .collect();
    let cos_crease = CREASE_DEGREES.to_radians().cos();
    let mut out = Vec::new();
    let mut keys: Vec<_> = faces.keys().copied().collect();
    keys.sort_unstable();
    for e in keys {
        let f = &faces[&e];
        let draw = match f.as_slice() {
            [a, b] => {
                let (na, nb) = (normals[*a], normals[*b]);
                let (sa, sb) = (na.dot(dir), nb.dot(dir));
                (sa > 0.0) != (sb > 0.0) || na.dot(&nb) < cos_crease
            }
            _ => true,
        };
        if draw {
            out.push((mesh.vertices[e.0 as usize], mesh.vertices[e.1 as usize]));
        }
    }
    out
}

/// The three-view SVG with overall dimensions (mm) and, when `axis` is not empty, the
/// stacking axis through its points (root to tip, blade frame, mm).
pub fn three_view_svg(
    name: &str,
    mesh: &TriMesh,
    axis: &[Point3<f64>],
    standalone: bool,
) -> String {
    let Some(bb) = mesh.bounding_box() else {
        return empty_views(name, standalone);
    };
    let views = ThreeViews::of(bb);
    let mut svg = Svg::new(views.layout.width, views.layout.height);
    svg.text(
        views.layout.width / 2.0,
        20.0,
        14.0,
        "middle",
        &format!("Three views: {name} (mm)"),
    );
    views.draw_views(&mut svg, mesh, axis);
    views.draw_dimensions(&mut svg);
    views.draw_footer(&mut svg);
    svg.finish(&format!("Three views of {name}"), standalone)
}

/// The three views of a part with no vertices: the title and "empty part".
fn empty_views(name: &str, standalone: bool) -> String {
    let (w, h) = (MAX_WIDTH, 120.0);
    let mut svg = Svg::new(w, h);
    svg.text(
        w / 2.0,
        20.0,
        14.0,
        "middle",
        &format!("Three views: {name} (mm)"),
    );
    svg.text(w / 2.0, h / 2.0, 12.0, "middle", "empty part");
    svg.finish("Three views", standalone)
}

/// A part's box and the views' layout.
struct ThreeViews {
    bb: Aabb,
    /// The box's size, mm.
    size: Vector3<f64>,
    /// The box's extents along x, y and z, at least 1e-6 mm.
    extents: [f64; 3],
    layout: Layout,
}

impl ThreeViews {
    fn of(bb: Aabb) -> ThreeViews {
        let size = bb.size();
        let (ex, ey, ez) = (size.x.max(1e-6), size.y.max(1e-6), size.z.max(1e-6));
        ThreeViews {
            bb,
            size,
            extents: [ex, ey, ez],
            layout: Layout::new(ex, ey, ez),
        }
    }

    /// The plan, the edge view and the view from the tip: the mesh's outline, a title
    /// and the stacking axis in each.
    fn draw_views(&self, svg: &mut Svg, mesh: &TriMesh, axis: &[Point3<f64>]) {
        let bb = &self.bb;
        let s = self.layout.scale;
        let (left, top, x_end, y_edge) = (LEFT, TOP, self.layout.x_end, self.layout.y_edge);
        // Plan view: z -> right, x -> up.
        let plan = |p: &Point3<f64>| (left + s * (p.z - bb.min.z), top + s * (bb.max.x - p.x));
        // Edge view: z -> right, y -> up.
        let edge = |p: &Point3<f64>| (left + s * (p.z - bb.min.z), y_edge + s * (bb.max.y - p.y));
        // End view from the tip: y -> right, x -> up.
        let end = |p: &Point3<f64>| (x_end + s * (p.y - bb.min.y), top + s * (bb.max.x - p.x));
        type Projection<'a> = &'a dyn Fn(&Point3<f64>) -> (f64, f64);
        let views: [(Vector3<f64>, Projection, &str); 3] = [
            (Vector3::y(), &plan, "plan, looking downstream (+y)"),
            (-Vector3::x(), &edge, "edge view, looking along -x"),
            (-Vector3::z(), &end, "from the tip, looking along -z"),
        ];
        for (dir, map, title) in views {
            let segs: Vec<_> = outline_edges(mesh, &dir)
                .iter()
                .map(|(a, b)| (map(a), map(b)))
                .collect();
            svg.segments(&segs, "#1f2f4f", 0.8);
            let (tx, ty) = map(&Point3::new(bb.min.x, bb.min.y, bb.min.z));
            svg.text(tx, ty + 14.0, 10.0, "start", title);
            draw_axis(svg, axis, map, dir == -Vector3::z());
        }
    }

    /// Dimension lines: the span below the edge view, the chordwise extent left of the
    /// plan, the extent along the rotor axis above the end view.
    fn draw_dimensions(&self, svg: &mut Svg) {
        let (bb, size) = (&self.bb, &self.size);
        let [ex, ey, ez] = self.extents;
        let s = self.layout.scale;
        let (left, top, x_end, y_edge) = (LEFT, TOP, self.layout.x_end, self.layout.y_edge);
        let mm = |v: f64| number(v, Decimals::Mm);
        let below = y_edge + s * ey + DIM_BELOW;
        dimension(
            svg,
            (left, below),
            (left + s * ez, below),
            format!("z: {} (r {} to {})", mm(size.z), mm(bb.min.z), mm(bb.max.z)),
            false,
        );
        dimension(
            svg,
            (left - 12.0, top),
            (left - 12.0, top + s * ex),
            format!("x: {}", mm(size.x)),
            true,
        );
        dimension(
            svg,
            (x_end, top - 12.0),
            (x_end + s * ey, top - 12.0),
            format!("y: {}", mm(size.y)),
            false,
        );
    }

    /// The overall size and the scale, at the foot.
    fn draw_footer(&self, svg: &mut Svg) {
        let size = &self.size;
        let mm = |v: f64| number(v, Decimals::Mm);
        svg.text(
            GAP,
            self.layout.height - 12.0,
            11.0,
            "start",
            &format!(
                "overall {} × {} × {} mm (x chordwise, y along the rotor axis, z radius); scale {} px/mm",
                mm(size.x),
                mm(size.y),
                mm(size.z),
                fixed(self.layout.scale, 3)
            ),
        );
    }
}

/// A dimension line from `a` to `b` with end ticks and its `text` (left of a `vertical`
/// line, else above it).
fn dimension(svg: &mut Svg, a: (f64, f64), b: (f64, f64), text: String, vertical: bool) {
    svg.line(a, b, "#c0392b", 0.8);
    let (tick_a, tick_b) = if vertical {
        (
            ((a.0 - 4.0, a.1), (a.0 + 4.0, a.1)),
            ((b.0 - 4.0, b.1), (b.0 + 4.0, b.1)),
        )
    } else {
        (
            ((a.0, a.1 - 4.0), (a.0, a.1 + 4.0)),
            ((b.0, b.1 - 4.0), (b.0, b.1 + 4.0)),
        )
    };
    svg.line(tick_a.0, tick_a.1, "#c0392b", 0.8);
    svg.line(tick_b.0, tick_b.1, "#c0392b", 0.8);
    let mid = ((a.0 + b.0) / 2.0, (a.1 + b.1) / 2.0);
    if vertical {
        svg.text(mid.0 - 6.0, mid.1, 11.0, "end", &text);
    } else {
        svg.text(mid.0, mid.1 - 6.0, 11.0, "middle", &text);
    }
}

/// Draws the stacking axis in one view: a line in the axis colour, labelled at its tip end, or
/// (`end_on`, the view along the span) a cross at each distinct point.
fn draw_axis(
    svg: &mut Svg,
    axis: &[Point3<f64>],
    map: &dyn Fn(&Point3<f64>) -> (f64, f64),
    end_on: bool,
) {
    let pts: Vec<(f64, f64)> = axis.iter().map(map).collect();
    let Some(&(x, y)) = pts.last() else {
        return;
    };
    if end_on {
        let mut seen: Vec<(f64, f64)> = Vec::new();
        for &(x, y) in &pts {
            if seen
                .iter()
                .any(|q| (q.0 - x).abs() < 0.5 && (q.1 - y).abs() < 0.5)
            {
                continue;
            }
            seen.push((x, y));
            svg.line((x - 5.0, y), (x + 5.0, y), AXIS_COLOUR, 1.2);
            svg.line((x, y - 5.0), (x, y + 5.0), AXIS_COLOUR, 1.2);
        }
        return;
    }
    svg.polyline(&pts, AXIS_COLOUR, 1.0, false);
    svg.text(x - 6.0, y - 5.0, 10.0, "end", "stacking axis");
}
