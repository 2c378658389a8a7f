//! A shaded 3-D preview of a blade or an assembled rotor, with the rotation sense and the
//! wind drawn, as a PNG: our own software renderer (no GPU).
//!
//! # Method
//! * **Projection**: orthographic along the view direction [`View::look`] (the way the
//!   eye looks, model frame), `right = look x up`, `up' = right x look`; a point `p` lands
//!   at `(right . p, up' . p)` with depth `look . p`. The picture is scaled uniformly so
//!   the parts and the marks fill it less a margin.
//! * **Coverage**: a pixel belongs to a triangle when its centre lies inside or on the
//!   projected triangle (edge functions, all of one sign or zero); triangles of zero
//!   projected area cover nothing. So the covered pixels are the pixel centres inside the
//!   union of the projected triangles: the part's projected outline.
//! * **Hidden surfaces**: a depth buffer; the nearest surface wins, the first drawn on a
//!   tie (items and triangles in input order). An item that bounds a solid
//!   ([`Item::solid`]: closed and outward-oriented, as every checked part) has its
//!   triangles that face away from the eye skipped: along every line of sight the first
//!   surface met enters the solid, so faces turned away never show (back-face culling;
//!   half the pixels to draw).
//! * **Shading**: flat, two-sided (a triangle seen from behind is lit as its other
//!   side): `0.25 + 0.75 max(0, n . l)` times the item's colour, light from over the
//!   viewer's left shoulder.
//! * **Marks** ([`Marks`]): the wind, an arrow along the flow upstream of the rotor (a
//!   circle with a cross when it points away from the eye, with a dot toward it); the
//!   rotation, an arc about the rotor axis with an arrowhead in the sense of rotation,
//!   labelled `CCW` or `CW` `SEEN FROM UPSTREAM`. Marks are drawn over the parts.
//!
//! Deterministic: the same input gives the same bytes (fixed order of work: bands of rows
//! drawn side by side each see every triangle in input order; PNG written with fixed
//! settings).

use crate::design::Rotation;
use crate::mesh::TriMesh;
use nalgebra::{Matrix4, Point3, Vector3};

/// Where the eye looks from.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct View {
    /// The direction the eye looks along (model frame, any length).
    pub look: [f64; 3],
    /// A direction that should point up in the picture (not along `look`).
    pub up: [f64; 3],
}

impl View {
    /// From upstream, from the trailing-edge side and a little above, in the blade frame
    /// of [`crate::conventions`] (flow +y, span +z): shows the pressure side of a turbine
    /// blade, its twist and the rotation arc.
    pub const UPSTREAM_OBLIQUE: View = View {
        look: [-0.45, 1.0, -0.3],
        up: [0.0, 0.0, 1.0],
    };
    /// Straight from upstream (looking downstream along +y, z up): the rotation sense
    /// reads as on the design (`ccw` is counter-clockwise here).
    pub const FROM_UPSTREAM: View = View {
        look: [0.0, 1.0, 0.0],
        up: [0.0, 0.0, 1.0],
    };

    /// Orthonormal `(right, up, look)`; `None` when `look` is zero or along `up`.
    pub fn basis(&self) -> Option<[Vector3<f64>; 3]> {
        let f = Vector3::from(self.look).try_normalize(1e-12)?;
        let r = f.cross(&Vector3::from(self.up)).try_normalize(1e-9)?;
        Some([r, r.cross(&f), f])
    }
}

/// The rotor's marks: rotation sense and wind.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Marks {
    /// Sense of rotation seen from upstream.
    pub rotation: Rotation,
    /// The way the wind blows (model frame, any length); the rotor axis is along it.
    pub flow: [f64; 3],
    /// A point on the rotor axis, mm.
    pub axis_point: [f64; 3],
    /// Radius of the rotation arc, mm (e.g. a little more than the tip radius).
    pub radius: f64,
}

impl Marks {
    /// Marks in the blade frame of [`crate::conventions`]: axis along y through the
    /// origin, flow toward +y, the arc at `radius` centred on the +z direction.
    pub fn blade_frame(rotation: Rotation, radius: f64) -> Marks {
        Marks {
            rotation,
            flow: [0.0, 1.0, 0.0],
            axis_point: [0.0, 0.0, 0.0],
            radius,
        }
    }
}

