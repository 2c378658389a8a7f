//! Pictures (SVG) and reports (HTML, JSON).
