//! The cohesive law against its published formulas and values (REFERENCES.md, "Cohesive
//! zone"): peak tractions, branch changes, toughness, irreversibility and contact.

use super::*;

// REFERENCES.md (AS4/PEEK data from memory; values derived from the formulas of Camanho &
// Dávila 2002 and B-K 1996): mode I δ₀ = 8.0e-5 mm, δ_f = 0.024225 mm; shear δ₀ = 1.0e-4 mm,
// δ_f = 0.03438 mm; β = 1: G_c = 1.12300 N/mm, δ₀ₘ = 8.8345e-5 mm, δ_fm = 0.025423 mm. The
// model's public law and the test's own transcription must both give them.
#[test]
fn mixed_mode_law_gives_the_derived_as4_peek_values() {
    let at = |b: f64| mode_mix(&AS4_PEEK, b);
    let m = at(0.0);
    assert_printed(m.onset, 8.0e-5, 5e-12, "mode I δ0");
    assert_printed(m.final_separation, 0.024225, 5e-7, "mode I δf");
    let m = at(1.0);
    assert_printed(m.onset, 1.0e-4, 5e-12, "shear δ0");
    assert_printed(m.final_separation, 0.03438, 5e-6, "shear δf");
    // β = 1 is the shear fraction B = β²/(1 + β²) = 1/2.
    let m = at(0.5);
    assert_printed(m.toughness, 1.12300, 5e-6, "β = 1 G_c");
    assert_printed(m.onset, 8.8345e-5, 5e-10, "β = 1 δ0m");
    assert_printed(m.final_separation, 0.025423, 5e-7, "β = 1 δfm");
    let (d0m, dfm, gc) = published(&AS4_PEEK, Some(1.0));
    assert_printed(gc, 1.12300, 5e-6, "β = 1 G_c (transcription)");
    assert_printed(d0m, 8.8345e-5, 5e-10, "β = 1 δ0m (transcription)");
    assert_printed(dfm, 0.025423, 5e-7, "β = 1 δfm (transcription)");
    for beta in [0.0, 0.3, 1.0, 2.5, 40.0] {
        let b = beta * beta / (1.0 + beta * beta);
        let (d0m, dfm, gc) = published(&AS4_PEEK, Some(beta));
        let m = at(b);
        assert!((m.onset - d0m).abs() <= 1e-14 * d0m && (m.final_separation - dfm).abs() <= 1e-13 * dfm);
        assert!((m.toughness - gc).abs() <= 1e-13 * gc, "β = {beta}");
    }
}

// The same values seen through the model's branches: just below the printed onset the point is
// undamaged (0), just above the damage grows (1); just below the printed final separation it
// still grows, just above it has failed (4). Mode I, shear (2D slip; 3D slips at 60° apart)
// and β = 1 (REFERENCES.md, derived; data from memory).
#[test]
fn branches_change_at_the_printed_separations() {
    let cases: [(&str, PointKind, [f64; 3], f64, f64); 5] = [
        ("mode I", PointKind::Cohesive2d, [1.0, 0.0, 0.0], 8.0e-5, 0.024225),
        ("shear 2D", PointKind::Cohesive2d, [-1e-3, 1.0, 0.0], 1.0e-4, 0.03438),
        ("shear 3D", PointKind::Cohesive3d, [-1e-3, 0.5, 0.75f64.sqrt()], 1.0e-4, 0.03438),
        ("β = 1, 2D", PointKind::Cohesive2d, [1.0, 1.0, 0.0], 8.8345e-5, 0.025423),
        ("β = 1, 3D", PointKind::Cohesive3d, [1.0, 0.6, 0.8], 8.8345e-5, 0.025423),
    ];
    for (what, kind, dir, d0, df) in cases {
        let m = Cohesive::new(kind).unwrap();
        let n = kind.ncomp();
        // λ counts the opening only when open; scale the direction to unit λ.
        let open = dir[0] > 0.0;
        let lam_dir = norm(dir.iter().enumerate().map(|(i, x)| if i == 0 && !open { 0.0 } else { *x }));
        let sep = |lam: f64| dir[..n].iter().map(|x| x * lam / lam_dir).collect::<Vec<f64>>();
        let branch_at = |lam: f64| run(&m, &point_at(&AS4_PEEK, &sep(lam), [0.0, 0.0])).outcome.branch;
        // δ₀ = N/K is exact for the pure modes; the β = 1 onset and every δ_f are printed to 5
        // digits: step off by one unit (β = 1 onset) or two units of the last digit.
        let (u0, uf) = (if d0 == 8.8345e-5 { 1e-9 } else { 1e-12 }, if df == 0.03438 { 2e-5 } else { 2e-6 });
        assert_eq!(branch_at(d0 - u0), if open { branch::ELASTIC } else { branch::CLOSED }, "{what}");
        assert_eq!(branch_at(d0 + u0), branch::GROWTH, "{what}");
        assert_eq!(branch_at(df - uf), branch::GROWTH, "{what}");
        assert_eq!(branch_at(df + uf), branch::FAILED, "{what}");
    }
}

