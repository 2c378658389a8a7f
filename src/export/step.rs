//! STEP physical files (ISO 10303-21) of exact solids, written by truck-stepio with our
//! own header.

use super::{write_atomic, ExportError};
use nalgebra::Matrix4;
use std::path::Path;
use truck_modeling::Solid;
use truck_stepio::out::{CompleteStepDisplay, StepHeaderDescriptor, StepModels};
use truck_topology::compress::CompressedSolid;

/// The header of a STEP file (ISO 10303-21, section 8: FILE_DESCRIPTION, FILE_NAME,
/// FILE_SCHEMA) plus the product name. Strings are quoted and escaped on writing.
#[derive(Debug, Clone, PartialEq)]
pub struct StepHeader {
    /// Product name, written into PRODUCT and shown by CAD programs. Default `blade`.
    pub product: String,
    /// Free-text description (FILE_DESCRIPTION). Default: exact solid made by spanwright.
    pub description: String,
    /// ISO 8601 time stamp, `YYYY-MM-DDThh:mm:ss`. Default `2000-01-01T00:00:00`, fixed
    /// so the same input gives the same bytes; pass the real time if you want it.
    pub time_stamp: String,
    /// Authors. Default none (written as one empty string).
    pub authors: Vec<String>,
    /// Organisations. Default none (written as one empty string).
    pub organizations: Vec<String>,
    /// Who authorised the file. Default empty.
    pub authorization: String,
}

impl Default for StepHeader {
    fn default() -> Self {
        Self {
            product: "blade".into(),
            description: "exact solid (B-spline boundary representation) made by spanwright".into(),
            time_stamp: "2000-01-01T00:00:00".into(),
            authors: Vec::new(),
            organizations: Vec::new(),
            authorization: String::new(),
        }
    }
}

impl StepHeader {
    /// The default header for a design named `name`: product `name`, description naming
    /// it, fixed time stamp.
    pub fn for_design(name: &str) -> Self {
        Self {
            product: name.to_string(),
            description: format!(
                "{name}: exact solid (B-spline boundary representation) made by spanwright"
            ),
            ..Self::default()
        }
    }
}

/// The schema of the data truck-stepio writes: its APPLICATION_PROTOCOL_DEFINITION
/// names `automotive_design` (ISO 10303-214), so the header must name AP214's schema.
pub const STEP_SCHEMA: &str = "AUTOMOTIVE_DESIGN { 1 0 10303 214 1 1 1 1 }";

/// A STEP string literal (ISO 10303-21, 6.4.3): quoted with `'`; `'` doubled, `\`
/// doubled; characters outside printable ASCII as `\X2\hhhh\X0\` (UTF-16, upper-case hex).
pub fn step_string(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('\'');
    let mut wide: Vec<u16> = Vec::new();
    let flush = |out: &mut String, wide: &mut Vec<u16>| {
        if !wide.is_empty() {
            out.push_str("\\X2\\");
            for u in wide.iter() {
                out.push_str(&format!("{u:04X}"));
            }
            out.push_str("\\X0\\");
            wide.clear();
        }
    };
    for c in s.chars() {
        if (' '..='~').contains(&c) {
            flush(&mut out, &mut wide);
            match c {
                '\'' => out.push_str("''"),
                '\\' => out.push_str("\\\\"),
                _ => out.push(c),
            }
        } else {
            let mut buf = [0u16; 2];
            wide.extend_from_slice(c.encode_utf16(&mut buf));
        }
    }
    flush(&mut out, &mut wide);
    out.push('\'');
    out
}

fn step_list(items: &[String]) -> String {
    if items.is_empty() {
        return "('')".into();
    }
    let v: Vec<String> = items.iter().map(|s| step_string(s)).collect();
    format!("({})", v.join(", "))
}

