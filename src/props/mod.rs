//! Mass and section properties, materials, and the spanwise stress estimate.
