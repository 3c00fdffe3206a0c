use super::*;
use crate::gates::netlist::NetlistBuilder;

/// A tiny deterministic generator for test patterns (xorshift64*; common practice).
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
}

fn random_vectors(nl: &Netlist, count: usize, seed: u64) -> Vec<Vec<Word>> {
    let mut rng = Rng(seed | 1);
    (0..count)
        .map(|_| {
            nl.inputs()
                .iter()
                .map(|p| {
                    let mut w = Word::ZERO;
                    for bit in 0..p.width() {
                        w.set_bit(bit, rng.next() & 1 == 1);
                    }
                    w
                })
                .collect()
        })
        .collect()
}

/// Independent oracle: full re-evaluation of the netlist with the fault injected, no
/// events and no cones. Returns the lanes in which some output differs.
fn oracle_detects(nl: &Netlist, fault: &Fault, inputs: &[u64], mask: u64) -> u64 {
    let mut good = nl.initial_values();
    for (n, &v) in nl.input_nets().iter().zip(inputs) {
        good[n.index()] = v;
    }
    let mut bad = good.clone();
    nl.eval_gates(&mut good);
    let stuck = if fault.stuck_at { !0 } else { 0 };
    if let FaultSite::Stem(n) = fault.site {
        bad[n.index()] = stuck;
    }
    for (g, gate) in nl.gates().iter().enumerate() {
        let mut ins = [0u64; 4];
        for (k, n) in gate.inputs().iter().enumerate() {
            ins[k] = bad[n.index()];
        }
        if let FaultSite::GateInput { gate: fg, pin } = fault.site {
            if fg == g {
                ins[pin] = stuck;
            }
        }
        let out = gate.output();
        bad[out.index()] = if fault.site == FaultSite::Stem(out) {
            stuck
        } else {
            gate.kind().eval(ins)
        };
    }
    let mut diff = 0;
    for (p, port) in nl.outputs().iter().enumerate() {
        for (b, n) in port.nets().iter().enumerate() {
            let faulty = match fault.site {
                FaultSite::OutputBit { port, bit } if port == p && bit as usize == b => stuck,
                _ => bad[n.index()],
            };
            diff |= faulty ^ good[n.index()];
        }
    }
    diff & mask
}

/// A random loop-free netlist over every gate kind, with constants and fan-out.
fn random_netlist(seed: u64) -> Netlist {
    let mut rng = Rng(seed | 1);
    let mut b = NetlistBuilder::new("<random>", "random");
    let mut nets = b.input("i", 1 + (rng.next() % 6) as u32);
    nets.extend(b.input("j", 1 + (rng.next() % 3) as u32));
    if rng.next().is_multiple_of(4) {
        let c = b.constant(rng.next() & 1 == 1);
        nets.push(c);
    }
    let gates = 3 + rng.next() % 25;
    for g in 0..gates {
        let kind = GateKind::ALL[(rng.next() % GateKind::ALL.len() as u64) as usize];
        let ins: Vec<NetId> = (0..kind.arity())
            .map(|_| nets[(rng.next() % nets.len() as u64) as usize])
            .collect();
        let out = b.gate_net(kind, &format!("g{g}"), &ins, "n", Some(g as i64));
        nets.push(out);
    }
    let outs: Vec<NetId> = (0..1 + rng.next() % 4)
        .map(|_| nets[nets.len() - 1 - (rng.next() % 6) as usize % nets.len()])
        .collect();
    b.output("o", &outs);
    b.build().unwrap()
}

#[test]
fn engine_agrees_with_full_reevaluation() {
    for seed in 1..60u64 {
        let nl = random_netlist(seed * 7919);
        let topo = Topology::new(&nl);
        let faults = FaultList::with_topology(&nl, &topo);
        let vectors = random_vectors(&nl, 100, seed);
        let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
        let mut engine = Engine::new(&nl, &topo);
        let mut cone = Vec::new();
        for_each_chunk(&nl, &patterns, 64, |chunk| {
            for (k, &(start, count)) in chunk.blocks.iter().enumerate() {
                let mut inputs = vec![0u64; nl.input_nets().len()];
                patterns.load(start, count, &mut inputs);
                for f in faults.faults() {
                    engine.cone_of(f.site, &mut cone);
                    let mask = lane_mask(count);
                    assert_eq!(
                        engine.detect(f, &cone, chunk.good(k), mask),
                        oracle_detects(&nl, f, &inputs, mask),
                        "seed {seed} {f:?}"
                    );
                }
            }
            true
        });
    }
}

