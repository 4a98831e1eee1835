//! `tancheck bisect` on routines wrong in one branch only: it names the branch and the first
//! failing increment, narrows the class change inside the increment to 1e-3 of it or better
//! (checked against the fraction computed in closed form), tells a true mismatch from
//! truncation, and shrinks a long random path to a few increments that still fail.
//!
//! The compiled routines are the zoo's C and Fortran sources built with `tancheck build`'s
//! library function; the Fortran half is ignored ("needs gfortran", cfg set
//! by build.rs) without gfortran, and runs when TANCHECK_REQUIRE_FORTRAN=1 (as in CI).

use std::path::Path;
use std::process::Command;

use serde_json::Value;
use tancheck::models::zoo::{C_SOURCES, FORTRAN_SOURCES};
use tancheck_testkit::libs::{build_once, output_text as text, scratch};

/// The J2 properties of the zoo: E, ν, σy0, H_iso, Q, b, H_kin.
const J2_PROPS: [f64; 7] = [210000.0, 0.3, 355.0, 1200.0, 150.0, 12.0, 2500.0];
/// The cohesive properties of the zoo: K, N, S, G_Ic, G_IIc, η.
const COHESIVE_PROPS: [f64; 6] = [1e5, 60.0, 90.0, 0.3, 0.9, 2.0];
/// The accuracy the issue asks of the fraction inside the increment.
const FRACTION_ACCURACY: f64 = 1e-3;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tancheck"))
}

fn c_library() -> &'static Path {
    build_once("zoo-c", &C_SOURCES)
}

fn fortran_library() -> &'static Path {
    build_once("zoo-f", &FORTRAN_SOURCES)
}

/// Where the routine comes from.
#[derive(Clone, Copy)]
enum Source<'a> {
    Model(&'a str),
    Library(&'a Path, &'a str, usize),
}

