//! The check of one call on its own: the tangent the routine returns at the driver's current
//! increment against each scheme's derivative, the outputs that are not finite numbers, and the
//! diagnosis when a check fails.
//!
//! This is the per-increment judgement of [`crate::check::run`], made available for a single
//! call so that a bisection can judge a scaled increment and a replay can judge a saved call
//! with the same rules.

use serde::{Deserialize, Serialize};

use smallvec::SmallVec;

use crate::compare::{
    compare_dtemp_floor, compare_with, dtemp_floor, rounding_floor, Limits, SoftDirections,
};
use crate::diagnose::{self, Context, Diagnosis};
use crate::driver::{Direction, Driver};
use crate::report::{CheckOutcome, SchemeCheck};
use crate::routine::{provides, Caller, Fault};
use crate::schemes::Scheme;
use crate::settings::Settings;

mod columns;
mod odd_calls;
mod one_sided;
mod passed;
mod records;
mod straddle;
use columns::{strain_columns, ColumnCalls};
use odd_calls::twin_refusal;
pub use odd_calls::TWIN_REFUSED;
use one_sided::OneSided;
pub(crate) use one_sided::ONE_SIDED;
pub use records::{call_record, fault_record, fault_record_of_call};
use straddle::{kink_straddled, one_sided_distance, straddle_level, TEMPERATURE_BIT};

pub use crate::report::FAULT_FINDING;

/// The judgement of one call.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, schemars::JsonSchema)]
pub struct CallCheck {
    /// The branch the routine reported, if it reported one.
    pub reported_branch: Option<i32>,
    /// Whether the state variables changed in the call.
    pub state_changed: bool,
    pub checks: Vec<SchemeCheck>,
    /// Outputs of the call that are not finite numbers, e.g. "stress[0] = NaN".
    pub non_finite: Vec<String>,
    pub diagnosis: Option<Diagnosis>,
    /// The best numerical tangent measured (complex step when it ran, else the highest
    /// order), with its scheme: what the next increment's stale-tangent hypothesis needs.
    pub best: Option<(Scheme, Vec<f64>)>,
}

impl CallCheck {
    /// The verdict of the call, by the rule of [`crate::report::IncrementResult::passed`].
    pub fn passed(&self) -> bool {
        self.non_finite.is_empty()
            && match &self.diagnosis {
                Some(d) => d.pass,
                None => self.checks.iter().all(SchemeCheck::passed),
            }
    }

    /// The largest tangent error of any comparison (0 when none ran).
    pub fn worst_error(&self) -> f64 {
        self.checks
            .iter()
            .filter_map(|c| match &c.tangent {
                CheckOutcome::Compared(x) => Some(x.error()),
                _ => None,
            })
            .fold(0.0, f64::max)
    }

    /// Whether a perturbed call faulted.
    pub fn faulted(&self) -> bool {
        self.checks.iter().any(SchemeCheck::faulted)
    }

    /// What the diagnosis found: `none` when the call passed, `undiagnosed` when it failed
    /// without a diagnosis.
    pub fn finding(&self) -> &str {
        match &self.diagnosis {
            Some(d) => &d.finding,
            None if self.passed() => "none",
            // As an increment of a check names it (a case of such a call recorded
            // "undiagnosed" where explore named non-finite-output; a user-style sweep).
            None if !self.non_finite.is_empty() => "non-finite-output",
            None if self.faulted() => FAULT_FINDING,
            None => "undiagnosed",
        }
    }
}

/// One scheme's derivatives at a call, before they are compared: the tangent (column-major,
/// the first n × n entries) or why there is none, and ∂σ/∂T when the routine returns it.
struct Measured {
    scheme: Scheme,
    h: f64,
    /// The step of the ∂σ/∂T column (temperature units).
    ht: f64,
    tangent: [f64; 36],
    /// Why there is no tangent to compare (skipped, or a call faulted).
    outcome: Option<CheckOutcome>,
    dtemp: Option<Result<[f64; 6], CheckOutcome>>,
    /// Columns made one-sided because the routine refused a call of the stencil.
    /// (Boxed: a refusal is rare, and the measurement moves on every increment.)
    one_sided: Option<Box<OneSided>>,
}

