//! Mesh writers (STL binary/ASCII, OBJ, 3MF) checked against the published formats and
//! independent readers: stl_io, truck-polymesh's OBJ reader, the zip crate and quick-xml.

use nalgebra::{Matrix4, Point3, Vector3};
use quick_xml::events::Event;
use spanwright::check::{certify, CheckOptions, CheckedPart};
use spanwright::export::{
    write_3mf_file, write_atomic, write_mesh, ExportError, Format, MeshFormat, STL_HEADER,
};
use spanwright::mesh::{Part, TriMesh};
use std::collections::HashMap;
use std::io::{Cursor, Read};
use std::path::Path;

/// A closed, outward-oriented geodesic sphere: an octahedron with every face split
/// `n x n`, projected onto the sphere of radius `r` about `c`.
fn sphere(r: f64, c: Point3<f64>, n: usize) -> TriMesh {
    let ax = [
        Vector3::x(),
        Vector3::y(),
        Vector3::z(),
        -Vector3::x(),
        -Vector3::y(),
        -Vector3::z(),
    ];
    // Octahedron faces, counter-clockwise seen from outside.
    let faces = [
        [0, 1, 2],
        [1, 3, 2],
        [3, 4, 2],
        [4, 0, 2],
        [1, 0, 5],
        [3, 1, 5],
        [4, 3, 5],
        [0, 4, 5],
    ];
    let mut m = TriMesh::new();
    let mut index: HashMap<[i64; 3], u32> = HashMap::new();
    let mut vid = |m: &mut TriMesh, d: Vector3<f64>| -> u32 {
        let d = d.normalize();
        let key = [d.x, d.y, d.z].map(|x| (x * 1e9).round() as i64);
        *index.entry(key).or_insert_with(|| m.push_vertex(c + d * r))
    };
    for f in faces {
        let (a, b, cc) = (ax[f[0]], ax[f[1]], ax[f[2]]);
        let p = |i: usize, j: usize| {
            a + (b - a) * (i as f64 / n as f64) + (cc - a) * (j as f64 / n as f64)
        };
        for i in 0..n {
            for j in 0..n - i {
                let v0 = vid(&mut m, p(i, j));
                let v1 = vid(&mut m, p(i + 1, j));
                let v2 = vid(&mut m, p(i, j + 1));
                m.triangles.push([v0, v1, v2]);
                if i + j + 1 < n {
                    let v3 = vid(&mut m, p(i + 1, j + 1));
                    m.triangles.push([v1, v3, v2]);
                }
            }
        }
    }
    m
}

/// A closed, outward-oriented box with corners `lo` and `lo + size`.
fn cuboid(lo: Point3<f64>, size: Vector3<f64>) -> TriMesh {
    TriMesh::cuboid(lo, size)
}

fn raw_parts() -> Vec<Part> {
    vec![
        Part {
            name: "ball & \"quoted\" <name>".into(),
            mesh: sphere(20.0, Point3::new(1.0, 2.0, 3.0), 8),
        },
        Part {
            name: "block".into(),
            mesh: cuboid(Point3::new(40.0, -5.0, 0.0), Vector3::new(10.0, 20.0, 30.0)),
        },
    ]
}

/// The two parts, checked: writers take nothing else.
fn parts() -> Vec<CheckedPart> {
    raw_parts()
        .into_iter()
        .map(|p| certify(p, &CheckOptions::DEFAULT).expect("a sphere and a box are solids"))
        .collect()
}

fn total_triangles(parts: &[CheckedPart]) -> usize {
    parts.iter().map(|p| p.mesh().len()).sum()
}

const MESH_FORMATS: [MeshFormat; 4] = [
    MeshFormat::Stl,
    MeshFormat::StlAscii,
    MeshFormat::Obj,
    MeshFormat::ThreeMf,
];

fn le_f32(b: &[u8], at: usize) -> f32 {
    f32::from_le_bytes([b[at], b[at + 1], b[at + 2], b[at + 3]])
}

