//! AFL++ entry point for the hex reader: see `arithvec_fuzz::targets::hex`.

fn main() {
    let scratch = arithvec_fuzz::targets::Scratch::new();
    afl::fuzz(true, |data: &[u8]| {
        arithvec_fuzz::targets::hex(data, &scratch)
    });
}
