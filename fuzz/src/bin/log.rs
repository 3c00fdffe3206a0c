//! AFL++ entry point for the log reader: see `arithvec_fuzz::targets::log`.

fn main() {
    let scratch = arithvec_fuzz::targets::Scratch::new();
    afl::fuzz(true, |data: &[u8]| {
        arithvec_fuzz::targets::log(data, &scratch)
    });
}
