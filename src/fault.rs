//! Single stuck-at faults (placeholder while the netlist compiles).