/// Drive a proportional path δ = s·dir (s from 0 to s_end in `steps` increments) and return
/// the work ∫ t·dδ by the trapezoid rule and the last outputs; the energy balance and the
/// monotone damage are checked at every step.
fn proportional_path(kind: PointKind, dir: &[f64], s_end: f64, steps: usize) -> (f64, Outputs<f64>) {
    let m = Cohesive::new(kind).unwrap();
    let n = kind.ncomp();
    let mut state = [0.0, 0.0];
    let mut strain = vec![0.0; n];
    let mut t_prev = vec![0.0; n];
    let mut work = 0.0;
    let mut last = None;
    for k in 1..=steps {
        let s = s_end * k as f64 / steps as f64;
        let sep: Vec<f64> = dir.iter().map(|x| x * s).collect();
        let dstrain: Vec<f64> = sep.iter().zip(&strain).map(|(a, b)| a - b).collect();
        let out = run(
            &m,
            &Point {
                props: AS4_PEEK.to_vec(),
                strain: strain.clone(),
                dstrain: dstrain.clone(),
                state0: state.to_vec(),
                ..Point::default()
            },
        );
        assert_eq!(out.outcome.status, status::OK);
        for i in 0..n {
            work += 0.5 * (out.stress[i] + t_prev[i]) * dstrain[i];
        }
        // Energy balance: work done = stored + dissipated, to the trapezoid's accuracy.
        let tol = 2e-6 * AS4_PEEK[3];
        assert!(
            (work - out.energy[0] - out.energy[1]).abs() <= tol,
            "step {k}: balance {}",
            work - out.energy[0] - out.energy[1]
        );
        assert!(out.state[0] >= state[0], "damage never decreases");
        t_prev.clone_from(&out.stress);
        strain = sep;
        state = [out.state[0], out.state[1]];
        last = Some(out);
    }
    (work, last.unwrap())
}

// G_c = ½ t₀ δ_f, the area under the bilinear traction–separation curve (REFERENCES.md), for
// mode I (t₀ = N = 80 MPa, δ_f = 0.024225 mm: G_Ic = 0.969 N/mm), shear (S = 100 MPa,
// δ_f = 0.03438 mm: G_IIc = 1.719 N/mm) and β = 1 (G_c = 1.12300 N/mm): the work of a
// proportional path to failure, integrated numerically, and the dissipated energy the model
// accumulates. AS4/PEEK data from memory; δ_f and G_c derived.
#[test]
fn area_under_the_curve_is_the_toughness() {
    let steps = 20_000;
    let cases = [
        ("mode I", PointKind::Cohesive2d, vec![1.0, 0.0], 80.0, 0.024225, 0.969),
        ("shear", PointKind::Cohesive2d, vec![0.0, 1.0], 100.0, 0.03438, 1.719),
        ("shear 3D", PointKind::Cohesive3d, vec![0.0, 0.8, -0.6], 100.0, 0.03438, 1.719),
        ("β = 1", PointKind::Cohesive3d, vec![1.0 / 2f64.sqrt(), 0.5, 0.5], 0.0, 0.025423, 1.12300),
    ];
    for (what, kind, dir, t0, df, gc) in cases {
        // The exact G_c of this mixity from the published formulas, against the printed value.
        let open = dir[0] > 0.0;
        let beta = open.then(|| norm(dir[1..].iter().copied()) / dir[0]);
        let (_, _, gc_exact) = published(&AS4_PEEK, beta);
        assert!((gc_exact - gc).abs() <= 5e-6, "{what}: G_c = {gc_exact}, printed {gc}");
        if t0 > 0.0 {
            // ½ t₀ δ_f from the printed δ_f: G_c to the digits printed.
            assert!((0.5 * t0 * df - gc).abs() <= 0.5 * t0 * 5e-7, "{what}: ½ t0 δf = {}", 0.5 * t0 * df);
        }
        let (work, last) = proportional_path(kind, &dir, 1.2 * df, steps);
        // Trapezoid error at the two kinks ~ (1/8)|Δslope| h² ≈ 3e-7 N/mm at this step.
        assert!((work - gc_exact).abs() <= 1e-6, "{what}: ∫ t·dδ = {work}, G_c {gc_exact}");
        assert_eq!(last.outcome.branch, branch::FAILED, "{what}");
        assert_eq!(last.state[0], 1.0);
        // The increments of dissipation telescope to G_c on a proportional path (to the
        // rounding of 20 000 increments).
        assert!(
            (last.state[1] - gc_exact).abs() <= 1e-9 * gc_exact,
            "{what}: dissipated {} vs G_c {gc_exact}",
            last.state[1]
        );
        assert!(last.stress.iter().all(|t| *t == 0.0), "{what}: a failed open interface carries nothing");
    }
    // The peak traction of mode I is N, reached at δ₀ = N/K (the onset of the bilinear law).
    let m = Cohesive::new(PointKind::Cohesive2d).unwrap();
    let out = run(&m, &point_at(&AS4_PEEK, &[8.0e-5, 0.0], [0.0, 0.0]));
    assert!((out.stress[0] - 80.0).abs() <= 1e-9 && out.outcome.branch == branch::ELASTIC);
    // Dissipation is exact for a proportional path (∫ ½ K λ² dd along the damage surface):
    // one increment straight to failure dissipates all of G_Ic.
    let out = run(&m, &point_at(&AS4_PEEK, &[0.03, 0.0], [0.0, 0.0]));
    assert!((out.state[1] - mode_mix(&AS4_PEEK, 0.0).toughness).abs() <= 1e-15);
}