fn routine_json(src: Source<'_>, kind: &str, props: &[f64]) -> String {
    let props: Vec<String> = props.iter().map(|p| format!("{p:e}")).collect();
    match src {
        Source::Model(m) => {
            format!(r#"{{ "model": "{m}", "kind": "{kind}", "properties": [{}] }}"#, props.join(", "))
        }
        Source::Library(lib, sym, states) => format!(
            r#"{{ "library": "{}", "symbol": "{sym}", "kind": "{kind}", "states": {states}, "properties": [{}] }}"#,
            lib.display(),
            props.join(", ")
        ),
    }
}

/// Run `tancheck bisect` with `--json -`; the exit code and the outcome.
fn bisect(dir: &Path, routine: &str, path: &str, extra: &[&str]) -> (i32, Value) {
    let m = dir.join("m.json");
    std::fs::write(&m, format!("{{ \"routine\": {routine},\n  \"path\": {path} }}\n")).unwrap();
    let o = bin().arg("bisect").arg(&m).args(["--json", "-"]).args(extra).output().unwrap();
    let v: Value = serde_json::from_slice(&o.stdout).unwrap_or_else(|e| panic!("{e}: {}", text(&o)));
    (o.status.code().unwrap(), v)
}

/// Deviatoric norm of a symmetric tensor given by canonical components (11, 22, 33, 23, 13, 12).
fn dev_norm(e: &[f64; 6]) -> f64 {
    let m = (e[0] + e[1] + e[2]) / 3.0;
    ((e[0] - m).powi(2)
        + (e[1] - m).powi(2)
        + (e[2] - m).powi(2)
        + 2.0 * (e[3] * e[3] + e[4] * e[4] + e[5] * e[5]))
        .sqrt()
}

/// The fraction of increment k (1-based) of a ramp of equal increments `d` from the virgin
/// state at which J2 first yields: ‖ξ_tr‖ = 2μ (k − 1 + s) ‖dev d‖ = √(2/3) σy0
/// (Simo & Hughes 1998, Box 3.2: the trial stress of a linear-elastic step).
fn j2_first_yield(d: &[f64; 6], props: &[f64]) -> (usize, f64) {
    let mu = props[0] / (2.0 * (1.0 + props[1]));
    let x = (2.0f64 / 3.0).sqrt() * props[2] / (2.0 * mu * dev_norm(d));
    let k = x.ceil();
    (k as usize, x - (k - 1.0))
}

/// The fraction of increment k of a proportional opening `d` (n, s1, s2) from the virgin state
/// at which damage starts: λ(s) = (k − 1 + s)|d| = δ₀ₘ, with the mixed-mode onset
/// δ₀ₘ = δ₀₃δ₀ₛ/√((1−B)δ₀ₛ² + Bδ₀₃²), B = δ_sh²/λ² (Camanho & Dávila 2002).
fn cohesive_onset(d: &[f64; 3], props: &[f64]) -> (usize, f64) {
    let (k_pen, n, s) = (props[0], props[1], props[2]);
    let (d3, ds) = (n / k_pen, s / k_pen);
    let sh2 = d[1] * d[1] + d[2] * d[2];
    let lam = (d[0] * d[0] + sh2).sqrt();
    let b = sh2 / (lam * lam);
    let d0m = d3 * ds / ((1.0 - b) * ds * ds + b * d3 * d3).sqrt();
    let x = d0m / lam;
    let k = x.ceil();
    (k as usize, x - (k - 1.0))
}

/// Check the located failure against the expected increment, branch, finding and fraction.
fn assert_located(v: &Value, increment: usize, branch: &str, finding: &str, s_star: f64) -> f64 {
    let l = &v["located"];
    assert_eq!(l["increment"], increment, "{v:#}");
    assert_eq!(l["branch"], branch, "{v:#}");
    assert_eq!(l["finding"], finding, "{v:#}");
    let inside = &l["inside"];
    assert_eq!(inside["found"], "crossing", "{inside:#}");
    let (below, above) = (inside["below"].as_f64().unwrap(), inside["above"].as_f64().unwrap());
    assert!(above - below <= 1e-6, "{below} {above}");
    let found = 0.5 * (below + above);
    assert!((found - s_star).abs() <= FRACTION_ACCURACY, "fraction {found} against {s_star} in closed form");
    // Below the crossing the call agrees, above it does not.
    assert_eq!(inside["class_below"]["judgement"], "agrees", "{inside:#}");
    assert_eq!(inside["class_above"]["judgement"], "differs", "{inside:#}");
    assert_eq!(l["step"]["verdict"], "mismatch", "{:#}", l["step"]);
    eprintln!(
        "{}: increment {increment}, fraction {found:.9} (closed form {s_star:.9}, off by {:.1e})",
        v["routine"],
        (found - s_star).abs()
    );
    found
}

const TENSION_SHEAR: [f64; 6] = [1.0, 0.0, 0.0, -0.25, 0.15, 0.5];

fn j2_elastic_first_plastic(src: Source<'_>, dir: &Path) {
    let d: [f64; 6] = TENSION_SHEAR.map(|x| x * 4e-3 / 8.0);
    let (k, s_star) = j2_first_yield(&d, &J2_PROPS);
    let (code, v) = bisect(
        dir,
        &routine_json(src, "solid-3d", &J2_PROPS),
        r#"{ "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 }"#,
        &["--max-shrink-iterations", "0"],
    );
    assert_eq!(code, 1, "{v:#}");
    assert_eq!(v["finding"], "elastic-tangent");
    let found = assert_located(&v, k, "#1 (state changed)", "elastic-tangent", s_star);
    assert_eq!(v["located"]["inside"]["class_below"]["reported_branch"], 0);
    assert!(v["shrunk"].is_null());
    // The case names the crossing too.
    let case = v["cases"][0].as_str().unwrap();
    let c: Value = serde_json::from_str(&std::fs::read_to_string(case).unwrap()).unwrap();
    assert_eq!(c["origin"]["increment"], k);
    let cb = c["origin"]["crossing"]["below"].as_f64().unwrap();
    assert!((cb - found).abs() < 1e-6);
}

#[test]
fn elastic_tangent_on_the_first_plastic_increment_rust() {
    let d = scratch("efp-rust");
    j2_elastic_first_plastic(Source::Model("j2-elastic-first-plastic"), &d);
    // Uniaxial strain as well: yield at ε11 = σy0/(2μ) in closed form.
    let (k, s_star) = j2_first_yield(&[5e-4, 0.0, 0.0, 0.0, 0.0, 0.0], &J2_PROPS);
    let (code, v) = bisect(
        &d,
        &routine_json(Source::Model("j2-elastic-first-plastic"), "solid-3d", &J2_PROPS),
        r#"{ "shape": "uniaxial-strain", "peak": 0.004, "steps": 8 }"#,
        &["--max-shrink-iterations", "0", "--fraction-tol", "1e-9"],
    );
    assert_eq!(code, 1);
    let inside = &v["located"]["inside"];
    let found = 0.5 * (inside["below"].as_f64().unwrap() + inside["above"].as_f64().unwrap());
    assert_eq!(v["located"]["increment"], k);
    assert!((found - s_star).abs() <= 1e-8, "{found} against {s_star}: a tighter tolerance is met too");
}

/// An increment that holds stresses is bisected under its held stresses: the fraction s of it
/// is its prescribed strain scaled and the held stresses' strains solved for again. Under
/// uniaxial stress J2 yields where σ11 = E ε11 = σy0 (Hooke's law; the lateral stresses are
/// held at zero). Scaling the full increment's solved strains instead (its lateral strains
/// include the plastic flow past yield) put the crossing elsewhere (a user-style sweep: 0.516
/// against 0.527 on a plane-stress routine).
#[test]
fn a_held_stress_increment_is_bisected_under_its_held_stresses() {
    let d = scratch("efp-held");
    let eps_y = J2_PROPS[2] / J2_PROPS[0];
    let step = 4e-3 / 8.0;
    let k = (eps_y / step).ceil();
    let s_star = eps_y / step - (k - 1.0);
    let (code, v) = bisect(
        &d,
        &routine_json(Source::Model("j2-elastic-first-plastic"), "solid-3d", &J2_PROPS),
        r#"{ "shape": "uniaxial-stress", "peak": 0.004, "steps": 8 }"#,
        &["--max-shrink-iterations", "0", "--fraction-tol", "1e-9"],
    );
    assert_eq!(code, 1, "{v:#}");
    assert_eq!(v["located"]["increment"], k as usize, "{v:#}");
    let inside = &v["located"]["inside"];
    let found = 0.5 * (inside["below"].as_f64().unwrap() + inside["above"].as_f64().unwrap());
    // The held stresses are met to the mixed solve's tolerance, not to the bit.
    assert!((found - s_star).abs() <= 1e-6, "{found} against {s_star} in closed form");
}

#[test]
fn elastic_tangent_on_the_first_plastic_increment_c() {
    j2_elastic_first_plastic(
        Source::Library(c_library(), "c_j2_elastic_first_plastic", 13),
        &scratch("efp-c"),
    );
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn elastic_tangent_on_the_first_plastic_increment_fortran() {
    j2_elastic_first_plastic(
        Source::Library(fortran_library(), "f_j2_elastic_first_plastic", 13),
        &scratch("efp-f"),
    );
}

fn cohesive_secant(src: Source<'_>, dir: &Path) {
    // The mixed-mode shape: n, s1, s2 = 1, 0.75, 0.375 times the increment.
    let d = [4e-4, 3e-4, 1.5e-4];
    let (k, s_star) = cohesive_onset(&d, &COHESIVE_PROPS);
    let (code, v) = bisect(
        dir,
        &routine_json(src, "cohesive-3d", &COHESIVE_PROPS),
        r#"{ "shape": "mixed-mode", "peak": 0.0032, "steps": 8, "back": 4 }"#,
        &["--max-shrink-iterations", "0"],
    );
    assert_eq!(code, 1, "{v:#}");
    assert_located(&v, k, "#1 (state changed)", "secant", s_star);
    assert_eq!(v["located"]["inside"]["class_below"]["reported_branch"], 0);
}

#[test]
fn secant_during_damage_growth_rust() {
    cohesive_secant(Source::Model("cohesive-secant"), &scratch("coh-rust"));
}

#[test]
fn secant_during_damage_growth_c() {
    cohesive_secant(Source::Library(c_library(), "c_cohesive_secant", 2), &scratch("coh-c"));
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn secant_during_damage_growth_fortran() {
    cohesive_secant(Source::Library(fortran_library(), "f_cohesive_secant", 2), &scratch("coh-f"));
}

/// Decode a case file's numbers from their bits.
fn bits(v: &Value) -> Vec<f64> {
    v["bits"]
        .as_array()
        .unwrap()
        .iter()
        .map(|b| f64::from_bits(u64::from_str_radix(b.as_str().unwrap(), 16).unwrap()))
        .collect()
}

/// The fraction of the saved call at which the trial state of J2 reaches the yield surface:
/// ξ(s) = a + s b with a = 2μ dev(ε − εp) − β, b = 2μ dev Δε (linear in s), and
/// ‖ξ(s)‖ = √(2/3) K(α_n), K(α) = σy0 + H_iso α + Q (1 − exp(−b α)) (Simo & Hughes 1998, Box
/// 3.2). Engineering shear in the routine's vectors, tensor components in the norms.
fn j2_reversal_fraction(case: &Value, props: &[f64]) -> f64 {
    let call = &case["call"];
    let (strain, dstrain, state) = (bits(&call["strain"]), bits(&call["dstrain"]), bits(&call["state0"]));
    let n = 6;
    let mu = props[0] / (2.0 * (1.0 + props[1]));
    let tensor = |v: &[f64]| -> [f64; 6] { std::array::from_fn(|i| if i >= 3 { 0.5 * v[i] } else { v[i] }) };
    let dev = |t: [f64; 6]| -> [f64; 6] {
        let m = (t[0] + t[1] + t[2]) / 3.0;
        std::array::from_fn(|i| if i < 3 { t[i] - m } else { t[i] })
    };
    let ee: Vec<f64> = (0..n).map(|i| strain[i] - state[i]).collect();
    let (de, beta) = (dev(tensor(&ee)), &state[n + 1..2 * n + 1]);
    let a: [f64; 6] = std::array::from_fn(|i| 2.0 * mu * de[i] - beta[i]);
    let b: [f64; 6] = dev(tensor(&dstrain)).map(|x| 2.0 * mu * x);
    let dot = |x: &[f64; 6], y: &[f64; 6]| {
        (0..6).map(|i| x[i] * y[i] * if i >= 3 { 2.0 } else { 1.0 }).sum::<f64>()
    };
    let alpha = state[n];
    let k = props[2] + props[3] * alpha + props[4] * (1.0 - (-props[5] * alpha).exp());
    let r2 = 2.0 / 3.0 * k * k;
    let (bb, ab, aa) = (dot(&b, &b), dot(&a, &b), dot(&a, &a));
    assert!(aa < r2, "the saved call starts inside the yield surface");
    (-ab + (ab * ab - bb * (aa - r2)).sqrt()) / bb
}

fn j2_reversal(src: Source<'_>, dir: &Path) {
    let (code, v) = bisect(
        dir,
        &routine_json(src, "solid-3d", &J2_PROPS),
        r#"{ "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 }"#,
        &["--max-shrink-iterations", "0"],
    );
    assert_eq!(code, 1, "{v:#}");
    // The unloading increments are elastic until the reversed flow starts in the last one.
    let case: Value =
        serde_json::from_str(&std::fs::read_to_string(v["cases"][0].as_str().unwrap()).unwrap()).unwrap();
    let s_star = j2_reversal_fraction(&case, &J2_PROPS);
    assert!(s_star > 0.0 && s_star < 1.0, "{s_star}");
    assert_located(&v, 12, "#1 (state changed)", "term-sign", s_star);
    let below = &v["located"]["inside"]["class_below"];
    assert_eq!(below["reported_branch"], 0, "elastic unloading below the crossing");
}

#[test]
fn wrong_tangent_after_a_load_reversal_rust() {
    j2_reversal(Source::Model("j2-reversal"), &scratch("rev-rust"));
}

#[test]
fn wrong_tangent_after_a_load_reversal_c() {
    j2_reversal(Source::Library(c_library(), "c_j2_reversal", 19), &scratch("rev-c"));
}

/// A deterministic generator (xorshift64*), so the test needs no extra crate.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
    }
    fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.next()
    }
}