/// The wide passes (four blocks of 64 at once) find exactly the lanes the 64-lane engine
/// finds block by block, and grading and the detection matrix agree with the serial mode,
/// over sets with whole groups, a partial last block, and chunks of 1, 2, 4 and 8 blocks.
#[test]
fn wide_passes_agree_with_single_blocks_and_the_serial_mode() {
    for seed in 1..30u64 {
        let nl = random_netlist(seed * 6271);
        let topo = Topology::new(&nl);
        let faults = FaultList::with_topology(&nl, &topo);
        let count = [700, 1024, 2000, 257][seed as usize % 4];
        let vectors = random_vectors(&nl, count, seed);
        let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
        let mut engine = Engine::new(&nl, &topo);
        let mut cone = Vec::new();
        let mut wide = WideChunk::default();
        let mut groups = 0;
        for_each_chunk(&nl, &patterns, 64, |chunk| {
            wide.fill(chunk);
            for g in 0..wide.groups {
                groups += 1;
                let (good, mask) = wide.group(g);
                for f in faults.faults() {
                    engine.cone_of(f.site, &mut cone);
                    let got = engine.detect_wide(f, &cone, good, mask);
                    for (w, &d) in got.iter().enumerate() {
                        let k = g * WIDE + w;
                        let m = lane_mask(chunk.blocks[k].1);
                        let want = engine.detect(f, &cone, chunk.good(k), m);
                        assert_eq!(d, want, "seed {seed} block {k} {f:?}");
                    }
                }
            }
            true
        });
        assert!(
            count < 448 || groups > 0,
            "seed {seed}: no wide group was run"
        );
        let serial = detection_matrix(&nl, &faults, &patterns, SimulationMode::Serial).unwrap();
        let parallel =
            detection_matrix(&nl, &faults, &patterns, SimulationMode::BitParallel).unwrap();
        assert_eq!(parallel, serial, "seed {seed}: detection matrices");
        let graded = |mode| {
            let options = GradeOptions {
                mode,
                ..GradeOptions::default()
            };
            grade_with(&nl, &faults, &patterns, &options).unwrap()
        };
        assert_eq!(
            graded(SimulationMode::BitParallel),
            graded(SimulationMode::Serial),
            "seed {seed}: reports"
        );
    }
}

#[test]
fn equivalent_faults_have_equal_detection() {
    // Collapsing is only sound if every member of a class is detected by exactly the
    // same vectors as its representative; check it on random netlists exhaustively.
    for seed in 1..40u64 {
        let nl = random_netlist(seed * 104_729);
        let faults = FaultList::new(&nl);
        let n = nl.input_nets().len();
        let mut inputs = vec![0u64; n];
        let total = 1usize << n;
        let mut start = 0;
        while start < total {
            let count = 64.min(total - start);
            for (j, w) in inputs.iter_mut().enumerate() {
                *w = exhaustive_word(j, start as u64, count);
            }
            for c in 0..faults.collapsed() {
                let rep = faults.representative(c);
                let want = oracle_detects(&nl, &rep, &inputs, lane_mask(count));
                for &m in faults.members(c) {
                    let got = oracle_detects(&nl, &faults.faults()[m], &inputs, lane_mask(count));
                    assert_eq!(
                        got,
                        want,
                        "seed {seed}: {:?} vs {rep:?}",
                        faults.faults()[m]
                    );
                }
            }
            start += count;
        }
    }
}