/// What the calls of one increment gave, before any judgement: the base call's tangent and
/// ∂σ/∂T, every scheme's derivatives, the sharpest numerical tangent and the soft directions
/// found from it. [`check_call`] judges it in full; the walk of a check that keeps only the
/// failures in detail first asks [`Measurement::passed`] and judges in full only when that
/// says no, so a passing increment costs no report structures.
pub struct Measurement {
    n: usize,
    has_twin: bool,
    /// The returned tangent, column-major (the first n × n entries).
    returned: [f64; 36],
    returned_dtemp: Option<[f64; 6]>,
    reported: i32,
    pub(crate) state_changed: bool,
    twin_real_gap: Option<f64>,
    dtemp_abs_floor: f64,
    /// ‖σ‖ + ‖C‖·strain scale: the size of the stresses a difference subtracts (its rounding).
    stress_size: f64,
    measured: SmallVec<[Measured; 2]>,
    /// Which of `measured` is the sharpest tangent.
    best_at: Option<usize>,
    soft: Option<SoftDirections>,
    /// Strain columns (bit j), and the ∂σ/∂T column (bit [`TEMPERATURE_BIT`]), where the
    /// central difference's own calls put the returned column away from both one-sided
    /// quotients (see [`one_sided_distance`]), and those distances: a kink at the point that
    /// the central difference straddles.
    straddled: u8,
    straddle_distance: [f64; 7],
    /// The floor of a strain column's norm in those distances (the entry floor times the
    /// returned tangent's norm).
    column_floor: f64,
    /// The complex-step twin refused a call (a status) at an input the real routine computes:
    /// in words. The complex step's results are set aside, and the twin is not complex-step
    /// safe.
    twin_refused: Option<String>,
}

impl Measurement {
    /// The branch the routine reported, if it reported one.
    pub fn reported_branch(&self) -> Option<i32> {
        (self.reported >= 0).then_some(self.reported)
    }

    /// Whether the base call returned ∂σ/∂T (and the schemes measured it).
    pub fn returns_dtemp(&self) -> bool {
        self.returned_dtemp.is_some()
    }

    /// The sharpest numerical tangent measured (see [`CallCheck::best`]), column-major.
    pub fn best(&self) -> Option<&[f64]> {
        self.best_at.map(|b| &self.measured[b].tangent[..self.n * self.n])
    }
}