/// 200 increments: 120 of loading along tension-shear with noise in every component, then a
/// random walk (reversals among it).
fn random_path(seed: u64) -> String {
    let mut rng = Rng(seed);
    let mut incs = Vec::new();
    for k in 0..200 {
        let d: Vec<String> = (0..6)
            .map(|i| {
                let x = if k < 120 {
                    4e-5 * TENSION_SHEAR[i] + rng.range(-1e-5, 1e-5)
                } else {
                    rng.range(-4e-4, 4e-4)
                };
                format!("{x:e}")
            })
            .collect();
        incs.push(format!("{{ \"dstrain\": [{}] }}", d.join(", ")));
    }
    format!("{{ \"name\": \"random walk of 200 increments\", \"increments\": [\n{}\n] }}", incs.join(",\n"))
}

#[test]
fn a_random_200_increment_path_shrinks_to_a_few_increments() {
    let d = scratch("shrink");
    let (code, v) = bisect(
        &d,
        &routine_json(Source::Model("j2-reversal"), "solid-3d", &J2_PROPS),
        &random_path(0x5eed_7e57),
        &[],
    );
    assert_eq!(code, 1, "{v:#}");
    let first = v["located"]["increment"].as_u64().unwrap();
    assert!(first > 100, "the first failure comes after the loading: {first}");
    let s = &v["shrunk"];
    assert_eq!(s["stop"]["stop"], "done", "{s:#}");
    let n = s["path"]["increments"].as_array().unwrap().len();
    assert!(n <= 3, "shrunk to {n} increments: {:#}", s["path"]);
    assert_eq!(s["original_increments"], 200);
    assert_eq!(s["located"]["finding"], v["located"]["finding"]);
    eprintln!(
        "shrunk 200 increments (first failure at {first}) to {n} in {} candidates ({} kept, {:.1} s): {}",
        s["iterations"],
        s["accepted"],
        s["seconds"].as_f64().unwrap(),
        s["path"]["increments"]
    );
    // The shrunk path fails `tancheck check` on its own, with the same finding, also with the
    // routine's C version.
    let m = d.join("shrunk.json");
    std::fs::write(
        &m,
        format!(
            "{{ \"routine\": {}, \"path\": {{ \"increments\": {} }} }}",
            routine_json(Source::Library(c_library(), "c_j2_reversal", 19), "solid-3d", &J2_PROPS),
            s["path"]["increments"]
        ),
    )
    .unwrap();
    let o = bin().arg("check").arg(&m).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let r: Value = serde_json::from_slice(&o.stdout).unwrap();
    let failing: Vec<&Value> =
        r["increments"].as_array().unwrap().iter().filter(|i| i["diagnosis"]["pass"] == false).collect();
    assert_eq!(failing.len(), 1);
    assert_eq!(failing[0]["index"], n);
    assert_eq!(failing[0]["diagnosis"]["finding"], v["located"]["finding"]);
    // Two case files: the original failing call and the shrunk one.
    assert_eq!(v["cases"].as_array().unwrap().len(), 2, "{:#}", v["cases"]);
}