/// Hand count for the built-in one-bit full adder with carry-in
/// (p = a ^ b, y = p ^ cin, g = a & b, t = cin & p, co = g | t, ovf = cin ^ co):
/// - nets with a driver: a, b, cin, p, y, g, t, co, ovf = 9 stems;
/// - readers: a -> xor_ab, and_ab (2); b -> xor_ab, and_ab (2); cin -> xor_sum, and_cp,
///   ovf_xor (3); p -> xor_sum, and_cp (2); co -> output co, ovf_xor (2); y, g, t, ovf
///   have one reader each, so no branches: 2 + 2 + 3 + 2 + 2 = 11 branches;
/// - lines = 9 + 11 = 20, faults = 2 x 20 = 40;
/// - collapsing: and_ab merges a->and s-a-0, b->and s-a-0 into g s-a-0 (-2); and_cp
///   merges cin->and s-a-0, p->and s-a-0 into t s-a-0 (-2); or_carry merges g s-a-1 and
///   t s-a-1 into co s-a-1 (-2); the XORs merge nothing: 40 - 6 = 34 classes.
#[test]
fn full_adder_fault_counts_match_the_hand_count() {
    let nl = Netlist::ripple_adder(1, true).unwrap();
    let faults = FaultList::new(&nl);
    assert_eq!(faults.total(), 40);
    assert_eq!(faults.collapsed(), 34);
    let stems = faults
        .faults()
        .iter()
        .filter(|f| matches!(f.site, FaultSite::Stem(_)))
        .count();
    assert_eq!(stems, 18);
}

#[test]
fn constant_inputs_get_only_the_opposite_fault_and_can_be_proven_redundant() {
    // o = i & 1: the tied pin's s-a-1 fault is no fault, so only s-a-0 is listed; an
    // extra gate whose output feeds nothing is redundant by structure.
    let mut b = NetlistBuilder::new("t", "m");
    let i = b.input("i", 1)[0];
    let one = b.constant(true);
    let o = b.gate_net(GateKind::And, "and1", &[i, one], "o", None);
    b.gate_net(GateKind::Not, "dangling", &[i], "d", None);
    b.output("o", &[o]);
    let nl = b.build().unwrap();
    let faults = FaultList::new(&nl);
    let tied: Vec<&Fault> = faults
        .faults()
        .iter()
        .filter(|f| matches!(f.site, FaultSite::GateInput { pin: 1, .. }))
        .collect();
    assert_eq!(tied.len(), 1);
    assert!(!tied[0].stuck_at);
    let vectors = vec![vec![Word::from_u64(0)], vec![Word::from_u64(1)]];
    let report = grade(&nl, &PatternSet::from_vectors(&nl, &vectors, "t").unwrap()).unwrap();
    assert!(report.undetected.is_empty(), "{:?}", report.undetected);
    let names: Vec<&str> = report.redundant.iter().map(|e| e.net.as_str()).collect();
    assert_eq!(names, ["d", "d"], "{:?}", report.redundant);
    assert_eq!(report.detected + report.redundant.len(), report.collapsed);
    assert!(report.coverage_percent < 100.0);
    assert_eq!(report.testable_coverage_percent, 100.0);
}

#[test]
fn consensus_term_is_proven_redundant_and_unproven_above_the_limit() {
    // f = a&b | ~a&c | b&c: by the consensus theorem (common practice) the b&c term never
    // decides f, so its AND output stuck-at-0 (with the equivalent input faults) is
    // undetectable, and nothing else is.
    let mut b = NetlistBuilder::new("t", "consensus");
    let a = b.input("a", 1)[0];
    let bb = b.input("b", 1)[0];
    let c = b.input("c", 1)[0];
    let na = b.gate_net(GateKind::Not, "not_a", &[a], "na", None);
    let ab = b.gate_net(GateKind::And, "and_ab", &[a, bb], "ab", None);
    let nac = b.gate_net(GateKind::And, "and_nac", &[na, c], "nac", None);
    let bc = b.gate_net(GateKind::And, "and_bc", &[bb, c], "bc", None);
    let t = b.gate_net(GateKind::Or, "or_t", &[ab, nac], "t", None);
    let f = b.gate_net(GateKind::Or, "or_f", &[t, bc], "f", None);
    b.output("f", &[f]);
    let nl = b.build().unwrap();
    let all: Vec<Vec<Word>> = (0..8u64)
        .map(|v| (0..3).map(|i| Word::from_u64(v >> i & 1)).collect())
        .collect();
    let patterns = PatternSet::from_vectors(&nl, &all, "t").unwrap();
    let report = grade(&nl, &patterns).unwrap();
    assert!(report.undetected.is_empty(), "{:?}", report.undetected);
    assert_eq!(report.redundant.len(), 1, "{:?}", report.redundant);
    let e = &report.redundant[0];
    assert_eq!(
        (e.net.as_str(), e.stuck_at, e.site.as_str()),
        ("bc", 0, "stem")
    );
    assert_eq!(e.driver_cell.as_deref(), Some("and_bc"));
    assert_eq!(e.driver_type, "$_AND_");
    assert_eq!(e.equivalent_faults, 3);
    assert_eq!(e.redundancy, Redundancy::Proven { support_bits: 3 });
    assert_eq!(report.detected + 1, report.collapsed);

    // Below the support size nothing is claimed, and the fault stays undetected.
    let faults = FaultList::new(&nl);
    let options = GradeOptions {
        proof_limit: 2,
        ..GradeOptions::default()
    };
    let report = grade_with(&nl, &faults, &patterns, &options).unwrap();
    assert!(report.redundant.is_empty());
    assert_eq!(report.undetected.len(), 1);
    assert_eq!(
        report.undetected[0].redundancy,
        Redundancy::NotProven {
            support_bits: 3,
            limit: 2
        }
    );
    assert_eq!(report.coverage_percent, report.testable_coverage_percent);
}