/// Our header section, replacing truck-stepio's (which names no schema a reader knows,
/// writes the time of day and does not escape quotes).
fn header_section(file_name: &str, h: &StepHeader) -> String {
    let system = concat!("spanwright ", env!("CARGO_PKG_VERSION"));
    format!(
        "HEADER;\nFILE_DESCRIPTION(({}), '2;1');\nFILE_NAME({}, {}, {}, {}, {}, {}, {});\n\
         FILE_SCHEMA(({}));\nENDSEC;\n",
        step_string(&h.description),
        step_string(file_name),
        step_string(&h.time_stamp),
        step_list(&h.authors),
        step_list(&h.organizations),
        step_string(system),
        step_string(concat!(
            "spanwright ",
            env!("CARGO_PKG_VERSION"),
            " with truck-stepio 0.3"
        )),
        step_string(&h.authorization),
        step_string(STEP_SCHEMA),
    )
}

/// truck-stepio's own text of `solids` (its header, one product), with our time stamp.
fn truck_text(solids: &[(String, Solid)], header: &StepHeader) -> String {
    let compressed: Vec<CompressedSolid<_, _, _>> =
        solids.iter().map(|(_, s)| s.compress()).collect();
    let models: StepModels<_, _, _> = compressed.iter().collect();
    CompleteStepDisplay::new(
        models,
        StepHeaderDescriptor {
            time_stamp: header.time_stamp.clone(),
            ..StepHeaderDescriptor::default()
        },
    )
    .to_string()
}

/// The whole STEP text of `solids` (each with a name) in one product, faces written as
/// ADVANCED_FACE. Units are
/// millimetres (truck-stepio writes `SI_UNIT(.MILLI.,.METRE.)`), uncertainty 1e-6 mm.
/// `file_name` goes into FILE_NAME. Deterministic: the same input gives the same text.
pub fn step_text(solids: &[(String, Solid)], header: &StepHeader, file_name: &str) -> String {
    let text = truck_text(solids, header);
    // Replace truck's header section with ours.
    let data_at = text.find("DATA;\n").unwrap_or(0);
    let mut out = String::with_capacity(text.len() + 512);
    out.push_str("ISO-10303-21;\n");
    out.push_str(&header_section(file_name, header));
    let mut rest = &text[data_at..];
    // Name the product and each solid (truck writes empty names).
    let product = step_string(&header.product);
    if let Some(k) = rest.find("PRODUCT('','','',") {
        out.push_str(&rest[..k]);
        out.push_str(&format!("PRODUCT({product},{product},'',"));
        rest = &rest[k + "PRODUCT('','','',".len()..];
    }
    const BREP: &str = "MANIFOLD_SOLID_BREP('',";
    for (name, _) in solids {
        let Some(k) = rest.find(BREP) else { break };
        out.push_str(&rest[..k]);
        out.push_str(&format!("MANIFOLD_SOLID_BREP({},", step_string(name)));
        rest = &rest[k + BREP.len()..];
    }
    out.push_str(rest);
    // An ADVANCED_BREP_SHAPE_REPRESENTATION holds advanced faces only (ISO 10303-514,
    // also required by AP214); truck writes the supertype FACE_SURFACE with the same
    // attributes, so the subtype name is exact.
    out.replace(" = FACE_SURFACE(", " = ADVANCED_FACE(")
}

/// Writes `solids` (name, solid) to `path` as one STEP file, atomically. The file name in
/// the header is the last component of `path`.
///
/// # Errors
/// [`ExportError::NoParts`] for an empty list, [`ExportError::Solid`] for a knot vector
/// a reader would misread ([`crate::brep::check_knots`]), [`ExportError::Write`].
pub fn write_step(
    path: &Path,
    solids: &[(String, Solid)],
    header: &StepHeader,
) -> Result<(), ExportError> {
    if solids.is_empty() {
        return Err(ExportError::NoParts {
            path: path.to_path_buf(),
        });
    }
    for (_, s) in solids {
        crate::brep::check_knots(s)?;
    }
    let file_name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let text = step_text(solids, header, &file_name);
    Ok(write_atomic(path, |w| w.write_all(text.as_bytes()))?)
}

/// A STEP real (ISO 10303-21, 6.4.2): a decimal point always, an exponent when the
/// magnitude is small or large; the shortest digits that read back to the same `f64`,
/// so the text is deterministic.
pub fn step_real(x: f64) -> String {
    if x == 0.0 {
        return "0.".into();
    }
    let a = x.abs();
    if (1e-3..1e15).contains(&a) {
        format!("{x:?}")
    } else {
        let s = format!("{x:E}");
        match s.split_once('E') {
            Some((m, e)) if !m.contains('.') => format!("{m}.E{e}"),
            _ => s,
        }
    }
}