#[test]
fn binary_stl_layout_and_read_back() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("two.stl");
    let parts = parts();
    write_mesh(&path, MeshFormat::Stl, &parts).unwrap();
    let bytes = std::fs::read(&path).unwrap();
    let n = total_triangles(&parts);

    // StereoLithography Interface Specification (3D Systems, 1989), binary format:
    // 80-byte header, u32 little-endian facet count, 50 bytes per facet
    // (normal, 3 vertices as 12 little-endian f32, u16 attribute byte count).
    assert_eq!(&bytes[..80], &STL_HEADER[..]);
    assert!(
        !bytes.starts_with(b"solid"),
        "binary header must not look like ASCII STL"
    );
    let count = u32::from_le_bytes([bytes[80], bytes[81], bytes[82], bytes[83]]) as usize;
    assert_eq!(count, n);
    assert_eq!(bytes.len(), 84 + 50 * n);

    // Same specification: the facet normal is a unit vector pointing outward, and the
    // vertices are listed counter-clockwise seen from outside (right-hand rule).
    let centres = [Point3::new(1.0f64, 2.0, 3.0), Point3::new(45.0, 5.0, 15.0)];
    let n_sphere = parts[0].mesh().len();
    for f in 0..n {
        let o = 84 + 50 * f;
        let v = |k: usize| {
            Vector3::new(
                le_f32(&bytes, o + 12 * k) as f64,
                le_f32(&bytes, o + 12 * k + 4) as f64,
                le_f32(&bytes, o + 12 * k + 8) as f64,
            )
        };
        let (nn, a, b, c) = (v(0), v(1), v(2), v(3));
        assert!(
            (nn.norm() - 1.0).abs() < 1e-6,
            "facet {f}: |n| = {}",
            nn.norm()
        );
        let rh = (b - a).cross(&(c - a)).normalize();
        assert!(
            nn.dot(&rh) > 0.9999,
            "facet {f}: normal disagrees with vertex order"
        );
        let centre = if f < n_sphere { centres[0] } else { centres[1] };
        let centroid = (a + b + c) / 3.0;
        assert!(
            nn.dot(&(centroid - centre.coords)) > 0.0,
            "facet {f}: normal points inward"
        );
        assert_eq!(&bytes[o + 48..o + 50], &[0, 0], "attribute byte count");
    }

    // Independent reader: stl_io reads it back, and its validate() finds no hole, no
    // zero-area facet and consistent facing.
    let mesh = stl_io::read_stl(&mut Cursor::new(&bytes)).unwrap();
    assert_eq!(mesh.faces.len(), n);
    mesh.validate().unwrap();
    let first = parts[0].mesh().corners(0);
    let got = mesh.vertices[mesh.faces[0].vertices[0]];
    for k in 0..3 {
        assert_eq!(got[k], first[0][k] as f32);
    }
}

#[test]
fn ascii_stl_matches_binary() {
    let dir = tempfile::tempdir().unwrap();
    let parts = parts();
    let (pb, pa) = (dir.path().join("b.stl"), dir.path().join("a.stl"));
    write_mesh(&pb, MeshFormat::Stl, &parts).unwrap();
    write_mesh(&pa, MeshFormat::StlAscii, &parts).unwrap();
    let text = std::fs::read_to_string(&pa).unwrap();
    // StereoLithography Interface Specification (3D Systems, 1989), ASCII format:
    // "solid name", facets, "endsolid name"; several parts -> one solid named after the file.
    assert!(text.starts_with("solid a\n"), "{}", &text[..40]);
    assert!(text.trim_end().ends_with("endsolid a"));
    assert_eq!(
        text.matches("facet normal").count(),
        total_triangles(&parts)
    );
    // stl_io reads both; the ASCII numbers are the binary file's f32 values exactly.
    let b = stl_io::create_stl_reader(&mut std::fs::File::open(&pb).unwrap())
        .unwrap()
        .collect::<Result<Vec<_>, _>>()
        .unwrap();
    let a = stl_io::create_stl_reader(&mut std::fs::File::open(&pa).unwrap())
        .unwrap()
        .collect::<Result<Vec<_>, _>>()
        .unwrap();
    assert_eq!(a.len(), b.len());
    assert_eq!(a, b);
}

