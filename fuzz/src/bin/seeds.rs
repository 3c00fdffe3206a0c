//! Writes the small vector sets the manifest and hex targets read as seed files:
//! `seeds DIR` gives `DIR/manifest/NAME.json` and `DIR/hex/NAME.{stimulus,expected}.hex`
//! (run by scripts/fuzz-seeds.sh). Not a fuzz target.

fn main() {
    let Some(dir) = std::env::args_os().nth(1) else {
        eprintln!("usage: seeds DIR");
        std::process::exit(2);
    };
    if let Err(e) = arithvec_fuzz::targets::write_set_seeds(std::path::Path::new(&dir)) {
        eprintln!("seeds: {e}");
        std::process::exit(1);
    }
}