/// The data section entities of truck-stepio's text of `solids`, without its one
/// product and shape representation (entities #3 to #10), the manifold solids named;
/// returns the text (one entity or complex entity per record), the entity numbers of
/// the manifold solids, and the largest entity number.
fn solid_entities(solids: &[(String, Solid)], header: &StepHeader) -> (String, Vec<usize>, usize) {
    let text = truck_text(solids, header);
    let data = text
        .find("DATA;\n")
        .map(|k| &text[k + "DATA;\n".len()..])
        .unwrap_or("");
    let data = data.rfind("ENDSEC;").map(|k| &data[..k]).unwrap_or(data);
    let mut out = String::with_capacity(data.len());
    let mut breps = Vec::new();
    let mut max_id = 0usize;
    let mut names = solids.iter().map(|(n, _)| n);
    for line in data.split_inclusive('\n') {
        let id = line
            .strip_prefix('#')
            .and_then(|r| r.split_once(" = "))
            .and_then(|(n, _)| n.parse::<usize>().ok());
        if let Some(id) = id {
            max_id = max_id.max(id);
            if (3..=10).contains(&id) {
                continue;
            }
            if let Some(rest) = line.split_once(" = MANIFOLD_SOLID_BREP('',").map(|x| x.1) {
                breps.push(id);
                let name = names.next().map(|n| step_string(n)).unwrap_or("''".into());
                out.push_str(&format!("#{id} = MANIFOLD_SOLID_BREP({name},{rest}"));
                continue;
            }
        }
        out.push_str(line);
    }
    // ISO 10303-514: an advanced B-rep's faces are ADVANCED_FACE (see step_text).
    (
        out.replace(" = FACE_SURFACE(", " = ADVANCED_FACE("),
        breps,
        max_id,
    )
}

/// Numbered entities appended after truck's.
struct Entities {
    next: usize,
    text: String,
}

impl Entities {
    fn add(&mut self, body: String) -> usize {
        let id = self.next;
        self.next += 1;
        self.text.push_str(&format!("#{id} = {body};\n"));
        id
    }

    /// AXIS2_PLACEMENT_3D of a rigid transform (location, z axis, x axis).
    fn placement(&mut self, m: &Matrix4<f64>) -> usize {
        let v = |x: f64, y: f64, z: f64| {
            format!("({}, {}, {})", step_real(x), step_real(y), step_real(z))
        };
        let p = self.add(format!(
            "CARTESIAN_POINT('', {})",
            v(m[(0, 3)], m[(1, 3)], m[(2, 3)])
        ));
        let z = self.add(format!(
            "DIRECTION('', {})",
            v(m[(0, 2)], m[(1, 2)], m[(2, 2)])
        ));
        let x = self.add(format!(
            "DIRECTION('', {})",
            v(m[(0, 0)], m[(1, 0)], m[(2, 0)])
        ));
        self.add(format!("AXIS2_PLACEMENT_3D('', #{p}, #{z}, #{x})"))
    }

    /// PRODUCT .. PRODUCT_DEFINITION_SHAPE of a product named `name`; returns the
    /// product, its definition and its definition's shape.
    fn product(&mut self, name: &str, ctx: (usize, usize)) -> (usize, usize, usize) {
        let n = step_string(name);
        let prod = self.add(format!("PRODUCT({n}, {n}, '', (#{}))", ctx.0));
        let pdf = self.add(format!("PRODUCT_DEFINITION_FORMATION('', '', #{prod})"));
        let pd = self.add(format!(
            "PRODUCT_DEFINITION('design', '', #{pdf}, #{})",
            ctx.1
        ));
        let pds = self.add(format!("PRODUCT_DEFINITION_SHAPE('', '', #{pd})"));
        (prod, pd, pds)
    }
}

