//! Printer fit: build volumes, orientation search, plate layouts, printability.
