//! STEP physical files (ISO 10303-21) of exact solids, written by truck-stepio with our
//! own header.

use super::{write_atomic, ExportError};
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

/// The whole STEP text of `solids` (each with a name) in one product, faces written as
/// ADVANCED_FACE. Units are
/// millimetres (truck-stepio writes `SI_UNIT(.MILLI.,.METRE.)`), uncertainty 1e-6 mm.
/// `file_name` goes into FILE_NAME. Deterministic: the same input gives the same text.
pub fn step_text(solids: &[(String, Solid)], header: &StepHeader, file_name: &str) -> String {
    let compressed: Vec<CompressedSolid<_, _, _>> =
        solids.iter().map(|(_, s)| s.compress()).collect();
    let models: StepModels<_, _, _> = compressed.iter().collect();
    let text = CompleteStepDisplay::new(
        models,
        StepHeaderDescriptor {
            time_stamp: header.time_stamp.clone(),
            ..StepHeaderDescriptor::default()
        },
    )
    .to_string();
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
/// [`ExportError::NoParts`] for an empty list, [`ExportError::Io`].
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
    let file_name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let text = step_text(solids, header, &file_name);
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
    }
}
