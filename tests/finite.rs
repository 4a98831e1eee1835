//! Finite-strain routines compiled from C, loaded and called through the guarded shim: the
//! neo-Hookean example agrees with the Rust model (itself tied to num-dual and to published
//! closed forms in crates/tancheck-models/src/finite/tests.rs), its flawed variants reach
//! their findings, the numerical tangent's calls allocate nothing, and `tancheck check` /
//! `tancheck probe` run finite-strain manifests with the documented exit codes.

use std::path::Path;
use std::process::Command;

use tancheck::abi::Library;
use tancheck::core::finite::check::run;
use tancheck::core::finite::mat3;
use tancheck::core::finite::numeric::{self, Ask, Difference, Start, Workspace};
use tancheck::core::finite::{
    FiniteInfo, FiniteModelRoutine, FinitePathSpec, FiniteRoutine, FiniteSettings, Frame, StressMeasure,
    TangentMeasure,
};
use tancheck::core::Verdict;
use tancheck::models::finite::{HypoJaumann, NeoHookean};
use tancheck_testkit::alloc::allocations;
use tancheck_testkit::libs::{build_examples, scratch};

tancheck_testkit::counting_allocator!();

const PROPS: [f64; 2] = [1000.0, 0.3];

fn c_lib() -> &'static Path {
    build_examples("finite_c", &["c/finite_nh.c", "c/finite_hypo.c"])
}

fn c_routine(symbol: &str, stress: StressMeasure, tangent: TangentMeasure) -> Box<dyn FiniteRoutine> {
    let lib = Library::open(c_lib()).unwrap();
    let info =
        FiniteInfo { name: symbol.into(), stress, tangent, frame: Frame::None, nstate: 0, nproperties: 2 };
    Box::new(lib.finite_routine(symbol, info).unwrap())
}

fn start(f0: mat3::Mat3<f64>) -> Start {
    Start {
        properties: PROPS.to_vec(),
        f0,
        stress0: [0.0; 6],
        state0: vec![],
        temperature: [20.0, 0.0],
        time: [0.0, 1.0],
        increment: 1,
    }
}

fn general_f() -> mat3::Mat3<f64> {
    let u = [[1.25, 0.12, -0.05], [0.12, 0.85, 0.07], [-0.05, 0.07, 1.1]];
    mat3::mul(&mat3::axis_rotation([0.3, -1.0, 0.6], 0.7), &u)
}

// The C routine and the Rust model give the same stress and tangent (1e-12 relative) in each
// measure the C routine implements, and their twins the same complex-step tangent.
#[test]
fn c_neo_hookean_matches_the_rust_model() {
    let f = general_f();
    let p = start(mat3::identity());
    for sm in StressMeasure::ALL {
        for m in [
            TangentMeasure::TauJaumann,
            TangentMeasure::SigmaJaumann,
            TangentMeasure::TauTruesdell,
            TangentMeasure::SigmaTruesdell,
        ] {
            let mut c = c_routine("c_nh", sm, m);
            let mut rust = FiniteModelRoutine(NeoHookean::new(sm, m));
            let mut ws = Workspace::new(0, 2);
            let a = ws.call_full(c.as_mut(), &p, &f).unwrap();
            let b = ws.call_full(&mut rust, &p, &f).unwrap();
            let scale = b.stress.iter().fold(0.0_f64, |s, x| s.max(x.abs()));
            for k in 0..6 {
                assert!((a.stress[k] - b.stress[k]).abs() <= 1e-12 * scale, "{sm:?} {m:?} stress {k}");
            }
            let ts = b.tangent.iter().fold(0.0_f64, |s, x| s.max(x.abs()));
            for k in 0..36 {
                assert!((a.tangent[k] - b.tangent[k]).abs() <= 1e-12 * ts, "{sm:?} {m:?} tangent {k}");
            }
            let ask = Ask { measure: m, stress: sm, how: Difference::ComplexStep(1e-20) };
            let (mut tc, mut tr) = (vec![0.0; 36], vec![0.0; 36]);
            numeric::tangent(c.as_mut(), &mut ws, &p, &f, ask, &mut tc).unwrap();
            numeric::tangent(&mut rust, &mut ws, &p, &f, ask, &mut tr).unwrap();
            for k in 0..36 {
                assert!((tc[k] - tr[k]).abs() <= 1e-12 * ts, "{sm:?} {m:?} twin {k}");
            }
        }
    }
}

