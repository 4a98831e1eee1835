//! The C and Fortran J2 block routines (fortran-shim/examples/c/j2_block.c,
//! fortran/j2_block.F90), compiled, loaded and called through the guarded block trampoline with
//! the memory guards: the same stresses, states and energies as the Rust block model `j2-block`
//! for blocks of mixed points, the same complex-step derivatives from their twins, the block
//! check passes the correct routines and names the finding of each flawed one.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use num_complex::Complex64;
use tancheck::abi::{build_library, BuildOptions, Library, LibraryBlockRoutine};
use tancheck::core::block::walk::{BlockBuffers, ComplexPoint};
use tancheck::core::block::{run, BlockInfo, BlockModelRoutine, BlockSettings, Conditions, EnergyRule};
use tancheck::core::path::{Path as StrainPath, Shape};
use tancheck::core::PointKind;
use tancheck::models::block::{BlockFlaw, J2Block};

/// The worked J2 case of REFERENCES.md (Simo & Hughes 1998 closed form): E 200 GPa, ν 0.3,
/// σy 250 MPa, K' 1000 MPa, H' 500 MPa.
const PROPS: [f64; 7] = [200_000.0, 0.3, 250.0, 1000.0, 0.0, 0.0, 500.0];

fn shim() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("fortran-shim/examples")
}

fn build(name: &str, source: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("tancheck-root-test-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out = dir.join(format!("lib{name}.so"));
    build_library(&BuildOptions::new([shim().join(source)], &out))
        .unwrap_or_else(|e| panic!("building {name}: {e}"));
    out
}

fn c_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("j2_block_c", "c/j2_block.c"))
}

fn f_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("j2_block_f", "fortran/j2_block.F90"))
}

fn info(name: &str) -> BlockInfo {
    BlockInfo { name: name.into(), ncomp: 6, nstate: 13, nproperties: 7 }
}

fn open(lib: &Path, symbol: &str) -> LibraryBlockRoutine {
    Library::open(lib).unwrap().block_routine(symbol, info(symbol)).unwrap()
}

fn conditions() -> Conditions {
    Conditions {
        temperature: 293.0,
        temperature_increment: 0.0,
        density: 7.85e-9,
        characteristic_length: 2.0,
    }
}

fn settings() -> BlockSettings {
    BlockSettings { conditions: conditions(), state0: vec![0.0; 13], ..BlockSettings::default() }
}

/// Every output of `a` equals `b`'s within `tol` of the array's largest entry.
fn same_outputs(a: &BlockBuffers, b: &BlockBuffers, tol: f64, at: &str) {
    let close = |x: &[f64], y: &[f64], what: &str| {
        let scale = y.iter().fold(1e-300f64, |m, v| m.max(v.abs()));
        for (k, (u, v)) in x.iter().zip(y).enumerate() {
            assert!((u - v).abs() <= tol * scale, "{at}: {what}[{k}] {u} vs {v}");
        }
    };
    close(&a.stress, &b.stress, "stress");
    close(&a.state, &b.state, "state");
    let ea: Vec<f64> = a.energy.iter().flat_map(|e| [e.internal, e.dissipated]).collect();
    let eb: Vec<f64> = b.energy.iter().flat_map(|e| [e.internal, e.dissipated]).collect();
    close(&ea, &eb, "energy");
    assert_eq!(a.deleted, b.deleted, "{at}");
}

/// Walk a block of 9 points on different paths (some elastic, some plastic, reversed) with
/// both routines and compare every output after every increment.
fn same_as_rust(lib: &Path, symbol: &str, flaw: BlockFlaw) {
    let mut ours = open(lib, symbol);
    let mut rust = BlockModelRoutine(J2Block::with_flaw(PointKind::Solid3d, flaw).unwrap());
    let mut a = BlockBuffers::new(9, 6, &[0.0; 13], conditions());
    let mut b = a.clone();
    let dir = [1.0, -0.3, -0.2, 0.4, 0.1, 0.7];
    for inc in 1..=10 {
        for p in 0..9 {
            let f = 1e-3 * (p as f64 - 3.0) * if inc > 6 { -1.0 } else { 1.0 };
            for i in 0..6 {
                let v = f * dir[(i + p) % 6];
                a.increment_of(p)[i] = v;
                b.increment_of(p)[i] = v;
            }
        }
        a.call(&mut ours, &PROPS, 1e-5, inc).unwrap();
        b.call(&mut rust, &PROPS, 1e-5, inc).unwrap();
        same_outputs(&a, &b, 1e-12, &format!("{symbol}, increment {inc}"));
        a.advance(1e-5);
        b.advance(1e-5);
    }
    // The twins: the complex-step derivative of one plastic point equals the Rust model's.
    let mut ca = ComplexPoint::new(7, 6, 13);
    let mut cb = ComplexPoint::new(7, 6, 13);
    for p in [0, 8] {
        ca.load(&PROPS, &a, p);
        cb.load(&PROPS, &b, p);
        ca.strain_increment[2] += Complex64::new(0.0, 1e-20);
        cb.strain_increment[2] += Complex64::new(0.0, 1e-20);
        ca.call(&mut ours, &a.conditions[..1], a.time, 1e-5, 11).unwrap();
        cb.call(&mut rust, &b.conditions[..1], b.time, 1e-5, 11).unwrap();
        for i in 0..6 {
            let (u, v) = (ca.stress[i].im / 1e-20, cb.stress[i].im / 1e-20);
            assert!((u - v).abs() <= 1e-9 * v.abs().max(1.0), "{symbol} twin, point {p}: {u} vs {v}");
        }
    }
}

