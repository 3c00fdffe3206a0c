//! AFL++ entry point for the manifest reader: see `arithvec_fuzz::targets::manifest`.

fn main() {
    let scratch = arithvec_fuzz::targets::Scratch::new();
    afl::fuzz(true, |data: &[u8]| {
        arithvec_fuzz::targets::manifest(data, &scratch)
    });
}