// Each C symbol reaches its verdict and finding along a stretch with a rotation superposed.
#[test]
fn c_flawed_variants_reach_their_findings() {
    let path = FinitePathSpec::UniaxialStretch {
        stretch: 1.4,
        increments: 2,
        rotation: Some(tancheck::core::finite::path::Superposed { axis: [1.0, 0.0, 1.0], angle: 0.7 }),
    }
    .build()
    .unwrap();
    for (symbol, sm, m, want) in [
        ("c_nh", StressMeasure::Cauchy, TangentMeasure::SigmaJaumann, None),
        ("c_nh", StressMeasure::Kirchhoff, TangentMeasure::TauTruesdell, None),
        (
            "c_nh_truesdell_for_jaumann",
            StressMeasure::Kirchhoff,
            TangentMeasure::TauJaumann,
            Some("other-rate"),
        ),
        ("c_nh_missing_over_j", StressMeasure::Cauchy, TangentMeasure::SigmaJaumann, Some("missing-over-j")),
        (
            "c_nh_cauchy_for_kirchhoff",
            StressMeasure::Kirchhoff,
            TangentMeasure::TauJaumann,
            Some("stress-measure"),
        ),
    ] {
        let mut r = c_routine(symbol, sm, m);
        assert!(r.has_complex(), "{symbol} exports its twin");
        let rep = run(r.as_mut(), &PROPS, &[], &path, FiniteSettings::default());
        match want {
            None => assert_eq!(rep.verdict, Verdict::Pass, "{symbol}: {:?}", rep.increments),
            Some(f) => assert_eq!(rep.finding.as_deref(), Some(f), "{symbol}"),
        }
    }
}

// The perturbed calls of a numerical tangent (central and complex step) allocate nothing, into
// the compiled routine through the shim and into the Rust model.
#[test]
fn perturbed_finite_calls_allocate_nothing() {
    let f = general_f();
    let p = start(mat3::identity());
    let m = TangentMeasure::TauGreenNaghdi;
    let mut rust = FiniteModelRoutine(NeoHookean::new(StressMeasure::Kirchhoff, m));
    let mut c = c_routine("c_nh", StressMeasure::Kirchhoff, TangentMeasure::TauJaumann);
    let mut ws = Workspace::new(0, 2);
    let mut out = vec![0.0; 36];
    for how in [Difference::Central(1e-6), Difference::ComplexStep(1e-20)] {
        for r in [&mut rust as &mut dyn FiniteRoutine, c.as_mut()] {
            let ask = Ask { measure: r.info().tangent, stress: StressMeasure::Kirchhoff, how };
            numeric::tangent(r, &mut ws, &p, &f, ask, &mut out).unwrap(); // warm up
            let before = allocations();
            numeric::tangent(r, &mut ws, &p, &f, ask, &mut out).unwrap();
            assert_eq!(allocations(), before, "{how:?} {}", r.info().name);
        }
    }
    let _ = m;
}

fn tancheck(args: &[&str]) -> (i32, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_tancheck")).args(args).output().unwrap();
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned() + &String::from_utf8_lossy(&o.stderr),
    )
}

