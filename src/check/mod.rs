//! Checks of finished solids: closed, consistently oriented 2-manifold, positive volume,
//! no degenerate triangles, one component, no self-intersection.