#[test]
fn the_shrink_limits_name_the_option_that_raises_them() {
    let d = scratch("limits");
    let routine = routine_json(Source::Model("j2-reversal"), "solid-3d", &J2_PROPS);
    let (code, v) = bisect(&d, &routine, &random_path(0x5eed_7e57), &["--max-shrink-iterations", "4"]);
    assert_eq!(code, 1);
    let s = &v["shrunk"];
    assert_eq!(s["stop"]["stop"], "iteration-limit");
    assert_eq!(s["iterations"], 4);
    assert!(s["stopped"].as_str().unwrap().contains("--max-shrink-iterations"), "{s:#}");
    // What it has is still a failing path (cut after its first failure).
    assert!(
        s["located"]["increment"].as_u64().unwrap() as usize
            == s["path"]["increments"].as_array().unwrap().len()
    );
    let m = d.join("m.json");
    let o = bin().arg("bisect").arg(&m).args(["--max-shrink-seconds", "1e-9"]).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    assert!(t.contains("raise it with --max-shrink-seconds"), "{t}");
    let o = bin().arg("bisect").arg(&m).args(["--max-shrink-seconds", "-1"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
}

#[test]
fn a_passing_routine_has_nothing_to_bisect() {
    let d = scratch("pass");
    let (code, v) = bisect(
        &d,
        &routine_json(Source::Model("j2"), "solid-3d", &J2_PROPS),
        r#"{ "shape": "tension-shear", "peak": 0.004, "steps": 8, "back": 4 }"#,
        &[],
    );
    assert_eq!(code, 0, "{v:#}");
    assert!(v["located"].is_null() && v["cases"].as_array().unwrap().is_empty());
    assert!(!d.join("tancheck-cases").exists());
    // The readable form says so.
    let o = bin().arg("bisect").arg(d.join("m.json")).output().unwrap();
    assert!(text(&o).contains("every increment passed"), "{}", text(&o));
}

#[test]
fn the_readable_output_names_branch_increment_and_fraction() {
    let d = scratch("text");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            "{{ \"routine\": {}, \"path\": {{ \"shape\": \"uniaxial-strain\", \"peak\": 0.004, \"steps\": 8 }} }}",
            routine_json(Source::Model("j2-elastic-first-plastic"), "solid-3d", &J2_PROPS)
        ),
    )
    .unwrap();
    let cases = d.join("my-cases");
    let o = bin().arg("bisect").arg(&m).arg("--case-dir").arg(&cases).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    let (k, s) = j2_first_yield(&[5e-4, 0.0, 0.0, 0.0, 0.0, 0.0], &J2_PROPS);
    assert!(
        t.contains(&format!(
            "first failing increment: {k} of 8, branch #1 (state changed), finding elastic-tangent"
        )),
        "{t}"
    );
    let at = t.split("at fraction ").nth(1).and_then(|x| x.split_whitespace().next()).unwrap();
    assert!((at.parse::<f64>().unwrap() - s).abs() <= FRACTION_ACCURACY, "{s} {t}");
    assert!(t.contains("a true mismatch"), "{t}");
    assert!(t.contains("shrunk: 8 increments to 1"), "{t}");
    assert!(t.contains("case written: ") && t.contains("my-cases"), "{t}");
    assert_eq!(std::fs::read_dir(&cases).unwrap().count(), 2);
}

