//! The error type of the exact solids in [`crate::brep`].

/// Why an exact solid could not be built. A caller that gets one of these must not write
/// a STEP file for that part: the exact solid would differ from the mesh.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BrepError {
    /// A surface model the solid cannot be built from.
    #[error("surface model: {key} = {value}: {problem}; {fix}")]
    BadSkin {
        /// The field of [`crate::loft::Skin`] that is wrong.
        key: &'static str,
        /// The offending value.
        value: String,
        /// What is wrong.
        problem: String,
        /// How to fix it.
        fix: &'static str,
    },
    /// A feature (hole, flange, split plane, hub part) that does not fit the part, so no
    /// valid solid has it.
    #[error("{feature}: {problem}; {fix}")]
    BadFeature {
        /// Which feature, e.g. `end hole 1` or `split plane z = 120 mm`.
        feature: String,
        /// What is wrong, with the values.
        problem: String,
        /// How to fix it.
        fix: String,
    },
    /// A feature that cannot be represented exactly as the mesh builds it. STEP must be
    /// refused for the part (never written differing from the mesh).
    #[error("{feature} cannot be made exact in the STEP solid: {reason}")]
    NotExact {
        /// Which feature.
        feature: &'static str,
        /// Why, and what would make it exact.
        reason: String,
    },
    /// A knot vector a STEP reader would misread (see [`crate::brep::check_knots`]).
    #[error("{entity}: knot vector {knots}: {problem}. This is a bug in the solid builder: please report it with the design file")]
    BadKnots {
        /// Which curve or surface (face or edge number, direction).
        entity: String,
        /// The knot values and multiplicities as a STEP reader would see them.
        knots: String,
        /// What is wrong.
        problem: String,
    },
    /// The B-rep kernel refused an edge, face, shell or solid built from checked input.
    #[error(
        "the B-rep kernel refused the {what}: {detail}. The input passed our checks, so this \
         is a bug: please report it with the design file"
    )]
    Kernel {
        /// Which entity was refused (edge, face, shell, solid).
        what: &'static str,
        /// The kernel's message or the failed check.
        detail: String,
    },
}

impl BrepError {
    /// A [`BrepError::BadFeature`].
    pub(crate) fn feature(
        feature: impl Into<String>,
        problem: impl Into<String>,
        fix: impl Into<String>,
    ) -> BrepError {
        BrepError::BadFeature {
            feature: feature.into(),
            problem: problem.into(),
            fix: fix.into(),
        }
    }

    /// A [`BrepError::Kernel`] from a truck error.
    pub(crate) fn kernel(
        what: &'static str,
    ) -> impl Fn(truck_topology::errors::Error) -> BrepError {
        move |e| BrepError::Kernel {
            what,
            detail: e.to_string(),
        }
    }
}
