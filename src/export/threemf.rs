//! 3MF writer (3MF Core Specification, 3MF Consortium): an OPC zip package holding
//! `[Content_Types].xml`, `_rels/.rels` and the model part `3D/3dmodel.model` with one
//! mesh object per part and one build item per object.

use super::obj::clean;
use super::ExportError;
use crate::check::CheckedPart;
use nalgebra::Matrix4;
use quick_xml::escape::escape;
use std::fmt::Write as _;
use std::io::{self, Cursor, Write};
use zip::write::SimpleFileOptions;
use zip::{CompressionMethod, DateTime, ZipWriter};

/// Path of the model part inside the package.
pub const MODEL_PATH: &str = "3D/3dmodel.model";
/// Relationship type of the start part (3MF Core Specification, "3D Model" relationship).
pub const MODEL_REL_TYPE: &str = "http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel";
/// Namespace of the 3MF core model (2015/02).
pub const CORE_NS: &str = "http://schemas.microsoft.com/3dmanufacturing/core/2015/02";
/// Content type of the model part.
pub const MODEL_CONTENT_TYPE: &str = "application/vnd.ms-package.3dmanufacturing-3dmodel+xml";
/// Content type of relationship parts (Open Packaging Conventions).
pub const RELS_CONTENT_TYPE: &str = "application/vnd.openxmlformats-package.relationships+xml";

const CONTENT_TYPES: &str = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n\
<Types xmlns=\"http://schemas.openxmlformats.org/package/2006/content-types\">\n\
 <Default Extension=\"rels\" ContentType=\"application/vnd.openxmlformats-package.relationships+xml\"/>\n\
 <Default Extension=\"model\" ContentType=\"application/vnd.ms-package.3dmanufacturing-3dmodel+xml\"/>\n\
</Types>\n";

const RELS: &str = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n\
<Relationships xmlns=\"http://schemas.openxmlformats.org/package/2006/relationships\">\n\
 <Relationship Target=\"/3D/3dmodel.model\" Id=\"rel0\" \
Type=\"http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel\"/>\n\
</Relationships>\n";

/// Checks optional build transforms: one per part, affine (last row `0 0 0 1`) and
/// finite. `None` means every part is placed as it is.
///
/// # Errors
/// [`ExportError::BadPlacement`] naming the placement and the part.
pub fn check_placements(
    parts: &[CheckedPart],
    placements: Option<&[Matrix4<f64>]>,
) -> Result<(), ExportError> {
    let Some(pl) = placements else {
        return Ok(());
    };
    if pl.len() != parts.len() {
        return Err(ExportError::BadPlacement {
            index: pl.len().min(parts.len()),
            part: parts
                .get(pl.len())
                .map(|p| p.name().to_string())
                .unwrap_or_default(),
            problem: format!(
                "{} placements for {} parts; give exactly one transform per part",
                pl.len(),
                parts.len()
            ),
        });
    }
    for (i, (m, part)) in pl.iter().zip(parts).enumerate() {
        let problem = if m.iter().any(|x| !x.is_finite()) {
            Some("the matrix has a non-finite entry".to_string())
        } else if m[(3, 0)] != 0.0 || m[(3, 1)] != 0.0 || m[(3, 2)] != 0.0 || m[(3, 3)] != 1.0 {
            Some(format!(
                "last row is ({}, {}, {}, {}), not (0, 0, 0, 1); 3MF takes affine transforms only",
                m[(3, 0)],
                m[(3, 1)],
                m[(3, 2)],
                m[(3, 3)]
            ))
        } else if m.fixed_view::<3, 3>(0, 0).determinant() <= 0.0 {
            Some("the transform mirrors or collapses the part (determinant <= 0); 3MF build items must keep orientation: mirror the mesh itself instead".to_string())
        } else {
            None
        };
        if let Some(problem) = problem {
            return Err(ExportError::BadPlacement {
                index: i,
                part: part.name().to_string(),
                problem,
            });
        }
    }
    Ok(())
}

