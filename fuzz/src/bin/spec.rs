//! AFL++ entry point for the spec reader: see `arithvec_fuzz::targets::spec`.

fn main() {
    let scratch = arithvec_fuzz::targets::Scratch::new();
    afl::fuzz(true, |data: &[u8]| {
        arithvec_fuzz::targets::spec(data, &scratch)
    });
}
