//! AFL++ entry point for the netlist reader: see `arithvec_fuzz::targets::netlist`.

fn main() {
    let scratch = arithvec_fuzz::targets::Scratch::new();
    afl::fuzz(true, |data: &[u8]| {
        arithvec_fuzz::targets::netlist(data, &scratch)
    });
}
