//! Sharded runs, merge and regression farms (issue 9 items 7 to 12, issue 12's farm flows):
//! the real `arithvec` binary in a fresh temporary directory per test.
//!
//! Modules: `union` (merge judges the union of seen indices, refuses a run twice, checked
//! sums, incremental merge), `identity` (what a vector set's identity is), `outputs` (output
//! paths that would destroy an input, `-` for standard output), `shards` (Icarus runs of
//! shard testbenches and the whole farm flow against one unsharded run), `engines` (the GNU
//! parallel and Slurm scripts). `sim` holds the simulator plumbing: a missing tool is an
//! error under CI and a loud SKIPPED line otherwise.

// The CLI tests' plumbing, shared; not every helper is used here.
#[path = "../support/mod.rs"]
mod support;
#[allow(dead_code)]
#[path = "../cli/util.rs"]
mod util;

mod engines;
mod identity;
mod outputs;
mod shards;
mod sim;
mod union;