/// Make every call of the driver's current increment (as set, or rescaled, or solved for
/// mixed control): the base call (made again, with the driver's strain increment) and every
/// scheme of `settings`. A fault of the base call is the error; a fault of a perturbed call
/// is kept in the measurement. The base outputs stay in `driver.base`.
pub fn measure_call(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    settings: &Settings,
) -> Result<Measurement, Fault> {
    // The convention is read through `caller` where it is needed (no copy per call).
    let n = caller.info().convention.ncomp();
    let has_twin = caller.has_complex();
    driver.base_call(caller)?;
    let mut returned = [0.0; 36];
    returned[..n * n].copy_from_slice(&driver.base.tangent[..n * n]);
    let returned_dtemp = driver.base.outcome.provides(provides::DSTRESS_DTEMP).then(|| {
        let mut d = [0.0; 6];
        d[..n].copy_from_slice(&driver.base.dstress_dtemp[..n]);
        d
    });
    let reported = driver.base.outcome.branch;
    let state_changed = driver.base.state.iter().zip(&driver.start().state).any(|(a, b)| a != b);
    let h_strain_scale = driver.strain_scale(settings.step_floor);
    let h_temp_scale = driver.temp_scale(settings.temp_floor);
    // The twin's real part against the real stress, over every complex call (a running max:
    // no allocation).
    let mut twin_real_gap: Option<f64> = None;
    let stress_scale = {
        let s = driver.base.stress.iter().map(|x| x * x).sum::<f64>().sqrt();
        let c = returned[..n * n].iter().filter(|x| x.is_finite()).map(|x| x * x).sum::<f64>().sqrt();
        (s + c * h_strain_scale).max(1e-300)
    };
    let dtemp_abs_floor = dtemp_floor(&driver.base.stress, &returned[..n * n], h_strain_scale, h_temp_scale);
    // First every scheme's derivatives (the routine calls, in the settings' order), then the
    // comparisons: the soft directions are found once, from the sharpest numerical tangent,
    // and every scheme is measured along them.
    let mut measured: SmallVec<[Measured; 2]> = SmallVec::with_capacity(settings.schemes.len());
    let mut twin_refused: Option<String> = None;
    let (mut straddled, mut straddle_distance) = (0u8, [0.0; 7]);
    let column_floor = settings.entry_floor
        * returned[..n * n].iter().map(|x| x * x).sum::<f64>().sqrt().max(f64::MIN_POSITIVE);
    for &scheme in &settings.schemes {
        let ss = settings.scheme(scheme);
        let h = ss.rel_step * h_strain_scale;
        let ht = ss.rel_step * h_temp_scale;
        // Written in place (a tangent is 36 numbers: no copies of it per scheme).
        measured.push(Measured {
            scheme,
            h,
            ht,
            tangent: [0.0; 36],
            outcome: None,
            dtemp: None,
            one_sided: None,
        });
        let m = measured.last_mut().expect("just pushed");
        if scheme == Scheme::ComplexStep && !has_twin {
            m.outcome = Some(CheckOutcome::Skipped { reason: "no complex twin".into() });
            continue;
        }
        let seen = |j: usize, c: ColumnCalls<'_>| {
            if scheme == Scheme::ComplexStep {
                let gap = c.cplx.iter().zip(c.base).map(|(c, b)| (c.re - b).abs()).fold(0.0, f64::max)
                    / stress_scale;
                twin_real_gap =
                    Some(twin_real_gap.unwrap_or(0.0).max(if gap.is_nan() { f64::INFINITY } else { gap }));
            }
            if scheme == Scheme::Central {
                let d = one_sided_distance(
                    &c.base[..n],
                    &c.plus[..n],
                    &c.minus[..n],
                    &returned[j * n..(j + 1) * n],
                    h,
                    column_floor,
                );
                if d > straddle_level(settings) {
                    straddled |= 1 << j;
                    straddle_distance[j] = d;
                }
            }
        };
        let columns =
            strain_columns(scheme, driver, caller, h, &mut m.tangent[..n * n], seen).or_else(|(j, f)| {
                one_sided::finish_strain_columns(
                    scheme,
                    driver,
                    caller,
                    h,
                    j,
                    f,
                    &mut m.tangent[..n * n],
                    &mut m.one_sided,
                )
            });
        if let Err((j, f)) = columns {
            let what =
                format!("dstrain[{j}] {} {h:.3e}", if scheme == Scheme::ComplexStep { "+ i" } else { "±" });
            m.outcome = Some(match twin_refusal(scheme, &f, &what) {
                Some(w) => {
                    twin_refused.get_or_insert(w);
                    CheckOutcome::Skipped { reason: TWIN_REFUSED.into() }
                }
                None => CheckOutcome::Fault(fault_record(&f, driver, Some(what))),
            });
        }
        if returned_dtemp.is_some() {
            let mut col = [0.0; 6];
            let mut straddle_look = true;
            let made =
                scheme.column(driver, caller, Direction::Temperature, ht, &mut col[..n]).or_else(|f| {
                    // One-sided: the driver's plus and minus no longer hold the stencil's calls.
                    straddle_look = false;
                    one_sided::finish_dtemp_column(
                        scheme,
                        driver,
                        caller,
                        ht,
                        f,
                        &mut col[..n],
                        &mut m.one_sided,
                    )
                });
            m.dtemp = Some(match made {
                Ok(()) => Ok(col),
                Err(f) => {
                    let what =
                        format!("dtemp {} {ht:.3e}", if scheme == Scheme::ComplexStep { "+ i" } else { "±" });
                    Err(match twin_refusal(scheme, &f, &what) {
                        Some(w) => {
                            twin_refused.get_or_insert(w);
                            CheckOutcome::Skipped { reason: TWIN_REFUSED.into() }
                        }
                        None => CheckOutcome::Fault(fault_record(&f, driver, Some(what))),
                    })
                }
            });
            if let (Scheme::Central, Some(Ok(_)), Some(ret), true) =
                (scheme, &m.dtemp, &returned_dtemp, straddle_look)
            {
                let d = one_sided_distance(
                    &driver.base.stress[..n],
                    &driver.plus.stress[..n],
                    &driver.minus.stress[..n],
                    &ret[..n],
                    ht,
                    dtemp_abs_floor,
                );
                if d > straddle_level(settings) {
                    straddled |= 1 << TEMPERATURE_BIT;
                    straddle_distance[TEMPERATURE_BIT] = d;
                }
            }
        }
    }
    // The sharpest tangent measured: the complex step's when it ran, else the highest order
    // (the first of equal orders).
    let mut best_at: Option<usize> = None;
    for (k, m) in measured.iter().enumerate().filter(|(_, m)| m.outcome.is_none()) {
        let better = match best_at {
            None => true,
            Some(b) => {
                let s = measured[b].scheme;
                m.scheme == Scheme::ComplexStep || (s != Scheme::ComplexStep && m.scheme.order() > s.order())
            }
        };
        if better {
            best_at = Some(k);
        }
    }
    let soft = best_at.map(|b| {
        SoftDirections::of(&caller.info().convention, &measured[b].tangent[..n * n], Some(driver.dstrain()))
    });
    Ok(Measurement {
        n,
        has_twin,
        returned,
        returned_dtemp,
        reported,
        state_changed,
        twin_real_gap,
        dtemp_abs_floor,
        stress_size: stress_scale,
        measured,
        best_at,
        soft,
        straddled,
        straddle_distance,
        column_floor,
        twin_refused,
    })
}