impl Marks {
    /// The rotation arc at `radius` about the axis, as points in the sense of rotation: 90
    /// degrees of arc centred on the direction `e2 = e1 x flow` (+z in the blade frame,
    /// where the blade stands), `e1` the model x axis made normal to the flow. Seen from
    /// upstream (looking along the flow with `e1` to the right and `e2` up) the angle
    /// from `e1` grows counter-clockwise, so `ccw` runs from 55 to 145 degrees and `cw`
    /// from 125 to 35.
    pub fn arc(&self, radius: f64) -> Vec<Point3<f64>> {
        let flow = Vector3::from(self.flow)
            .try_normalize(1e-12)
            .unwrap_or_else(Vector3::y);
        let o = Point3::from(self.axis_point);
        let seed = if flow.x.abs() < 0.9 {
            Vector3::x()
        } else {
            Vector3::z()
        };
        let e1 = (seed - flow * flow.dot(&seed)).normalize();
        let e2 = e1.cross(&flow);
        let (from, to) = match self.rotation {
            Rotation::Ccw => (55.0f64, 145.0f64),
            Rotation::Cw => (125.0, 35.0),
        };
        (0..=48)
            .map(|k| {
                let a = (from + (to - from) * k as f64 / 48.0).to_radians();
                o + radius * (a.cos() * e1 + a.sin() * e2)
            })
            .collect()
    }
}

/// One mesh to draw, placed by a transform (model frame = `transform` x mesh frame).
#[derive(Debug, Clone, Copy)]
pub struct Item<'a> {
    /// The mesh.
    pub mesh: &'a TriMesh,
    /// Its placement.
    pub transform: Matrix4<f64>,
    /// Its colour (sRGB).
    pub colour: [u8; 3],
    /// True when the mesh bounds a solid (closed, consistently oriented with outward
    /// normals, as every checked part): its faces turned away from the eye are skipped.
    pub solid: bool,
}

impl<'a> Item<'a> {
    /// A mesh as it is, in the default part colour (any surface: both sides drawn).
    pub fn new(mesh: &'a TriMesh) -> Item<'a> {
        Item {
            mesh,
            transform: Matrix4::identity(),
            colour: PART_COLOUR,
            solid: false,
        }
    }

    /// A checked part's mesh as it is, in the default part colour: a solid, so faces
    /// turned away from the eye are skipped.
    pub fn solid(mesh: &'a TriMesh) -> Item<'a> {
        Item {
            solid: true,
            ..Item::new(mesh)
        }
    }
}

/// Default colour of parts.
pub const PART_COLOUR: [u8; 3] = [176, 190, 205];
const WIND_COLOUR: [u8; 3] = [31, 95, 168];
const TURN_COLOUR: [u8; 3] = [192, 57, 43];

/// Size and look of the picture.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PreviewOptions {
    /// Width, px (default 800).
    pub width: u32,
    /// Height, px (default 600).
    pub height: u32,
    /// Where the eye looks from (default [`View::UPSTREAM_OBLIQUE`]).
    pub view: View,
    /// Empty border, px (default 24).
    pub margin: u32,
    /// Background colour (default white).
    pub background: [u8; 3],
}

impl PreviewOptions {
    /// The defaults.
    pub const DEFAULT: PreviewOptions = PreviewOptions {
        width: 800,
        height: 600,
        view: View::UPSTREAM_OBLIQUE,
        margin: 24,
        background: [255, 255, 255],
    };
}

impl Default for PreviewOptions {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// A rendered picture: RGB pixels, rows top to bottom, and which pixels show a part.
#[derive(Debug, Clone, PartialEq)]
pub struct Image {
    /// Width, px.
    pub width: u32,
    /// Height, px.
    pub height: u32,
    /// RGB bytes, row by row from the top.
    pub rgb: Vec<u8>,
    covered: Vec<bool>,
    basis: [Vector3<f64>; 3],
    scale: f64,
    shift: (f64, f64),
}

impl Image {
    /// True when pixel `(x, y)` (from the top left) shows a part (before the marks).
    pub fn covered(&self, x: u32, y: u32) -> bool {
        x < self.width && y < self.height && self.covered[(y * self.width + x) as usize]
    }

    /// Number of pixels showing a part.
    pub fn covered_count(&self) -> usize {
        self.covered.iter().filter(|&&c| c).count()
    }