#[test]
fn obj_reads_back() {
    use truck_meshalgo::prelude::*;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("two.obj");
    let parts = parts();
    write_mesh(&path, MeshFormat::Obj, &parts).unwrap();
    let text = std::fs::read_to_string(&path).unwrap();
    // Wavefront OBJ (common practice): one "o" statement per object.
    assert_eq!(text.lines().filter(|l| l.starts_with("o ")).count(), 2);
    assert!(text.contains("o ball_&_\"quoted\"_<name>\n"));
    // Independent reader: truck-polymesh's OBJ reader (1-based indices).
    let mesh = obj::read(text.as_bytes()).unwrap();
    let nv: usize = parts.iter().map(|p| p.mesh().vertices.len()).sum();
    assert_eq!(mesh.positions().len(), nv);
    assert_eq!(mesh.tri_faces().len(), total_triangles(&parts));
    let mut off = 0;
    for p in &parts {
        for (i, v) in p.mesh().vertices.iter().enumerate() {
            let q = mesh.positions()[off + i];
            // Shortest round-trip decimal: positions come back bit for bit.
            assert_eq!([q.x, q.y, q.z], [v.x, v.y, v.z]);
        }
        off += p.mesh().vertices.len();
    }
    // truck-meshalgo's volume of the read-back mesh equals ours (divergence theorem).
    let ours: f64 = parts.iter().map(|p| p.mesh().signed_volume()).sum();
    assert!(
        (mesh.volume() - ours).abs() < 1e-9 * ours.abs(),
        "{} vs {ours}",
        mesh.volume()
    );
    // Elementary geometry: the block's volume is 10 x 20 x 30.
    assert!((parts[1].mesh().signed_volume() - 6000.0).abs() < 1e-9);
}

/// The parts of a 3MF package, read with the zip crate.
fn unzip(bytes: &[u8]) -> Vec<(String, String)> {
    let mut z = zip::ZipArchive::new(Cursor::new(bytes)).unwrap();
    (0..z.len())
        .map(|i| {
            let mut f = z.by_index(i).unwrap();
            let mut s = String::new();
            f.read_to_string(&mut s).unwrap();
            (f.name().unwrap().to_string(), s)
        })
        .collect()
}

/// One `<object>`: type, name, vertices, triangles.
type Object = (String, String, Vec<[f64; 3]>, Vec<[usize; 3]>);

/// Model part parsed with quick-xml.
#[derive(Default)]
struct Model {
    unit: String,
    ns: String,
    objects: Vec<Object>,
    items: Vec<(String, Option<String>)>,
}

fn attr(e: &quick_xml::events::BytesStart, key: &str) -> Option<String> {
    e.try_get_attribute(key).unwrap().map(|a| {
        a.normalized_value(quick_xml::XmlVersion::Implicit1_0)
            .unwrap()
            .into_owned()
    })
}

fn parse_model(xml: &str) -> Model {
    let mut r = quick_xml::Reader::from_str(xml);
    let mut m = Model::default();
    loop {
        match r.read_event().unwrap() {
            Event::Start(e) | Event::Empty(e) => match e.name().as_ref().as_bytes() {
                b"model" => {
                    m.unit = attr(&e, "unit").unwrap();
                    m.ns = attr(&e, "xmlns").unwrap();
                }
                b"object" => m.objects.push((
                    attr(&e, "type").unwrap(),
                    attr(&e, "name").unwrap(),
                    vec![],
                    vec![],
                )),
                b"vertex" => {
                    let v = ["x", "y", "z"].map(|k| attr(&e, k).unwrap().parse().unwrap());
                    m.objects.last_mut().unwrap().2.push(v);
                }
                b"triangle" => {
                    let t = ["v1", "v2", "v3"].map(|k| attr(&e, k).unwrap().parse().unwrap());
                    m.objects.last_mut().unwrap().3.push(t);
                }
                b"item" => m
                    .items
                    .push((attr(&e, "objectid").unwrap(), attr(&e, "transform"))),
                _ => {}
            },
            Event::Eof => break,
            _ => {}
        }
    }
    m
}