// Irreversibility, secant unloading and the contact penalty of the bilinear law (Camanho &
// Dávila 2002; from memory, not in REFERENCES.md): after damage d, unloading follows
// t = (1 − d) K δ with d kept; a negative opening is carried by the full K and adds no damage,
// even when the interface is damaged or failed.
#[test]
fn damage_is_irreversible_and_contact_uses_the_penalty() {
    let m = Cohesive::new(PointKind::Cohesive3d).unwrap();
    let k = AS4_PEEK[0];
    let (d0m, dfm, _) = published(&AS4_PEEK, Some(0.0));
    let lam = lambda_of_damage(d0m, dfm, 0.5);
    let loaded = run(&m, &point_at(&AS4_PEEK, &[lam, 0.0, 0.0], [0.0, 0.0]));
    assert_eq!(loaded.outcome.branch, branch::GROWTH);
    assert!((loaded.state[0] - 0.5).abs() <= 1e-12);
    let state = [loaded.state[0], loaded.state[1]];
    // Unloading to half the separation, with a slip added: secant.
    let p = Point {
        props: AS4_PEEK.to_vec(),
        strain: vec![lam, 0.0, 0.0],
        dstrain: vec![-lam / 2.0, 1e-5, 0.0],
        state0: state.to_vec(),
        ..Point::default()
    };
    let out = run(&m, &p);
    assert_eq!(out.outcome.branch, branch::UNLOADING);
    assert_eq!(out.state, state.to_vec());
    let kd = (1.0 - state[0]) * k;
    assert!((out.stress[0] - kd * lam / 2.0).abs() <= 1e-9 && (out.stress[1] - kd * 1e-5).abs() <= 1e-9);
    for i in 0..3 {
        for j in 0..3 {
            assert_eq!(out.tangent[i + 3 * j], if i == j { kd } else { 0.0 });
        }
    }
    // Closing: a negative opening far beyond δ_f carries K δ₃ and leaves d alone.
    for (d, expect) in [(0.0, branch::CLOSED), (state[0], branch::CLOSED), (1.0, branch::FAILED)] {
        let out = run(&m, &point_at(&AS4_PEEK, &[-10.0 * dfm, 2e-5, 0.0], [d, 0.3]));
        assert_eq!(out.outcome.branch, expect);
        assert_eq!(out.state, vec![d, 0.3]);
        assert!((out.stress[0] + 10.0 * k * dfm).abs() <= 1e-9);
        assert_eq!(out.tangent[0], k);
        assert!((out.stress[1] - (1.0 - d) * k * 2e-5).abs() <= 1e-9);
    }
    // The failed interface: no traction when open.
    let out = run(&m, &point_at(&AS4_PEEK, &[1e-4, 1e-4, 0.0], [1.0, 1.0]));
    assert_eq!((out.outcome.branch, out.stress.clone()), (branch::FAILED, vec![0.0; 3]));
    assert!(out.tangent.iter().all(|x| *x == 0.0));
    assert!(out.outcome.provides(provides::ENERGY) && !out.outcome.provides(provides::DSTRESS_DTEMP));
}