/// Check the driver's current increment (as set, or rescaled, or solved for mixed control):
/// the base call (made again, with the driver's strain increment), every scheme of
/// `settings`, and the diagnosis when a check fails and `settings.diagnose` is on. `previous`
/// is the best numerical tangent at the end of the previous increment, if known.
///
/// A fault of the base call or of a call of the diagnosis is the error; a fault of a
/// perturbed call is a [`CheckOutcome::Fault`] in the result. The base outputs stay in
/// `driver.base`.
pub fn check_call(
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    settings: &Settings,
    previous: Option<&[f64]>,
) -> Result<CallCheck, Fault> {
    let m = measure_call(driver, caller, settings)?;
    judge(m, driver, caller, settings, previous)
}

/// The full judgement of a measured call: every comparison with its worst entries, the
/// outputs that are not finite numbers, and the diagnosis when a check fails and
/// `settings.diagnose` is on (a fault of a call of the diagnosis is the error).
pub fn judge(
    me: Measurement,
    driver: &mut Driver,
    caller: &mut Caller<'_>,
    settings: &Settings,
    previous: Option<&[f64]>,
) -> Result<CallCheck, Fault> {
    let n = me.n;
    let returned = &me.returned[..n * n];
    let returned_dtemp = me.returned_dtemp.as_ref().map(|d| &d[..n]);
    let (measured, soft) = (&me.measured, &me.soft);
    let best: Option<(Scheme, Vec<f64>)> =
        me.best_at.map(|b| (measured[b].scheme, measured[b].tangent[..n * n].to_vec()));
    let mut checks = Vec::with_capacity(measured.len());
    let mut failed_dtemp: Option<Vec<f64>> = None;
    // Whether the complex step agrees on the tangent and on ∂σ/∂T: a column a difference made
    // one-sided at the edge of the routine's domain that disagrees where the exact derivative
    // agrees is the difference's error (a response too curved for its step there), set aside.
    let exact = one_sided::exact_agrees(&me, caller, settings);
    for m in measured {
        let ss = settings.scheme(m.scheme);
        let limits = Limits::new(ss.tol, settings.entry_floor, settings.worst_entries);
        let tangent_limits =
            limits.with_abs_floor(rounding_floor(m.scheme, me.stress_size, m.h, ss.rel_step, ss.tol));
        let numerical = &m.tangent[..n * n];
        let conv = &caller.info().convention;
        let tangent = match (&m.outcome, soft) {
            (Some(outcome), _) => outcome.clone(),
            (None, Some(soft)) => {
                CheckOutcome::Compared(compare_with(conv, returned, numerical, tangent_limits, soft))
            }
            (None, None) => unreachable!("a scheme that measured a tangent makes the sharpest one"),
        };
        let tangent = one_sided::set_aside(tangent, m.one_sided.as_deref(), false, exact.0);
        let dstress_dtemp = match (returned_dtemp, &m.dtemp) {
            (Some(ret), Some(Ok(col))) => {
                let c = compare_dtemp_floor(conv, ret, &col[..n], limits, me.dtemp_abs_floor);
                let c =
                    one_sided::set_aside(CheckOutcome::Compared(c), m.one_sided.as_deref(), true, exact.1);
                if let (CheckOutcome::Compared(x), None) = (&c, &failed_dtemp) {
                    if !x.pass {
                        failed_dtemp = Some(col[..n].to_vec());
                    }
                }
                Some(c)
            }
            (_, Some(Err(fault))) => Some(fault.clone()),
            _ => None,
        };
        let temperature_step = dstress_dtemp.is_some().then_some(m.ht);
        checks.push(SchemeCheck { scheme: m.scheme, step: m.h, tangent, dstress_dtemp, temperature_step });
    }
    let non_finite = non_finite_outputs(driver, "");
    let mut out = CallCheck {
        reported_branch: me.reported_branch(),
        state_changed: me.state_changed,
        checks,
        non_finite,
        diagnosis: None,
        best,
    };
    // Every check passed, but the central difference straddled a kink at the point in some
    // column, where its mean of the two sides may equal a returned tangent that is neither
    // side's derivative: the diagnosis judges it by the one-sided derivatives.
    let (straddled, dtemp_straddled) = if settings.diagnose
        && me.straddled != 0
        && out.non_finite.is_empty()
        && !out.faulted()
        && out.checks.iter().all(SchemeCheck::passed)
    {
        kink_straddled(&me, driver, caller, settings)
    } else {
        (false, false)
    };
    // A straddled ∂σ/∂T column is judged as a failed one is: against the temperature's own
    // one-sided derivatives (the central column is the cause ranking's first reference).
    if dtemp_straddled && failed_dtemp.is_none() {
        failed_dtemp =
            me.measured.iter().find(|m| m.scheme == Scheme::Central).and_then(|m| match &m.dtemp {
                Some(Ok(col)) => Some(col[..n].to_vec()),
                _ => None,
            });
    }
    let straddled = straddled || dtemp_straddled;
    if settings.diagnose
        && out.non_finite.is_empty()
        && !out.faulted()
        && (straddled || !out.checks.iter().all(SchemeCheck::passed))
    {
        let tangent_ok = |c: &SchemeCheck| !matches!(&c.tangent, CheckOutcome::Compared(x) if !x.pass);
        let complex =
            out.checks.iter().find(|c| c.scheme == Scheme::ComplexStep).and_then(|c| match &c.tangent {
                CheckOutcome::Compared(x) => Some((
                    if x.pass { x.error().min(x.tol) } else { x.error().max(x.tol * (1.0 + 1e-12)) },
                    x.tol,
                )),
                _ => None,
            });
        let dtemp_complex =
            out.checks.iter().find(|c| c.scheme == Scheme::ComplexStep).and_then(|c| {
                match &c.dstress_dtemp {
                    Some(CheckOutcome::Compared(x)) => Some((
                        if x.pass { x.error().min(x.tol) } else { x.error().max(x.tol * (1.0 + 1e-12)) },
                        x.tol,
                    )),
                    _ => None,
                }
            });
        let dtemp_real = out
            .checks
            .iter()
            .filter(|c| c.scheme != Scheme::ComplexStep)
            .filter_map(|c| match &c.dstress_dtemp {
                Some(CheckOutcome::Compared(x)) => Some((x.error(), x.tol)),
                _ => None,
            })
            .min_by(|a, b| a.0.total_cmp(&b.0));
        let non_finite_quotient = odd_calls::non_finite_quotient(measured, n, &caller.info().convention);
        let ctx = Context {
            non_finite_quotient,
            returned,
            dtemp_real,
            dtemp: returned_dtemp.zip(failed_dtemp.as_deref()),
            dtemp_complex,
            dtemp_floor: me.dtemp_abs_floor,
            complex,
            twin_real_gap: me.twin_real_gap,
            tangent_checks_pass: out.checks.iter().all(tangent_ok),
            previous,
            state_changed: me.state_changed,
            reported_branch: me.reported,
            has_twin: me.has_twin,
            failed_tol: out
                .checks
                .iter()
                .filter_map(|c| match &c.tangent {
                    CheckOutcome::Compared(x) if !x.pass => Some(x.tol),
                    _ => None,
                })
                .fold(f64::INFINITY, f64::min),
        };
        let conv = caller.info().convention.clone();
        // (A fault kept from an earlier call, e.g. a perturbed one, is not the diagnosis's.)
        let _ = caller.take_faulted();
        out.diagnosis = Some(match diagnose::run(driver, caller, &conv, &ctx, settings) {
            Ok(d) => d,
            // A refusal of a call of the closer look is no fault of the routine; a crash or a
            // guard's finding is (with that call's inputs, `Caller::take_faulted`).
            Err(f @ Fault::Status { .. }) => {
                let call = caller.take_faulted();
                let at = call.map_or(String::new(), |c| {
                    let d: Vec<String> = c.dstrain.iter().map(|x| format!("{x:.4e}")).collect();
                    format!(" (dstrain [{}], dtemp {:.4e}, dtime {:.4e})", d.join(", "), c.temp[1], c.time[1])
                });
                diagnose::Diagnosis::stopped(&format!("{f} in one of its calls{at}"))
            }
            Err(f) => return Err(f),
        });
    }
    if let Some(w) = &me.twin_refused {
        match &mut out.diagnosis {
            Some(d) => {
                d.twin_unsafe = true;
                d.reason = format!("{}; {w}", d.reason);
            }
            None => {
                let mut d = diagnose::Diagnosis::stopped("");
                d.pass = out.passed();
                d.reason = format!("{w}; the real schemes' checks stand");
                d.finding = if d.pass { diagnose::TWIN_FINDING.into() } else { "undiagnosed".into() };
                d.twin_unsafe = true;
                out.diagnosis = Some(d);
            }
        }
    }
    Ok(out)
}

