//! Trials of a discrepancy made of the isotropic projectors: the returned tangent's
//! deviatoric part (the shear-modulus term 2G P_dev of an isotropic stiffness) or its
//! volumetric part (the bulk-modulus term 3K P_vol) off by a factor, or both by different
//! factors (a wrong Poisson's ratio). In Mandel form P_vol = 1⊗1/3 over the three normal
//! components and P_dev = I − P_vol (Holzapfel 2000, §6.6, from memory); the two are
//! orthogonal, so the least-squares parts of the discrepancy along them are its projections.

use super::kind::{Cause, Evidence, Found};
use crate::convention::Component;

/// Relative size below which a fitted part is taken as absent: a part this small beside the
/// derivative's own is rounding of the other part's fit, not an error of its own.
const ABSENT: f64 = 1e-6;

/// Shear-modulus, bulk-modulus and isotropic-moduli trials, for a convention with the three
/// normal components (3D solids, plane strain and axisymmetry); nothing for others.
pub(super) fn try_isotropic(ev: &Evidence<'_>, found: &mut Found) {
    let conv = ev.conv;
    let n = conv.ncomp();
    let Some(normals) = [Component::C11, Component::C22, Component::C33]
        .into_iter()
        .map(|c| conv.position(c))
        .collect::<Option<Vec<usize>>>()
    else {
        return;
    };
    if n < 4 {
        return;
    }
    let mut d = ev.returned.to_vec();
    let mut m = ev.numerical.to_vec();
    conv.tangent_to_mandel(&mut d);
    conv.tangent_to_mandel(&mut m);
    for (x, y) in d.iter_mut().zip(&m) {
        *x -= y;
    }
    if d.iter().chain(&m).any(|x| !x.is_finite()) {
        return;
    }
    // The projectors, column-major n × n.
    let vol = |i: usize, j: usize| if normals.contains(&i) && normals.contains(&j) { 1.0 / 3.0 } else { 0.0 };
    let dev = |i: usize, j: usize| if i == j { 1.0 } else { 0.0 } - vol(i, j);
    let along = |a: &[f64], p: &dyn Fn(usize, usize) -> f64| {
        (0..n).flat_map(|j| (0..n).map(move |i| (i, j))).map(|(i, j)| a[i + j * n] * p(i, j)).sum::<f64>()
    };
    // ⟨P_dev, P_dev⟩ = n − 1 and ⟨P_vol, P_vol⟩ = 1 (their ranks).
    let (a, b) = (along(&d, &dev) / (n as f64 - 1.0), along(&d, &vol));
    let (g, k) = (along(&m, &dev) / (n as f64 - 1.0), along(&m, &vol));
    if !(g.abs() > 0.0 && k.abs() > 0.0) {
        return;
    }
    // A derivative with no deviatoric (or no volumetric) part to speak of has no modulus of
    // that part whose factor could be read: its factor is rounding over rounding (a
    // Drucker–Prager apex, whose derivative is a multiple of 1⊗1, read "the deviatoric part
    // is 0.5000×" and sent the user to the elastic moduli for a wrong apex term; a
    // user-style sweep). Where the state changed the rank-one trials name such a term.
    let (gm, km) = (g.abs(), k.abs());
    if gm <= ABSENT * km || km <= ABSENT * gm {
        return;
    }
    // The returned tangent less the fitted parts, back in the routine's form.
    let corrected = |fa: f64, fb: f64| {
        let mut c = ev.returned.to_vec();
        conv.tangent_to_mandel(&mut c);
        for j in 0..n {
            for i in 0..n {
                c[i + j * n] -= fa * dev(i, j) + fb * vol(i, j);
            }
        }
        conv.tangent_from_mandel(&mut c);
        c
    };
    let (rg, rk) = ((g + a) / g, (k + b) / k);
    let (fg, fk) = (factor(rg), factor(rk));
    let shear_only = (b / k).abs() <= ABSENT;
    let bulk_only = (a / g).abs() <= ABSENT;
    // Where the state changed, the derivative's isotropic parts hold the inelastic
    // correction: a part of the returned tangent of the other sign than the derivative's (a
    // factor ≤ 0) is no modulus constant off (a porous plasticity routine with its volumetric
    // plastic term's sign flipped read `bulk-modulus −82×` at hydrostatic states); the
    // rank-one trials tell that term.
    let plausible = |f: f64| !ev.state_changed || f > 0.0;
    if !bulk_only && plausible(rg) {
        found.push(
            Cause::ShearModulus,
            format!(
                "the deviatoric part (the shear-modulus term 2G P_dev) is {fg}× the derivative's ({:.6e} against {:.6e})",
                g + a,
                g
            ),
            ev.error(&corrected(a, 0.0)),
        );
    }
    if !shear_only && plausible(rk) {
        found.push(
            Cause::BulkModulus,
            format!(
                "the volumetric part (the bulk-modulus term 3K P_vol) is {fk}× the derivative's ({:.6e} against {:.6e})",
                k + b,
                k
            ),
            ev.error(&corrected(0.0, b)),
        );
    }
    if !shear_only && !bulk_only && plausible(rg) && plausible(rk) {
        // The same in Lamé form, λ = K − 2μ/3 = (3K − 2μ)/3 and μ: a routine that writes its
        // stiffness as λ 1⊗1 + 2μ I with one of them wrong shows the other at 1.
        let (lambda, lambda_ret) = ((k - g) / 3.0, (k + b - g - a) / 3.0);
        let lame = if lambda.abs() > ABSENT * k.abs() {
            format!("; in Lamé form μ is {fg}× and λ {}×", factor(lambda_ret / lambda))
        } else {
            String::new()
        };
        found.push(
            Cause::IsotropicModuli,
            format!(
                "the deviatoric part (2G) is {fg}× and the volumetric part (3K) {fk}× the derivative's{lame}: \
                 moduli of an isotropic stiffness off, as a wrong Poisson's ratio or Lamé constant gives"
            ),
            ev.error(&corrected(a, b)),
        );
    }
}

/// A factor as the words give it: four decimals where that reads (1.2500), else three
/// significant digits in exponent form (a part of the derivative that is zero to rounding
/// gave 73300775185066688.0000).
fn factor(x: f64) -> String {
    if x.is_finite() && (1e-3..1e4).contains(&x.abs()) {
        format!("{x:.4}")
    } else {
        format!("{x:.3e}")
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn a_factor_reads_with_four_decimals_or_in_exponent_form() {
        assert_eq!(super::factor(1.25), "1.2500");
        assert_eq!(super::factor(-0.2), "-0.2000");
        assert_eq!(super::factor(7.330_077_518_506_669e16), "7.330e16");
        assert_eq!(super::factor(0.0), "0.000e0");
    }
}