#[test]
fn threemf_package_and_model() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("two.3mf");
    let parts = parts();
    write_mesh(&path, MeshFormat::ThreeMf, &parts).unwrap();
    let entries = unzip(&std::fs::read(&path).unwrap());
    let names: Vec<_> = entries.iter().map(|e| e.0.as_str()).collect();
    assert_eq!(
        names,
        ["[Content_Types].xml", "_rels/.rels", "3D/3dmodel.model"]
    );

    // 3MF Core Specification (3MF Consortium), ch. 2 "3D Model" package + Open Packaging
    // Conventions (ECMA-376 Part 2): content types for .rels and .model parts.
    let ct = &entries[0].1;
    assert!(ct.contains(
        "<Default Extension=\"model\" ContentType=\"application/vnd.ms-package.3dmanufacturing-3dmodel+xml\"/>"
    ));
    assert!(ct.contains(
        "<Default Extension=\"rels\" ContentType=\"application/vnd.openxmlformats-package.relationships+xml\"/>"
    ));
    // Same: the start part relationship of type .../2013/01/3dmodel targets the model.
    let mut r = quick_xml::Reader::from_str(&entries[1].1);
    let mut rel = None;
    loop {
        match r.read_event().unwrap() {
            Event::Empty(e) | Event::Start(e) if e.name().as_ref() == "Relationship" => {
                rel = Some((attr(&e, "Type").unwrap(), attr(&e, "Target").unwrap()));
            }
            Event::Eof => break,
            _ => {}
        }
    }
    assert_eq!(
        rel.unwrap(),
        (
            "http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel".to_string(),
            "/3D/3dmodel.model".to_string()
        )
    );

    // Same, ch. 3-4: model element with unit and the core namespace (2015/02); one mesh
    // object per part; build items reference the objects.
    let m = parse_model(&entries[2].1);
    assert_eq!(m.unit, "millimeter");
    assert_eq!(
        m.ns,
        "http://schemas.microsoft.com/3dmanufacturing/core/2015/02"
    );
    assert_eq!(m.objects.len(), 2);
    assert_eq!(
        m.objects[0].1,
        parts[0].name(),
        "names survive XML escaping"
    );
    assert_eq!(m.items, vec![("1".into(), None), ("2".into(), None)]);
    let mut tri_total = 0;
    for ((kind, _, verts, tris), part) in m.objects.iter().zip(&parts) {
        assert_eq!(kind, "model");
        assert_eq!(verts.len(), part.mesh().vertices.len());
        tri_total += tris.len();
        // Same, ch. 4.1: indices in range, three distinct vertices per triangle, and a
        // manifold, consistently oriented mesh: every edge appears exactly once in each
        // direction.
        let mut edges: HashMap<(usize, usize), i32> = HashMap::new();
        for t in tris {
            assert!(t.iter().all(|&i| i < verts.len()));
            assert!(t[0] != t[1] && t[1] != t[2] && t[0] != t[2]);
            for k in 0..3 {
                *edges.entry((t[k], t[(k + 1) % 3])).or_default() += 1;
            }
        }
        for (&(a, b), &c) in &edges {
            assert_eq!(c, 1, "edge ({a}, {b}) used {c} times");
            assert_eq!(edges.get(&(b, a)), Some(&1), "edge ({a}, {b}) has no twin");
        }
        // Positions come back exactly (shortest round-trip decimals).
        for (v, p) in verts.iter().zip(&part.mesh().vertices) {
            assert_eq!(*v, [p.x, p.y, p.z]);
        }
    }
    // Triangle count equals the STL's facet count (parsed from the binary layout).
    let stl = dir.path().join("two.stl");
    write_mesh(&stl, MeshFormat::Stl, &parts).unwrap();
    let b = std::fs::read(stl).unwrap();
    assert_eq!(
        tri_total as u32,
        u32::from_le_bytes([b[80], b[81], b[82], b[83]])
    );
    // Vertex count equals the number of distinct STL corners (stl_io indexes them).
    let indexed = stl_io::read_stl(&mut Cursor::new(&b)).unwrap();
    let vert_total: usize = m.objects.iter().map(|o| o.2.len()).sum();
    assert_eq!(vert_total, indexed.vertices.len());
}