/// The J2 block routines (symbol after the language prefix), their Rust model, the energy rule
/// they are checked by and the finding expected.
const J2_ROUTINES: [(&str, BlockFlaw, EnergyRule, &str); 9] = [
    ("j2_block", BlockFlaw::None, EnergyRule::Trapezoid, "none"),
    ("j2_block_neighbour_state", BlockFlaw::NeighbourState, EnergyRule::Trapezoid, "point-dependence"),
    ("j2_block_old_stress_energy", BlockFlaw::OldStressEnergy, EnergyRule::Trapezoid, "energy-work-mismatch"),
    ("j2_block_dissipation_sign", BlockFlaw::DissipationSign, EnergyRule::Trapezoid, "dissipation-decreases"),
    ("j2_block_total_back_stress", BlockFlaw::TotalBackStress, EnergyRule::Trapezoid, "refinement-order"),
    ("j2_block_corrector_sign", BlockFlaw::CorrectorSign, EnergyRule::Trapezoid, "stiffer-than-elastic"),
    ("j2_block_double_correction", BlockFlaw::DoubleCorrection, EnergyRule::Trapezoid, "negative-stiffness"),
    ("j2_block_midpoint", BlockFlaw::Midpoint, EnergyRule::Midpoint, "none"),
    // The trapezoid-rule routine checked by the midpoint rule: its energy is not that rule's.
    ("j2_block", BlockFlaw::None, EnergyRule::Midpoint, "energy-work-mismatch"),
];

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn the_c_block_routines_match_the_rust_model() {
    for (symbol, flaw, _, _) in J2_ROUTINES {
        same_as_rust(c_lib(), &format!("c_{symbol}"), flaw);
    }
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn the_fortran_block_routines_match_the_rust_model() {
    for (symbol, flaw, _, _) in J2_ROUTINES {
        same_as_rust(f_lib(), &format!("f_{symbol}"), flaw);
    }
}

fn check(lib: &Path, symbol: &str, rule: EnergyRule) -> tancheck::core::block::BlockReport {
    let mut r = open(lib, symbol);
    let path = StrainPath::ramp(Shape::TensionShear, 6e-3, 6, 3);
    let report = run(&mut r, &PROPS, &path, &BlockSettings { energy_rule: rule, ..settings() }).unwrap();
    assert!(r.findings().is_empty(), "{symbol}: the guards found {:?}", r.findings());
    report
}

fn verdicts(lib: &Path, prefix: &str) {
    for (suffix, _, rule, finding) in J2_ROUTINES {
        let symbol = format!("{prefix}_{suffix}");
        let r = check(lib, &symbol, rule);
        assert_eq!(r.finding(), finding, "{symbol} by the {rule:?} rule: {:#?}", r.findings);
        if finding == "none" {
            assert!(r.complex_calls > 0, "the twin was used");
        }
    }
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn the_block_check_passes_the_c_routine_and_names_each_flaw() {
    verdicts(c_lib(), "c");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn the_block_check_passes_the_fortran_routine_and_names_each_flaw() {
    verdicts(f_lib(), "f");
}

// ---- Johnson–Cook block routines (jc_block.c, jc_block.F90) ----------------------------

use tancheck::core::block::RateLaw;
use tancheck::models::block::{JcBlock, JcBlockFlaw};

/// 4340 steel of REFERENCES.md (Johnson–Cook constants, read, secondary copies) with typical
/// E, ν, T_r, reference rate, density, heat capacity (common practice), χ = 0.9, k_E = 0.3,
/// G_f = 20 N/mm, d_max = 0.99 (for the checks only).
const STEEL: [f64; 21] = [
    200_000.0, 0.29, 792.0, 510.0, 0.26, 0.014, 1.03, 293.0, 1793.0, 1.0, 7.83e-9, 4.77e8, 0.9, 0.05, 3.44,
    -2.12, 0.002, 0.61, 0.3, 20.0, 0.99,
];

fn jc_c_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("jc_block_c", "c/jc_block.c"))
}

fn jc_f_lib() -> &'static Path {
    static L: OnceLock<PathBuf> = OnceLock::new();
    L.get_or_init(|| build("jc_block_f", "fortran/jc_block.F90"))
}

fn jc_open(lib: &Path, symbol: &str) -> LibraryBlockRoutine {
    let info = BlockInfo { name: symbol.into(), ncomp: 6, nstate: 13, nproperties: 21 };
    Library::open(lib).unwrap().block_routine(symbol, info).unwrap()
}

fn jc_conditions() -> Conditions {
    Conditions {
        temperature: 500.0,
        temperature_increment: 0.0,
        density: 7.83e-9,
        characteristic_length: 2.0,
    }
}