/// A failure of ∂σ/∂T alone (its thermal-expansion term left out): the bisection's classes
/// say ∂σ/∂T differs, its error is ∂σ/∂T's, and no step study of the strain columns speaks
/// for it (it said "the tangent differs (error 1e-14)" and "truncation of the default step,
/// not a mismatch"). The replay of its case prints ∂σ/∂T and says that ∂σ/∂T still differs.
#[test]
fn a_dtemp_failure_is_bisected_and_replayed_as_one() {
    let d = scratch("bisect-dtemp");
    let routine = routine_json(
        Source::Model("thermo-partial-dtemp"),
        "solid-3d",
        &[210000.0, 0.3, 1e-5, 1.0, 1.0, 0.0],
    );
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            "{{ \"routine\": {routine}, \"start\": {{\"temperature\": 20}},\n  \"path\": {{\"shape\": \"tension-shear\", \"peak\": 0.002, \"steps\": 6, \"dtemp\": 60}} }}\n"
        ),
    )
    .unwrap();
    let cases = d.join("cases");
    let o = bin().arg("bisect").arg(&m).arg("--case-dir").arg(&cases).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    assert!(t.contains("finding dtemp-partial"), "{t}");
    assert!(!t.contains("the tangent differs") && !t.contains("truncation of the default step"), "{t}");
    let case = std::fs::read_dir(&cases).unwrap().next().unwrap().unwrap().path();
    let o = bin().arg("replay").arg(&case).output().unwrap();
    let t = text(&o);
    assert_eq!(o.status.code(), Some(1), "{t}");
    assert!(t.contains("DIFFERS  ∂σ/∂T norm error"), "{t}");
    assert!(t.contains("the returned ∂σ/∂T still differs"), "{t}");
}