/// Checks that every placement is a rigid motion (rotation and translation, no scale,
/// shear or mirror), within 1e-9.
fn check_rigid(names: &[String], instances: &[(usize, Matrix4<f64>)]) -> Result<(), ExportError> {
    for (k, (p, m)) in instances.iter().enumerate() {
        let part = names.get(*p).cloned().unwrap_or_default();
        let bad = |problem: String| ExportError::BadPlacement {
            index: k,
            part: part.clone(),
            problem,
        };
        if *p >= names.len() {
            return Err(bad(format!(
                "it places product {p}, but there are {} products; give an index below {}",
                names.len(),
                names.len()
            )));
        }
        if m.iter().any(|x| !x.is_finite()) {
            return Err(bad("it holds a value that is not finite".into()));
        }
        let r = m.fixed_view::<3, 3>(0, 0);
        let off = (r.transpose() * r - nalgebra::Matrix3::identity())
            .abs()
            .max();
        let det = r.determinant();
        let row =
            (m[(3, 0)].abs() + m[(3, 1)].abs() + m[(3, 2)].abs() + (m[(3, 3)] - 1.0).abs()) > 1e-12;
        if off > 1e-9 || det < 0.0 || row {
            return Err(bad(format!(
                "not a rigid motion (rotation error {off:.1e}, determinant {det:.6}); pass a rotation and translation only (no scale, shear or mirror)"
            )));
        }
    }
    Ok(())
}

/// The STEP text of an assembly (ISO 10303-21 with the product structure of AP214 /
/// AP242, which CAD programs show as a tree): one product per distinct part
/// (`products`: name, exact solid in the part's own coordinates), one placed
/// instance per entry of `instances` (product index, rigid placement from the part's
/// coordinates to the assembly's), under an assembly product named `header.product`.
///
/// ```text
/// PRODUCT(assembly) -- PRODUCT_DEFINITION <- NEXT_ASSEMBLY_USAGE_OCCURRENCE -> PRODUCT_DEFINITION -- PRODUCT(part)
///   SHAPE_REPRESENTATION (placements)         ^ PRODUCT_DEFINITION_SHAPE         ADVANCED_BREP_SHAPE_REPRESENTATION (solid, origin)
///        ^                                    CONTEXT_DEPENDENT_SHAPE_REPRESENTATION
///        +---- (REPRESENTATION_RELATIONSHIP with ITEM_DEFINED_TRANSFORMATION: part origin -> placement)
/// ```
///
/// Deterministic: the same input gives the same text.
///
/// # Errors
/// [`ExportError::NoParts`] without products or instances; [`ExportError::BadPlacement`]
/// for an index out of range or a placement that is not a rigid motion;
/// [`ExportError::Solid`] for a knot vector a reader would misread.
pub fn step_assembly_text(
    products: &[(String, Solid)],
    instances: &[(usize, Matrix4<f64>)],
    header: &StepHeader,
    file_name: &str,
) -> Result<String, ExportError> {
    if products.is_empty() || instances.is_empty() {
        return Err(ExportError::NoParts {
            path: file_name.into(),
        });
    }
    let names: Vec<String> = products.iter().map(|(n, _)| n.clone()).collect();
    check_rigid(&names, instances)?;
    for (_, s) in products {
        crate::brep::check_knots(s)?;
    }
    let (body, breps, max_id) = solid_entities(products, header);
    let mut e = Entities {
        next: max_id + 1,
        text: String::new(),
    };
    // #2 is truck's APPLICATION_CONTEXT, #11 its geometric context (mm, 1e-6 mm).
    let pc = e.add("PRODUCT_CONTEXT('', #2, 'mechanical')".into());
    let pdc = e.add("PRODUCT_DEFINITION_CONTEXT('part definition', #2, 'design')".into());
    let identity = Matrix4::identity();
    let mut parts = Vec::with_capacity(products.len());
    let mut all_products = Vec::new();
    for ((name, _), brep) in products.iter().zip(&breps) {
        let (prod, pd, pds) = e.product(name, (pc, pdc));
        let origin = e.placement(&identity);
        let rep = e.add(format!(
            "ADVANCED_BREP_SHAPE_REPRESENTATION({}, (#{brep}, #{origin}), #11)",
            step_string(name)
        ));
        e.add(format!("SHAPE_DEFINITION_REPRESENTATION(#{pds}, #{rep})"));
        parts.push((pd, rep, origin));
        all_products.push(prod);
    }
    let (prod, pd_a, pds_a) = e.product(&header.product, (pc, pdc));
    all_products.push(prod);
    let origin_a = e.placement(&identity);
    let placed: Vec<usize> = instances.iter().map(|(_, m)| e.placement(m)).collect();
    let items: Vec<String> = std::iter::once(origin_a)
        .chain(placed.iter().copied())
        .map(|i| format!("#{i}"))
        .collect();
    let rep_a = e.add(format!(
        "SHAPE_REPRESENTATION({}, ({}), #11)",
        step_string(&header.product),
        items.join(", ")
    ));
    e.add(format!(
        "SHAPE_DEFINITION_REPRESENTATION(#{pds_a}, #{rep_a})"
    ));
    let list: Vec<String> = all_products.iter().map(|i| format!("#{i}")).collect();
    e.add(format!(
        "PRODUCT_RELATED_PRODUCT_CATEGORY('part', $, ({}))",
        list.join(", ")
    ));
    let mut copies = vec![0usize; products.len()];
    for (k, ((p, _), place)) in instances.iter().zip(&placed).enumerate() {
        let (pd, rep, origin) = parts[*p];
        copies[*p] += 1;
        let label = step_string(&format!("{}-{}", names[*p], copies[*p]));
        let nauo = e.add(format!(
            "NEXT_ASSEMBLY_USAGE_OCCURRENCE('{}', {label}, '', #{pd_a}, #{pd}, $)",
            k + 1
        ));
        let pds = e.add(format!("PRODUCT_DEFINITION_SHAPE({label}, '', #{nauo})"));
        let idt = e.add(format!(
            "ITEM_DEFINED_TRANSFORMATION('', '', #{origin}, #{place})"
        ));
        let rr = e.add(format!(
            "( REPRESENTATION_RELATIONSHIP('', '', #{rep}, #{rep_a}) REPRESENTATION_RELATIONSHIP_WITH_TRANSFORMATION(#{idt}) SHAPE_REPRESENTATION_RELATIONSHIP() )"
        ));
        e.add(format!(
            "CONTEXT_DEPENDENT_SHAPE_REPRESENTATION(#{rr}, #{pds})"
        ));
    }
    let mut out = String::with_capacity(body.len() + e.text.len() + 1024);
    out.push_str("ISO-10303-21;\n");
    out.push_str(&header_section(file_name, header));
    out.push_str("DATA;\n");
    out.push_str(&body);
    out.push_str(&e.text);
    out.push_str("ENDSEC;\nEND-ISO-10303-21;\n");
    Ok(out)
}