    /// Picture scale, px per mm.
    pub fn scale(&self) -> f64 {
        self.scale
    }

    /// Where a model point lands: pixel x, pixel y (down from the top; pixel `(i, j)`
    /// has its centre at `(i + 0.5, j + 0.5)`) and depth along the view, mm.
    pub fn project(&self, p: &Point3<f64>) -> (f64, f64, f64) {
        let [r, u, f] = &self.basis;
        (
            r.dot(&p.coords) * self.scale + self.shift.0,
            self.shift.1 - u.dot(&p.coords) * self.scale,
            f.dot(&p.coords),
        )
    }

    /// The picture as PNG bytes (8-bit RGB, fixed settings: the same picture gives the
    /// same bytes).
    pub fn png(&self) -> Vec<u8> {
        let mut out = Vec::new();
        let mut enc = png::Encoder::new(&mut out, self.width, self.height);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        enc.set_compression(png::Compression::Fastest);
        // Writing to memory cannot fail for a consistent size; an error leaves the bytes
        // written so far, which the caller's PNG check would reject.
        if let Ok(mut w) = enc.write_header() {
            let _ = w.write_image_data(&self.rgb);
            let _ = w.finish();
        }
        out
    }

    fn put(&mut self, x: i64, y: i64, c: [u8; 3]) {
        if x >= 0 && y >= 0 && (x as u32) < self.width && (y as u32) < self.height {
            let k = 3 * (y as usize * self.width as usize + x as usize);
            self.rgb[k..k + 3].copy_from_slice(&c);
        }
    }
}

/// Renders the items with the marks (see the module docs).
pub fn render(items: &[Item<'_>], marks: Option<&Marks>, opts: &PreviewOptions) -> Image {
    let basis = opts.view.basis().unwrap_or_else(|| {
        View::FROM_UPSTREAM
            .basis()
            .expect("the fixed upstream view has a basis")
    });
    let placed = placed_vertices(items);
    let drawn_marks = marks.map(|m| mark_geometry(m, &basis, &placed));
    let framed = frame_extent(items, &placed, drawn_marks.as_ref(), &basis);
    let mut img = Image::framing(framed, basis, opts);
    shade_items(&mut img, items, &placed);
    if let Some(g) = drawn_marks {
        draw_marks(&mut img, &g);
    }
    img
}

/// Model-frame vertices of every item.
fn placed_vertices(items: &[Item<'_>]) -> Vec<Vec<Point3<f64>>> {
    items
        .iter()
        .map(|it| {
            it.mesh
                .vertices
                .iter()
                .map(|v| it.transform.transform_point(v))
                .collect()
        })
        .collect()
}

/// What the picture must frame, in view coordinates (right, up): the extent
/// `(x0, x1, y0, y1)` of every vertex used and every mark point, `None` when there is
/// none. Folded point by point (a list of a million-triangle mesh's corners would be
/// the largest allocation of a build).
fn frame_extent(
    items: &[Item<'_>],
    placed: &[Vec<Point3<f64>>],
    marks: Option<&MarkGeometry>,
    basis: &[Vector3<f64>; 3],
) -> Option<(f64, f64, f64, f64)> {
    let [r, u, _] = basis;
    let mut extent: Option<(f64, f64, f64, f64)> = None;
    let mut add = |p: &Point3<f64>| {
        let (x, y) = (r.dot(&p.coords), u.dot(&p.coords));
        if x.is_finite() && y.is_finite() {
            extent = Some(match extent {
                None => (x, x, y, y),
                Some((a, b, c, d)) => (a.min(x), b.max(x), c.min(y), d.max(y)),
            });
        }
    };
    for (it, verts) in items.iter().zip(placed) {
        for t in &it.mesh.triangles {
            for &i in t {
                if let Some(p) = verts.get(i as usize) {
                    add(p);
                }
            }
        }
    }
    if let Some(g) = marks {
        for p in g.points() {
            add(&p);
        }
    }
    extent
}

impl Image {
    /// A blank picture of the options' size and background whose projection frames
    /// `extent` (view coordinates `(x0, x1, y0, y1)`) within the margin, centred.
    fn framing(
        extent: Option<(f64, f64, f64, f64)>,
        basis: [Vector3<f64>; 3],
        opts: &PreviewOptions,
    ) -> Image {
        let (w, h) = (opts.width.max(1), opts.height.max(1));
        let m = opts.margin as f64;
        let (aw, ah) = ((w as f64 - 2.0 * m).max(1.0), (h as f64 - 2.0 * m).max(1.0));
        let (scale, cx, cy) = match extent {
            None => (1.0, 0.0, 0.0),
            Some((x0, x1, y0, y1)) => {
                let (dx, dy) = ((x1 - x0).max(1e-9), (y1 - y0).max(1e-9));
                ((aw / dx).min(ah / dy), 0.5 * (x0 + x1), 0.5 * (y0 + y1))
            }
        };
        let shift = (0.5 * w as f64 - cx * scale, 0.5 * h as f64 + cy * scale);
        Image {
            width: w,
            height: h,
            rgb: opts.background.repeat((w * h) as usize),
            covered: vec![false; (w * h) as usize],
            basis,
            scale,
            shift,
        }
    }
}

/// Draws every item's triangles, flat-shaded by a light from behind the eye, nearest
/// first by a depth buffer.
///
/// The picture is drawn in horizontal bands side by side (one per worker thread); each
/// band takes every triangle in order and keeps the pixels in its rows, so every pixel
/// sees the same triangles in the same order as on one thread: the same picture.
fn shade_items(img: &mut Image, items: &[Item<'_>], placed: &[Vec<Point3<f64>>]) {
    use rayon::prelude::*;
    let [r, u, f] = img.basis;
    let light = (-f + 0.6 * u - 0.35 * r).normalize();
    let (w, h) = (img.width as usize, img.height as usize);
    let projected: Vec<Vec<(f64, f64, f64)>> = placed
        .iter()
        .map(|verts| verts.iter().map(|p| img.project(p)).collect())
        .collect();
    // A pixel's depth counts once it is covered: the buffer starts as zeroed memory,
    // which the system hands out page by page as pixels are drawn.
    let mut depth = vec![0.0f64; w * h];
    let rows = h.div_ceil(rayon::current_num_threads().clamp(1, 8)).max(1);
    img.rgb
        .par_chunks_mut(3 * w * rows)
        .zip(img.covered.par_chunks_mut(w * rows))
        .zip(depth.par_chunks_mut(w * rows))
        .enumerate()
        .for_each(|(band, ((rgb, covered), depth))| {
            let y0 = band * rows;
            let band_rows = y0 as i64..(y0 + rows).min(h) as i64;
            for ((it, verts), proj) in items.iter().zip(placed).zip(&projected) {
                // Facing away from the eye: the outward normal along the look (turned
                // over by a mirroring placement).
                let away = match it.transform.fixed_view::<3, 3>(0, 0).determinant() {
                    d if it.solid && d > 0.0 => 1.0,
                    d if it.solid && d < 0.0 => -1.0,
                    _ => 0.0,
                };
                for t in &it.mesh.triangles {
                    let Some([a, b, c]) = corners(t, proj) else {
                        continue;
                    };
                    let (lo, hi) = (a.1.min(b.1).min(c.1), a.1.max(b.1).max(c.1));
                    if (hi.ceil() as i64) < band_rows.start || (lo.floor() as i64) >= band_rows.end
                    {
                        continue;
                    }
                    let [pa, pb, pc] = t.map(|i| verts[i as usize]);
                    let mut n = (pb - pa).cross(&(pc - pa));
                    if away * n.dot(&f) > 0.0 {
                        continue;
                    }
                    if n.dot(&f) > 0.0 {
                        n = -n;
                    }
                    let shade = match n.try_normalize(0.0) {
                        Some(n) => 0.25 + 0.75 * n.dot(&light).max(0.0),
                        None => 0.25,
                    };
                    let colour = it
                        .colour
                        .map(|c| (c as f64 * shade).round().clamp(0.0, 255.0) as u8);
                    fill_triangle(w as u32, band_rows.clone(), [a, b, c], |x, y, d| {
                        let k = (y as usize - y0) * w + x as usize;
                        if !covered[k] || d < depth[k] {
                            depth[k] = d;
                            covered[k] = true;
                            rgb[3 * k..3 * k + 3].copy_from_slice(&colour);
                        }
                    });
                }
            }
        });
}

/// [`render`] as PNG bytes.
pub fn preview_png(items: &[Item<'_>], marks: Option<&Marks>, opts: &PreviewOptions) -> Vec<u8> {
    render(items, marks, opts).png()
}

fn corners(t: &[u32; 3], proj: &[(f64, f64, f64)]) -> Option<[(f64, f64, f64); 3]> {
    let get = |i: u32| {
        proj.get(i as usize)
            .copied()
            .filter(|p| p.0.is_finite() && p.1.is_finite() && p.2.is_finite())
    };
    Some([get(t[0])?, get(t[1])?, get(t[2])?])
}

/// Calls `put(x, y, depth)` for every pixel of a picture `width` wide, in the rows
/// `rows`, whose centre lies inside or on the triangle (pixel coordinates, depth
/// interpolated linearly).
fn fill_triangle(
    width: u32,
    rows: std::ops::Range<i64>,
    p: [(f64, f64, f64); 3],
    mut put: impl FnMut(u32, u32, f64),
) {
    let [a, b, c] = p;
    let area = (b.0 - a.0) * (c.1 - a.1) - (b.1 - a.1) * (c.0 - a.0);
    if area == 0.0 || !area.is_finite() {
        return;
    }
    let s = area.signum();
    let xmin = a.0.min(b.0).min(c.0).floor().max(0.0) as i64;
    let xmax = (a.0.max(b.0).max(c.0).ceil() as i64).min(width as i64 - 1);
    let ymin = (a.1.min(b.1).min(c.1).floor().max(0.0) as i64).max(rows.start);
    let ymax = (a.1.max(b.1).max(c.1).ceil() as i64).min(rows.end - 1);
    let edge = |p: (f64, f64, f64), q: (f64, f64, f64), x: f64, y: f64| {
        (q.0 - p.0) * (y - p.1) - (q.1 - p.1) * (x - p.0)
    };
    for y in ymin..=ymax {
        let py = y as f64 + 0.5;
        // Where each edge's function is not negative along this row: it is linear in
        // the pixel's x, so one division finds the crossing; a pixel of slack each side
        // leaves the rounding of that division to the exact test below, so the covered
        // pixels are the same as testing the whole box.
        let (mut lo, mut hi) = (xmin as f64, xmax as f64);
        for (p, q) in [(b, c), (c, a), (a, b)] {
            let slope = -(q.1 - p.1) * s;
            let at_p = (q.0 - p.0) * (py - p.1) * s;
            if slope > 0.0 {
                lo = lo.max((p.0 - at_p / slope - 0.5).floor() - 1.0);
            } else if slope < 0.0 {
                hi = hi.min((p.0 - at_p / slope - 0.5).ceil() + 1.0);
            }
        }
        if !(lo <= hi) {
            continue;
        }
        for x in lo as i64..=hi as i64 {
            let px = x as f64 + 0.5;
            let w0 = edge(b, c, px, py) * s;
            let w1 = edge(c, a, px, py) * s;
            let w2 = edge(a, b, px, py) * s;
            if w0 >= 0.0 && w1 >= 0.0 && w2 >= 0.0 {
                let d = (w0 * a.2 + w1 * b.2 + w2 * c.2) / (w0 + w1 + w2).max(f64::MIN_POSITIVE);
                put(x as u32, y as u32, d);
            }
        }
    }
}

/// The marks in model coordinates.
struct MarkGeometry {
    /// Wind arrow: tail and head.
    wind: (Point3<f64>, Point3<f64>),
    /// True when the wind points away from the eye (for the end-on symbol).
    wind_away: bool,
    /// Rotation arc, in the sense of rotation.
    arc: Vec<Point3<f64>>,
    /// Label of the arc.
    sense: &'static str,
}

impl MarkGeometry {
    fn points(&self) -> impl Iterator<Item = Point3<f64>> + '_ {
        [self.wind.0, self.wind.1]
            .into_iter()
            .chain(self.arc.iter().copied())
    }
}

fn mark_geometry(
    m: &Marks,
    basis: &[Vector3<f64>; 3],
    placed: &[Vec<Point3<f64>>],
) -> MarkGeometry {
    let flow = Vector3::from(m.flow)
        .try_normalize(1e-12)
        .unwrap_or_else(Vector3::y);
    let o = Point3::from(m.axis_point);
    let radius = if m.radius > 0.0 && m.radius.is_finite() {
        m.radius
    } else {
        // The parts' reach from the axis.
        placed
            .iter()
            .flatten()
            .map(|p| {
                let d = p - o;
                (d - flow * flow.dot(&d)).norm()
            })
            .fold(1.0, f64::max)
    };
    MarkGeometry {
        wind: (o - flow * (1.4 * radius), o - flow * (0.45 * radius)),
        wind_away: flow.dot(&basis[2]) > 0.0,
        arc: m.arc(radius),
        sense: match m.rotation {
            Rotation::Ccw => "CCW",
            Rotation::Cw => "CW",
        },
    }
}

fn draw_marks(img: &mut Image, g: &MarkGeometry) {
    let thick = (img.width.min(img.height) as f64 / 300.0).max(1.0);
    let text = ((img.width.min(img.height) as f64 / 300.0).round() as i64).max(1);
    // Rotation arc and its arrowhead.
    let arc: Vec<(f64, f64)> = g.arc.iter().map(|p| xy(img, p)).collect();
    polyline(img, &arc, thick, TURN_COLOUR);
    if let [.., p, q] = arc[..] {
        arrowhead(img, p, q, 6.0 * thick, TURN_COLOUR);
    }
    if let Some(&(x, y)) = arc.last() {
        // Beside the arrowhead, outward from the picture's centre, kept inside the picture.
        let (cx, cy) = centre(img);
        let (dx, dy) = (x - cx, y - cy);
        let n = (dx * dx + dy * dy).sqrt().max(1e-9);
        let line = 9.0 * text as f64;
        let at = (x + 10.0 * thick * dx / n, y + 10.0 * thick * dy / n + line);
        let sense = format!("{} SEEN FROM UPSTREAM", g.sense);
        label(img, &sense, at, text, TURN_COLOUR);
    }
    // Wind arrow, or the end-on symbol when it points along the view.
    let (a, b) = (xy(img, &g.wind.0), xy(img, &g.wind.1));
    let len3 = (g.wind.1 - g.wind.0).norm() * img.scale;
    let len2 = ((b.0 - a.0).powi(2) + (b.1 - a.1).powi(2)).sqrt();
    if len2 >= 0.25 * len3 {
        polyline(img, &[a, b], thick, WIND_COLOUR);
        arrowhead(img, a, b, 6.0 * thick, WIND_COLOUR);
        label(img, "WIND", (a.0, a.1 + 6.0 * thick), text, WIND_COLOUR);
    } else {
        let r = 8.0 * thick;
        let circle: Vec<(f64, f64)> = (0..=32)
            .map(|k| {
                let t = std::f64::consts::TAU * k as f64 / 32.0;
                (b.0 + r * t.cos(), b.1 + r * t.sin())
            })
            .collect();
        polyline(img, &circle, 0.6 * thick, WIND_COLOUR);
        if g.wind_away {
            let d = 0.7 * r;
            polyline(
                img,
                &[(b.0 - d, b.1 - d), (b.0 + d, b.1 + d)],
                0.6 * thick,
                WIND_COLOUR,
            );
            polyline(
                img,
                &[(b.0 - d, b.1 + d), (b.0 + d, b.1 - d)],
                0.6 * thick,
                WIND_COLOUR,
            );
        } else {
            disc(img, b, 0.3 * r, WIND_COLOUR);
        }
        // Right of the circle: "WIND" is 4 letters of 6 font pixels.
        label(
            img,
            "WIND",
            (b.0 + r + 6.0 + 12.0 * text as f64, b.1),
            text,
            WIND_COLOUR,
        );
    }
}

fn xy(img: &Image, p: &Point3<f64>) -> (f64, f64) {
    let (x, y, _) = img.project(p);
    (x, y)
}

fn centre(img: &Image) -> (f64, f64) {
    (0.5 * img.width as f64, 0.5 * img.height as f64)
}

/// Pixels within `r` of the point.
fn disc(img: &mut Image, c: (f64, f64), r: f64, colour: [u8; 3]) {
    let (x0, x1) = ((c.0 - r).floor() as i64, (c.0 + r).ceil() as i64);
    let (y0, y1) = ((c.1 - r).floor() as i64, (c.1 + r).ceil() as i64);
    for y in y0..=y1 {
        for x in x0..=x1 {
            let (dx, dy) = (x as f64 + 0.5 - c.0, y as f64 + 0.5 - c.1);
            if dx * dx + dy * dy <= r * r {
                img.put(x, y, colour);
            }
        }
    }
}

/// A line of half-width `r` through the points (discs stamped every half pixel).
fn polyline(img: &mut Image, pts: &[(f64, f64)], r: f64, colour: [u8; 3]) {
    for w in pts.windows(2) {
        let (a, b) = (w[0], w[1]);
        let len = ((b.0 - a.0).powi(2) + (b.1 - a.1).powi(2)).sqrt();
        if !len.is_finite() {
            continue;
        }
        let n = (2.0 * len).ceil().min(1e5) as usize;
        for k in 0..=n {
            let t = if n == 0 { 0.0 } else { k as f64 / n as f64 };
            disc(
                img,
                (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1)),
                r,
                colour,
            );
        }
    }
}

/// A filled arrowhead of length `size` at `q`, pointing from `p` to `q`.
fn arrowhead(img: &mut Image, p: (f64, f64), q: (f64, f64), size: f64, colour: [u8; 3]) {
    let (dx, dy) = (q.0 - p.0, q.1 - p.1);
    let n = (dx * dx + dy * dy).sqrt();
    if !(n > 0.0) {
        return;
    }
    let (ux, uy) = (dx / n, dy / n);
    let tip = (q.0 + ux * size * 0.5, q.1 + uy * size * 0.5, 0.0);
    let back = (q.0 - ux * size * 0.5, q.1 - uy * size * 0.5);
    let l = (back.0 - uy * size * 0.5, back.1 + ux * size * 0.5, 0.0);
    let r = (back.0 + uy * size * 0.5, back.1 - ux * size * 0.5, 0.0);
    let (width, height) = (img.width, img.height);
    fill_triangle(width, 0..i64::from(height), [tip, l, r], |x, y, _| {
        img.put(x as i64, y as i64, colour)
    });
}

/// Capital letters of a 5 x 7 pixel font (our own drawing), rows top to bottom, the
/// leftmost pixel in bit 4. Only the letters the marks use.
const FONT: [(char, [u8; 7]); 16] = [
    ('A', [14, 17, 17, 31, 17, 17, 17]),
    ('C', [14, 17, 16, 16, 16, 17, 14]),
    ('D', [30, 17, 17, 17, 17, 17, 30]),
    ('E', [31, 16, 16, 30, 16, 16, 31]),
    ('F', [31, 16, 16, 30, 16, 16, 16]),
    ('I', [14, 4, 4, 4, 4, 4, 14]),
    ('L', [16, 16, 16, 16, 16, 16, 31]),
    ('M', [17, 27, 21, 21, 17, 17, 17]),
    ('N', [17, 25, 21, 19, 17, 17, 17]),
    ('O', [14, 17, 17, 17, 17, 17, 14]),
    ('P', [30, 17, 17, 30, 16, 16, 16]),
    ('R', [30, 17, 17, 30, 20, 18, 17]),
    ('S', [15, 16, 16, 14, 1, 1, 30]),
    ('T', [31, 4, 4, 4, 4, 4, 4]),
    ('U', [17, 17, 17, 17, 17, 17, 14]),
    ('W', [17, 17, 17, 21, 21, 21, 10]),
];

/// Text centred on `at` and moved inside the picture, each font pixel `k` x `k` picture
/// pixels.
fn label(img: &mut Image, text: &str, at: (f64, f64), k: i64, colour: [u8; 3]) {
    let n = text.chars().count() as i64;
    let (tw, th) = (6 * k * n, 7 * k);
    let fit = |v: i64, size: i64, room: u32| v.clamp(2, (room as i64 - size - 2).max(2));
    let x0 = fit(at.0.round() as i64 - tw / 2, tw, img.width);
    let y0 = fit(at.1.round() as i64 - th / 2, th, img.height);
    for (i, ch) in text.chars().enumerate() {
        let Some((_, rows)) = FONT.iter().find(|g| g.0 == ch) else {
            continue;
        };
        for (row, bits) in rows.iter().enumerate() {
            for col in 0..5 {
                if bits & (16 >> col) != 0 {
                    for dy in 0..k {
                        for dx in 0..k {
                            img.put(
                                x0 + (6 * i as i64 + col) * k + dx,
                                y0 + row as i64 * k + dy,
                                colour,
                            );
                        }
                    }
                }
            }
        }
    }
}
