//! Rotors: assembly, rotation sense, hub body, and design tables from optimum-rotor theory.