// `tancheck check` and `tancheck probe` on finite-strain manifests: exit 0 for the correct C
// routine, 1 with the cause named for a flawed one, 1 for the probes of the hypoelastic
// routine that never rotates its stress, 2 naming the file for a bad measure.
#[test]
fn command_line_runs_finite_manifests() {
    let dir = scratch("cli");
    let lib = c_lib().display().to_string();
    let write = |name: &str, text: String| {
        let p = dir.join(name);
        std::fs::write(&p, text).unwrap();
        p.display().to_string()
    };
    let manifest = |symbol: &str, tangent: &str| {
        format!(
            r#"{{ "finite": {{ "stress": "cauchy", "tangent": "{tangent}" }},
               "routine": {{ "library": "{lib}", "symbol": "{symbol}", "properties": [1000, 0.3] }},
               "path": {{ "shape": "biaxial", "stretch": [1.3, 0.9], "increments": 2 }} }}"#
        )
    };
    let good = write("good.json", manifest("c_nh", "sigma-jaumann"));
    let bad = write("bad.json", manifest("c_nh_missing_over_j", "sigma-jaumann"));
    let unknown = write("unknown.json", manifest("c_nh", "sigma-lagrange"));
    let hypo = write(
        "hypo.json",
        r#"{ "finite": { "stress": "kirchhoff", "tangent": "tau-jaumann", "frame": "jaumann" },
             "routine": { "model": "hypo-no-rotation", "properties": [1000, 0.3] },
             "path": { "shape": "simple-shear", "amount": 0.3, "increments": 3 },
             "probes": { "shear_response": "oscillating" } }"#
            .into(),
    );
    let (code, out) = tancheck(&["check", &good]);
    assert_eq!(code, 0, "{out}");
    let (code, out) = tancheck(&["check", &bad]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("missing-over-j"), "{out}");
    let (code, out) = tancheck(&["probe", &good]);
    assert_eq!(code, 0, "{out}");
    let (code, out) = tancheck(&["probe", &hypo]);
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("rotation-increment") && out.contains("NOT objective"), "{out}");
    let (code, out) = tancheck(&["check", &unknown]);
    assert_eq!(code, 2, "{out}");
    assert!(out.contains("unknown.json") && out.contains("sigma-lagrange"), "{out}");
    let json = dir.join("r.json").display().to_string();
    let (code, _) = tancheck(&["check", &bad, "--json", &json]);
    assert_eq!(code, 1);
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    assert_eq!(v["finding"], "missing-over-j");
}

fn f_lib() -> &'static Path {
    build_examples("finite_f", &["fortran/finite_nh.F90", "fortran/finite_hypo.F90"])
}

// The Fortran neo-Hookean routine agrees with the Rust model (stress, tangent and its twin's
// complex-step tangent) and passes the check in each measure it implements.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_neo_hookean_matches_the_rust_model_and_passes() {
    let f = general_f();
    let p = start(mat3::identity());
    let path =
        FinitePathSpec::Biaxial { stretch: [1.3, 0.8], increments: 2, rotation: None }.build().unwrap();
    for sm in StressMeasure::ALL {
        for m in [TangentMeasure::TauJaumann, TangentMeasure::SigmaJaumann, TangentMeasure::SigmaTruesdell] {
            let lib = Library::open(f_lib()).unwrap();
            let info = FiniteInfo {
                name: "f_nh".into(),
                stress: sm,
                tangent: m,
                frame: Frame::None,
                nstate: 0,
                nproperties: 2,
            };
            let mut fr = lib.finite_routine("f_nh", info).unwrap();
            assert!(fr.has_complex());
            let mut rust = FiniteModelRoutine(NeoHookean::new(sm, m));
            let mut ws = Workspace::new(0, 2);
            let a = ws.call_full(&mut fr, &p, &f).unwrap();
            let b = ws.call_full(&mut rust, &p, &f).unwrap();
            let ts = b.tangent.iter().fold(0.0_f64, |s, x| s.max(x.abs()));
            for k in 0..36 {
                assert!((a.tangent[k] - b.tangent[k]).abs() <= 1e-12 * ts, "{sm:?} {m:?} tangent {k}");
            }
            for k in 0..6 {
                assert!((a.stress[k] - b.stress[k]).abs() <= 1e-12 * ts, "{sm:?} {m:?} stress {k}");
            }
            let rep = run(&mut fr, &PROPS, &[], &path, FiniteSettings::default());
            assert_eq!(rep.verdict, Verdict::Pass, "{sm:?} {m:?}");
            assert!(rep.increments.iter().all(|i| i.error_complex.unwrap() < 1e-12));
        }
    }
}