/// A block of 9 points on paths from elastic to deleted, compared with the Rust model after
/// every increment.
fn jc_same_as_rust(lib: &Path, symbol: &str, flaw: JcBlockFlaw) {
    let mut ours = jc_open(lib, symbol);
    let mut rust = BlockModelRoutine(JcBlock::with_flaw(PointKind::Solid3d, flaw).unwrap());
    let mut a = BlockBuffers::new(9, 6, &[0.0; 13], jc_conditions());
    let mut b = a.clone();
    let dir = [1.0, -0.3, -0.2, 0.4, 0.1, 0.7];
    let mut deleted_seen = false;
    for inc in 1..=40 {
        for p in 0..9 {
            let f = 2e-3 * (p as f64 - 2.0) * if inc > 30 { -1.0 } else { 1.0 };
            for i in 0..6 {
                let v = f * dir[(i + p) % 6];
                a.increment_of(p)[i] = v;
                b.increment_of(p)[i] = v;
            }
        }
        a.call(&mut ours, &STEEL, 1e-5, inc).unwrap();
        b.call(&mut rust, &STEEL, 1e-5, inc).unwrap();
        same_outputs(&a, &b, 1e-9, &format!("{symbol}, increment {inc}"));
        deleted_seen |= a.deleted.iter().any(|&d| d != 0);
        a.advance(1e-5);
        b.advance(1e-5);
    }
    assert!(deleted_seen, "{symbol}: some point is deleted along these paths");
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn the_johnson_cook_block_routines_match_the_rust_model() {
    for (prefix, lib) in [("c", jc_c_lib()), ("f", jc_f_lib())] {
        for (suffix, flaw) in [
            ("", JcBlockFlaw::None),
            ("_revived", JcBlockFlaw::Revived),
            ("_wrong_temperature", JcBlockFlaw::WrongTemperature),
            ("_deleted_stress", JcBlockFlaw::DeletedStress),
            ("_unclipped_temperature", JcBlockFlaw::UnclippedTemperature),
        ] {
            jc_same_as_rust(lib, &format!("{prefix}_jc_block{suffix}"), flaw);
        }
    }
}

fn jc_check(lib: &Path, symbol: &str) -> tancheck::core::block::BlockReport {
    jc_check_at(lib, symbol, jc_conditions())
}

fn jc_check_at(lib: &Path, symbol: &str, conditions: Conditions) -> tancheck::core::block::BlockReport {
    let mut r = jc_open(lib, symbol);
    let mut path = StrainPath::ramp(Shape::UniaxialStrain, 0.3, 30, 10);
    for inc in &mut path.increments {
        inc.dtime = 5e-5;
    }
    let s = BlockSettings {
        conditions,
        state0: vec![0.0; 13],
        softening: true,
        rate_law: Some(RateLaw { reference_rate: 1.0, coefficient: 0.014 }),
        ..BlockSettings::default()
    };
    let report = run(&mut r, &STEEL, &path, &s).unwrap();
    assert!(r.findings().is_empty(), "{symbol}: the guards found {:?}", r.findings());
    report
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran (and cc)")]
fn the_block_check_passes_the_johnson_cook_routines_and_names_each_flaw() {
    for (prefix, lib) in [("c", jc_c_lib()), ("f", jc_f_lib())] {
        let r = jc_check(lib, &format!("{prefix}_jc_block"));
        assert!(r.passed(), "{prefix}_jc_block: {:#?}", r.findings);
        // A deleted point has no wave speed or stable time increment: undefined (null in the
        // JSON), not 0, which would read as a time step collapsing to nothing.
        let deleted: Vec<_> = r.increments.iter().filter(|i| i.deleted).collect();
        assert!(!deleted.is_empty(), "{prefix}_jc_block: the path deletes the point");
        assert!(
            deleted.iter().all(|i| i.stable_time_increment.is_nan() && i.wave_speed.is_nan()),
            "{deleted:#?}"
        );
        assert!(r.increments.iter().filter(|i| !i.deleted).all(|i| i.stable_time_increment > 0.0));
        for (suffix, finding) in [
            ("revived", "deleted-point-revived"),
            ("unguarded_rate", "zero-rate-not-finite"),
            ("wrong_temperature", "elastic-response-mismatch"),
            ("deleted_stress", "deleted-point-stress"),
        ] {
            let symbol = format!("{prefix}_jc_block_{suffix}");
            let r = jc_check(lib, &symbol);
            assert_eq!(r.finding(), finding, "{symbol}: {:#?}", r.findings);
        }
        // Below the room temperature (250 K, T_r 293 K): the correct routine clips T* at zero.
        let cold = Conditions { temperature: 250.0, ..jc_conditions() };
        let r = jc_check_at(lib, &format!("{prefix}_jc_block"), cold);
        assert!(r.passed(), "{prefix}_jc_block at 250 K: {:#?}", r.findings);
        let symbol = format!("{prefix}_jc_block_unclipped_temperature");
        let r = jc_check_at(lib, &symbol, cold);
        assert_eq!(r.finding(), "non-finite-stiffness", "{symbol}: {:#?}", r.findings);
    }
}