/// The model part's XML: `unit="millimeter"`, the core namespace, one
/// `<object type="model">` per part (ids from 1) and one build `<item>` per object, with
/// `transform="m00 m01 m02 m10 m11 m12 m20 m21 m22 m30 m31 m32"` when a placement is
/// given (the specification's row-vector convention: the transpose of our column-vector
/// matrix, translation in the last row).
pub fn model_xml(parts: &[CheckedPart], placements: Option<&[Matrix4<f64>]>) -> String {
    let estimate: usize = parts
        .iter()
        .map(|p| 64 * p.mesh().vertices.len() + 48 * p.mesh().triangles.len())
        .sum();
    let mut s = String::with_capacity(estimate + 1024);
    s.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    let _ = writeln!(
        s,
        "<model unit=\"millimeter\" xml:lang=\"en-US\" xmlns=\"{CORE_NS}\">"
    );
    s.push_str(" <metadata name=\"Application\">spanwright</metadata>\n <resources>\n");
    for (k, part) in parts.iter().enumerate() {
        let _ = writeln!(
            s,
            "  <object id=\"{}\" type=\"model\" name=\"{}\">\n   <mesh>\n    <vertices>",
            k + 1,
            escape(part.name())
        );
        for p in &part.mesh().vertices {
            let _ = writeln!(
                s,
                "     <vertex x=\"{}\" y=\"{}\" z=\"{}\"/>",
                clean(p.x),
                clean(p.y),
                clean(p.z)
            );
        }
        s.push_str("    </vertices>\n    <triangles>\n");
        for t in &part.mesh().triangles {
            let _ = writeln!(
                s,
                "     <triangle v1=\"{}\" v2=\"{}\" v3=\"{}\"/>",
                t[0], t[1], t[2]
            );
        }
        s.push_str("    </triangles>\n   </mesh>\n  </object>\n");
    }
    s.push_str(" </resources>\n <build>\n");
    for k in 0..parts.len() {
        let _ = write!(s, "  <item objectid=\"{}\"", k + 1);
        if let Some(m) = placements.and_then(|pl| pl.get(k)) {
            s.push_str(" transform=\"");
            // Row-vector convention: row r of the 4x3 matrix is column r of ours.
            for c in 0..4 {
                for r in 0..3 {
                    if c + r > 0 {
                        s.push(' ');
                    }
                    let _ = write!(s, "{}", clean(m[(r, c)]));
                }
            }
            s.push('"');
        }
        s.push_str("/>\n");
    }
    s.push_str(" </build>\n</model>\n");
    s
}

/// Writes the parts as one 3MF package. Entries are written in a fixed order with a fixed
/// time (1980-01-01 00:00:00, the zip epoch), fixed permissions and a fixed compression
/// level, so the same input gives the same bytes.
///
/// A broken placement ([`check_placements`]) is an `InvalidInput` error.
pub fn write_3mf(
    w: &mut dyn Write,
    parts: &[CheckedPart],
    placements: Option<&[Matrix4<f64>]>,
) -> io::Result<()> {
    super::check_placements(parts, placements)
        .map_err(|e| io::Error::new(io::ErrorKind::InvalidInput, e.to_string()))?;
    let model = model_xml(parts, placements);
    let opts = SimpleFileOptions::default()
        .compression_method(CompressionMethod::Deflated)
        .compression_level(Some(1))
        .last_modified_time(DateTime::default())
        .unix_permissions(0o644)
        .system(zip::System::Unix);
    let mut zip = ZipWriter::new(Cursor::new(Vec::with_capacity(model.len() / 3 + 1024)));
    for (name, body) in [
        ("[Content_Types].xml", CONTENT_TYPES),
        ("_rels/.rels", RELS),
        (MODEL_PATH, model.as_str()),
    ] {
        zip.start_file(name, opts).map_err(io::Error::other)?;
        zip.write_all(body.as_bytes())?;
    }
    let bytes = zip.finish().map_err(io::Error::other)?.into_inner();
    w.write_all(&bytes)
}