#[test]
fn threemf_transforms_use_row_vector_convention() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("placed.3mf");
    let parts = parts();
    let shift = Matrix4::new_translation(&Vector3::new(100.0, 0.0, -3.5));
    let turn = Matrix4::from_axis_angle(&Vector3::z_axis(), std::f64::consts::FRAC_PI_2);
    write_3mf_file(&path, &parts, Some(&[shift, turn])).unwrap();
    let m = parse_model(&unzip(&std::fs::read(&path).unwrap())[2].1);
    // 3MF Core Specification, ch. 3.3 "3D Matrices": "m00 m01 m02 m10 m11 m12 m20 m21
    // m22 m30 m31 m32", points are row vectors: p' = [x y z 1] * M.
    let read = |s: &str| -> Vec<f64> { s.split(' ').map(|x| x.parse().unwrap()).collect() };
    let t0 = read(m.items[0].1.as_deref().unwrap());
    assert_eq!(t0, vec![1., 0., 0., 0., 1., 0., 0., 0., 1., 100., 0., -3.5]);
    let t1 = read(m.items[1].1.as_deref().unwrap());
    let p = Point3::new(1.0, 0.0, 0.0);
    let q = [
        p.x * t1[0] + p.y * t1[3] + p.z * t1[6] + t1[9],
        p.x * t1[1] + p.y * t1[4] + p.z * t1[7] + t1[10],
        p.x * t1[2] + p.y * t1[5] + p.z * t1[8] + t1[11],
    ];
    let expect = turn.transform_point(&p);
    for k in 0..3 {
        assert!((q[k] - expect[k]).abs() < 1e-12);
    }
    // A mirror is refused and nothing is written.
    let bad = dir.path().join("mirror.3mf");
    let mirror = Matrix4::new_nonuniform_scaling(&Vector3::new(-1.0, 1.0, 1.0));
    let e = write_3mf_file(&bad, &parts, Some(&[shift, mirror])).unwrap_err();
    assert!(
        matches!(e, ExportError::BadPlacement { index: 1, .. }),
        "{e}"
    );
    assert!(!bad.exists());
}

#[test]
fn same_input_same_bytes() {
    let dir = tempfile::tempdir().unwrap();
    let (d1, d2) = (dir.path().join("1"), dir.path().join("2"));
    std::fs::create_dir_all(&d1).unwrap();
    std::fs::create_dir_all(&d2).unwrap();
    let parts = parts();
    for f in MESH_FORMATS {
        let name = format!("{}.{}", Format::Mesh(f).name(), f.extension());
        write_mesh(&d1.join(&name), f, &parts).unwrap();
    }
    // A clock tick later, so a time stamp would show.
    std::thread::sleep(std::time::Duration::from_millis(2100));
    for f in MESH_FORMATS {
        let name = format!("{}.{}", Format::Mesh(f).name(), f.extension());
        write_mesh(&d2.join(&name), f, &parts.clone()).unwrap();
        let (x, y) = (
            std::fs::read(d1.join(&name)).unwrap(),
            std::fs::read(d2.join(&name)).unwrap(),
        );
        assert!(x == y, "{} differs between two runs", Format::Mesh(f));
    }
}

fn dir_is_empty(p: &Path) -> bool {
    std::fs::read_dir(p).unwrap().next().is_none()
}

#[test]
fn failed_writes_leave_nothing() {
    let dir = tempfile::tempdir().unwrap();
    // The writer fails after writing half a file.
    let path = dir.path().join("half.stl");
    let e = write_atomic(&path, |w| {
        w.write_all(&[7u8; 5000])?;
        Err(std::io::Error::other("simulated failure midway"))
    })
    .unwrap_err();
    assert!(e.to_string().contains("half.stl"), "{e}");
    assert!(
        dir_is_empty(dir.path()),
        "temporary or partial file left behind"
    );

    // A broken mesh never reaches a writer: it cannot become a checked part. The
    // rejection names the part and the triangle.
    let mut broken = raw_parts();
    broken[1].mesh.triangles[3] = [0, 1, 99];
    let e = certify(broken.swap_remove(1), &CheckOptions::DEFAULT).unwrap_err();
    assert_eq!(e.name, "block");
    assert!(e.to_string().contains("vertex index"), "{e}");
    let mut nan = raw_parts();
    nan[0].mesh.vertices[5].y = f64::NAN;
    let e = certify(nan.swap_remove(0), &CheckOptions::DEFAULT).unwrap_err();
    assert!(e.to_string().contains('5'), "{e}");
    assert!(matches!(
        write_mesh(&dir.path().join("x.stl"), MeshFormat::Stl, &[]),
        Err(ExportError::NoParts { .. })
    ));
    assert!(dir_is_empty(dir.path()));
}