// The C hypoelastic Jaumann routine: its tangent passes the check (tau-jaumann, Jaumann
// frame), it agrees with the Rust model, it is objective, and it oscillates in simple shear
// as Dienes (1979) found; the variant that never applies the rotation increment passes the
// tangent check but fails the rigid-increment and stretch-rotate probes.
#[test]
fn c_hypoelastic_routine_and_its_rotation_flaw() {
    use tancheck::core::finite::probe::{run_all, ProbeOptions, ShearResponse};
    let lib = Library::open(c_lib()).unwrap();
    let info = |s: &str| FiniteInfo {
        name: s.into(),
        stress: StressMeasure::Kirchhoff,
        tangent: TangentMeasure::TauJaumann,
        frame: Frame::Jaumann,
        nstate: 0,
        nproperties: 2,
    };
    let path = FinitePathSpec::SimpleShear {
        amount: 0.8,
        increments: 4,
        rotation: Some(tancheck::core::finite::path::Superposed { axis: [1.0, 0.0, 1.0], angle: 0.7 }),
    }
    .build()
    .unwrap();
    let opts = ProbeOptions { shear_response: ShearResponse::Oscillating, ..Default::default() };
    for (symbol, objective) in [("c_hypo", true), ("c_hypo_no_rotation", false)] {
        let mut r = lib.finite_routine(symbol, info(symbol)).unwrap();
        let rep = run(&mut r, &PROPS, &[], &path, FiniteSettings::default());
        assert_eq!(rep.verdict, Verdict::Pass, "{symbol}");
        let probes = run_all(&mut r, &PROPS, &[], &path, &opts);
        let by = |n: &str| probes.iter().find(|p| p.name == n).unwrap().passed;
        assert!(by("rotation-superposed"), "{symbol}");
        assert_eq!(by("rotation-increment"), objective, "{symbol}");
        assert_eq!(by("stretch-rotate"), objective, "{symbol}");
        assert_eq!(by("simple-shear"), objective, "{symbol}");
    }
    // against the Rust model at a stressed start
    let mut c = lib.finite_routine("c_hypo", info("c_hypo")).unwrap();
    matches_rust_hypo(&mut c);
}

/// `r` and the Rust hypoelastic Jaumann model give the same stress (1e-10) and tangent (1e-9)
/// at a stressed, rotated start.
fn matches_rust_hypo(r: &mut dyn FiniteRoutine) {
    let mut rust = FiniteModelRoutine(HypoJaumann::new());
    let mut p = start(general_f());
    p.stress0 = [120.0, -40.0, 15.0, 30.0, -25.0, 60.0];
    let f1 = mat3::add(&p.f0, &[[0.02, 0.05, -0.01], [0.03, -0.015, 0.02], [-0.02, 0.01, 0.01]]);
    let mut ws = Workspace::new(0, 2);
    let a = ws.call_full(r, &p, &f1).unwrap();
    let b = ws.call_full(&mut rust, &p, &f1).unwrap();
    for k in 0..6 {
        assert!((a.stress[k] - b.stress[k]).abs() < 1e-10, "stress {k}");
    }
    for k in 0..36 {
        assert!((a.tangent[k] - b.tangent[k]).abs() < 1e-9, "tangent {k}");
    }
}

// The Fortran hypoelastic Jaumann routine agrees with the Rust model (stress and tangent at a
// stressed, rotated start) and with its twin passes the check along a rotated simple shear.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_hypoelastic_matches_the_rust_model() {
    let lib = Library::open(f_lib()).unwrap();
    let info = FiniteInfo {
        name: "f_hypo".into(),
        stress: StressMeasure::Kirchhoff,
        tangent: TangentMeasure::TauJaumann,
        frame: Frame::Jaumann,
        nstate: 0,
        nproperties: 2,
    };
    let mut f = lib.finite_routine("f_hypo", info).unwrap();
    assert!(f.has_complex());
    matches_rust_hypo(&mut f);
    let path = FinitePathSpec::SimpleShear {
        amount: 0.8,
        increments: 4,
        rotation: Some(tancheck::core::finite::path::Superposed { axis: [1.0, 0.0, 1.0], angle: 0.7 }),
    }
    .build()
    .unwrap();
    let rep = run(&mut f, &PROPS, &[], &path, FiniteSettings::default());
    assert_eq!(rep.verdict, Verdict::Pass, "{:?}", rep.increments);
    assert!(rep.increments.iter().all(|i| i.error_complex.unwrap() < 1e-9));
}