/// `settings` reduced to the one scheme that judges a call most sharply: the complex step when
/// the routine has a twin and the settings run it, else the highest-order scheme they run
/// (central when they run none of those); no diagnosis. A bisection judges many calls with it.
pub fn sharpest(settings: &Settings, has_twin: bool) -> Settings {
    let mut s = settings.clone();
    let pick = if has_twin && settings.schemes.contains(&Scheme::ComplexStep) {
        Scheme::ComplexStep
    } else {
        settings
            .schemes
            .iter()
            .copied()
            .filter(|x| *x != Scheme::ComplexStep)
            .max_by(|a, b| a.order().total_cmp(&b.order()))
            .unwrap_or(Scheme::Central)
    };
    s.schemes = vec![pick];
    s.diagnose = false;
    s
}

/// The base call's outputs that are not finite numbers, one line per output array (the first
/// such entry and how many more), followed by `context`.
pub fn non_finite_outputs(driver: &Driver, context: &str) -> Vec<String> {
    let mut lines = Vec::new();
    for (what, v) in
        [("stress", &driver.base.stress), ("state", &driver.base.state), ("tangent", &driver.base.tangent)]
    {
        if let Some(i) = v.iter().position(|x| !x.is_finite()) {
            let count = v.iter().filter(|x| !x.is_finite()).count();
            lines.push(format!(
                "{what}[{i}] = {}{}{context}",
                v[i],
                if count > 1 { format!(" and {} more", count - 1) } else { String::new() }
            ));
        }
    }
    lines
}