#[test]
fn missed_testable_faults_get_an_example_vector() {
    let nl = Netlist::ripple_adder(2, true).unwrap();
    // One all-zero vector leaves most faults undetected; each gets a detecting example.
    let vectors = vec![vec![Word::ZERO, Word::ZERO, Word::ZERO]];
    let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
    let report = grade(&nl, &patterns).unwrap();
    assert!(report.redundant.is_empty());
    assert!(!report.undetected.is_empty());
    for e in &report.undetected {
        let Redundancy::Testable { example, .. } = &e.redundancy else {
            panic!("{e:?} should be testable");
        };
        let values: Vec<Word> = example
            .iter()
            .map(|p| Word::parse_hex(&p.hex).unwrap())
            .collect();
        let check = PatternSet::from_vectors(&nl, &[values], "t").unwrap();
        let matrix = detection_matrix(
            &nl,
            &FaultList::new(&nl),
            &check,
            SimulationMode::BitParallel,
        )
        .unwrap();
        assert!(matrix.detects(e.class, 0), "{e:?}");
    }
}

#[test]
fn compaction_keeps_coverage_and_extra_sets() {
    let nl = Netlist::ripple_adder(4, true).unwrap();
    let faults = FaultList::new(&nl);
    let vectors = random_vectors(&nl, 300, 5);
    let patterns = PatternSet::from_vectors(&nl, &vectors, "t").unwrap();
    let matrix = detection_matrix(&nl, &faults, &patterns, SimulationMode::BitParallel).unwrap();
    let extra = vec![vec![299], vec![7, 8]];
    let kept = compact(&matrix, &extra).unwrap();
    assert!(kept.len() < 40, "{kept:?}");
    assert!(kept.contains(&299));
    assert!(kept.contains(&7) || kept.contains(&8));
    for c in 0..matrix.classes() {
        let before = matrix.first_detecting_vector(c).is_some();
        let after = kept.iter().any(|&v| matrix.detects(c, v));
        assert_eq!(before, after, "class {c}");
    }
    assert!(compact(&matrix, &[vec![300]]).is_err());
}

#[test]
fn pattern_errors_name_the_vector_and_port() {
    let nl = Netlist::ripple_adder(4, false).unwrap();
    let err = PatternSet::from_vectors(&nl, &[vec![Word::from_u64(16), Word::ZERO]], "v.csv")
        .unwrap_err();
    let p = &err.problems()[0];
    assert_eq!(p.file, "v.csv");
    assert_eq!(p.field.as_deref(), Some("vector 0, port a"));
    let err = PatternSet::from_vectors(&nl, &[vec![Word::ZERO]], "v.csv").unwrap_err();
    assert_eq!(err.problems()[0].field.as_deref(), Some("vector 0"));
    let other = Netlist::ripple_adder(4, true).unwrap();
    let patterns = PatternSet::from_vectors(&nl, &[vec![Word::ZERO, Word::ZERO]], "v.csv").unwrap();
    assert!(grade(&other, &patterns).is_err());
    assert_eq!(patterns.vector(0), Some(vec![Word::ZERO, Word::ZERO]));
    assert_eq!(patterns.vector(1), None);
}
