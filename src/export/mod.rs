//! Writers: binary and ASCII STL, OBJ, 3MF, STEP; every file written atomically.
