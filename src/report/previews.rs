//! The 3-D previews a build writes beside its parts: the blade, and the assembled rotor
//! when the design has one, each shaded and seen from upstream, above and to one side
//! ([`View::UPSTREAM_OBLIQUE`]), with the wind and the sense of rotation drawn.

use super::preview::{preview_png, Item, Marks, PreviewOptions, View};
use crate::design::Rotation;
use crate::pipeline::{Outcome, PartKind};
use nalgebra::Matrix4;

/// Blade colour (sRGB).
const BLADE: [u8; 3] = [70, 120, 190];
/// Hub colour (sRGB).
const HUB: [u8; 3] = [150, 150, 150];

/// What the preview pictures show, in words, for the build summary.
pub const PREVIEW_VIEW: &str =
    "seen from upstream, above and to one side; the arrow is the wind, the arc the sense of rotation";

/// The preview pictures of an outcome as (file name, PNG bytes): `<name>-preview.png`
/// for the blade and `<name>-rotor-preview.png` for the assembled rotor.
pub fn previews(outcome: &Outcome, rotation: Rotation) -> Vec<(String, Vec<u8>)> {
    let opts = PreviewOptions {
        view: View::UPSTREAM_OBLIQUE,
        ..PreviewOptions::DEFAULT
    };
    let marks = Marks::blade_frame(rotation, 0.0);
    let blade = Item {
        mesh: outcome.blade_part().mesh(),
        transform: Matrix4::identity(),
        colour: BLADE,
        solid: true,
    };
    // The two pictures are drawn side by side.
    let (blade_png, rotor_png) = rayon::join(
        || preview_png(&[blade], Some(&marks), &opts),
        || {
            let rotor = outcome.part(PartKind::Rotor)?;
            let hub = outcome.part(PartKind::Hub).map(|h| h.bodies[0].name());
            let items: Vec<Item<'_>> = rotor
                .bodies
                .iter()
                .map(|b| Item {
                    mesh: b.mesh(),
                    transform: Matrix4::identity(),
                    colour: if Some(b.name()) == hub { HUB } else { BLADE },
                    solid: true,
                })
                .collect();
            Some((
                format!("{}-preview.png", rotor.name),
                preview_png(&items, Some(&marks), &opts),
            ))
        },
    );
    let mut out = vec![(format!("{}-preview.png", outcome.blade.name), blade_png)];
    out.extend(rotor_png);
    out
}
