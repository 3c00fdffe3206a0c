//! `grade --threads N` (issue 8): the report and the compacted set are the same on 1, 2, 3
//! and 8 threads (each thread simulates a share of the fault classes), and a bad count is a
//! usage error.

use crate::util::{Flags, Sandbox, Unit};

#[test]
fn grade_and_compaction_are_the_same_on_any_thread_count() {
    let sb = Sandbox::new();
    for unit in Unit::ALL {
        let name = format!("{unit:?}").to_lowercase();
        let spec = sb.spec(&name, unit, 16, 3000, Flags::All);
        let vec = format!("{name}_vec");
        sb.gen(&spec, &vec, &[]);
        let one = sb.grade(&spec, &vec, &["--builtin", "--threads", "1"]);
        assert!(one["collapsed"].as_u64().unwrap_or(0) > 100, "{one}");
        for threads in ["2", "3", "8"] {
            let got = sb.grade(&spec, &vec, &["--builtin", "--threads", threads]);
            assert_eq!(got, one, "{name}: {threads} threads");
        }
        let env = sb.run_with_env(
            &[
                "grade",
                &spec,
                "--vectors",
                &vec,
                "--builtin",
                "--format",
                "json",
            ],
            &[("ARITHVEC_THREADS", "3")],
        );
        env.expect_code(0);
        assert_eq!(env.json(), one, "{name}: ARITHVEC_THREADS=3");
        for threads in ["1", "8"] {
            let out = format!("{name}_min{threads}");
            sb.run(&[
                "grade",
                &spec,
                "--vectors",
                &vec,
                "--builtin",
                "--compact",
                "--out",
                &out,
                "--threads",
                threads,
                "-q",
            ])
            .expect_code(0);
        }
        for f in [
            "vectors.csv",
            "stimulus.hex",
            "expected.hex",
            "manifest.json",
        ] {
            assert_eq!(
                sb.read(&format!("{name}_min1/{f}")),
                sb.read(&format!("{name}_min8/{f}")),
                "{name}: compacted {f}"
            );
        }
    }
}

#[test]
fn a_bad_thread_count_for_grade_is_a_usage_error() {
    let sb = Sandbox::new();
    let spec = sb.spec("add", Unit::Add, 8, 100, Flags::All);
    sb.gen(&spec, "vec", &[]);
    let grade = ["grade", spec.as_str(), "--vectors", "vec", "--builtin"];
    let mut args = grade.to_vec();
    args.push("--threads=0");
    let run = sb.run(&args);
    run.expect_code(2);
    assert!(run.stderr.contains("--threads"), "{}", run.describe());
    let run = sb.run_with_env(&grade, &[("ARITHVEC_THREADS", "lots")]);
    run.expect_code(2);
    assert!(
        run.stderr.contains("ARITHVEC_THREADS"),
        "{}",
        run.describe()
    );
}