/// Writes an assembly (see [`step_assembly_text`]) to `path`, atomically.
///
/// # Errors
/// See [`step_assembly_text`]; [`ExportError::Write`].
pub fn write_step_assembly(
    path: &Path,
    products: &[(String, Solid)],
    instances: &[(usize, Matrix4<f64>)],
    header: &StepHeader,
) -> Result<(), ExportError> {
    let file_name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let text =
        step_assembly_text(products, instances, header, &file_name).map_err(|e| match e {
            ExportError::NoParts { .. } => ExportError::NoParts {
                path: path.to_path_buf(),
            },
            other => other,
        })?;
    Ok(write_atomic(path, |w| w.write_all(text.as_bytes()))?)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn strings_are_escaped() {
        // ISO 10303-21, 6.4.3: apostrophe and backslash doubled, \X2\ for UCS-2.
        assert_eq!(step_string("it's"), "'it''s'");
        assert_eq!(step_string("a\\b"), "'a\\\\b'");
        assert_eq!(step_string("Müller"), "'M\\X2\\00FC\\X0\\ller'");
        assert_eq!(step_list(&[]), "('')");
        // ISO 10303-21, 6.4.2: a real has a decimal point; exponent with E.
        assert_eq!(step_real(1.0), "1.0");
        assert_eq!(step_real(0.0), "0.");
        assert_eq!(step_real(-2.5e-7), "-2.5E-7");
        assert_eq!(step_real(1e-7), "1.E-7");
        assert_eq!(step_real(123.25), "123.25");
    }
}