// `--path FILE` takes a path file as `check` and `probe` do (it was refused with a message
// saying it takes one): the first failing increment is the file's.
#[test]
fn a_path_file_is_taken_by_path() {
    let d = scratch("path-file");
    let m = d.join("m.json");
    std::fs::write(
        &m,
        format!(
            "{{ \"routine\": {} }}",
            routine_json(Source::Model("j2-elastic-first-plastic"), "solid-3d", &J2_PROPS)
        ),
    )
    .unwrap();
    let p = d.join("uniaxial.json");
    std::fs::write(&p, r#"{ "shape": "uniaxial-strain", "peak": 0.004, "steps": 8 }"#).unwrap();
    let o = bin().arg("bisect").arg(&m).arg("--path").arg(&p).args(["--json", "-"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    let v: Value = serde_json::from_slice(&o.stdout).unwrap();
    let (k, _) = j2_first_yield(&[5e-4, 0.0, 0.0, 0.0, 0.0, 0.0], &J2_PROPS);
    assert_eq!(v["located"]["increment"].as_u64(), Some(k as u64), "{v:#}");
}

/// The shrunk path keeps the failure's branch as well as its finding: a flaw that fails in
/// every branch (the shear columns halved) found in a first increment that yields is shrunk
/// to a path that still yields, not to a zero increment of the elastic branch (explore named
/// one zero-increment case for failures of two branches; a user-style sweep).
#[test]
fn the_shrunk_path_keeps_the_failure_in_its_branch() {
    let d = scratch("shrink-branch");
    let (code, v) = bisect(
        &d,
        &routine_json(Source::Model("j2-shear-factor"), "solid-3d", &J2_PROPS),
        r#"{ "increments": [ { "dstrain": [0.004, 0, 0, 0, 0, 0.001] } ] }"#,
        &[],
    );
    assert_eq!(code, 1, "{v:#}");
    assert_eq!(v["located"]["branch"], "#1 (state changed)", "{v:#}");
    let s = &v["shrunk"];
    assert_eq!(s["located"]["branch"], "#1 (state changed)", "{s:#}");
    assert_eq!(s["located"]["finding"], v["located"]["finding"], "{s:#}");
    // Still a yielding increment: its deviatoric strain beyond the elastic range.
    let inc = &s["path"]["increments"][0]["dstrain"];
    let e: Vec<f64> = (0..6).map(|k| inc[k].as_f64().unwrap()).collect();
    let e6: [f64; 6] = e.try_into().unwrap();
    let (k, _) = j2_first_yield(&e6, &J2_PROPS);
    assert_eq!(k, 1, "the shrunk increment {e6:?} yields within itself");
}
