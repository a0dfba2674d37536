//! The thermal network and its one solver (being written).
