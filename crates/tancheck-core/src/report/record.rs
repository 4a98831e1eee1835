//! The compact report: a fixed-size record per increment (enough to plot the path and its
//! errors later) and a collector that keeps the full detail only of the increments that need
//! it, so a long path costs memory for its records only.

use std::borrow::Cow;

use serde::{Deserialize, Serialize};

use super::{BranchSummary, CheckOutcome, IncrementResult, SchemeCheck, SchemeSummary};
use crate::compare::PassedScheme;
use crate::schemes::Scheme;
use crate::settings::Settings;

/// Components a record holds at most (a 3D solid).
pub const RECORD_COMPONENTS: usize = 6;
/// Schemes a record holds at most (every scheme there is).
pub const RECORD_SCHEMES: usize = Scheme::ALL.len();

/// One increment in a fixed size: where it went, which branch, and the worst error per scheme.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct IncrementRecord {
    /// 1-based (0 is the zero increment from the start state).
    pub index: u32,
    /// The branch the routine reported, if it reported one.
    pub branch: Option<i32>,
    pub state_changed: bool,
    /// The increment's verdict ([`IncrementResult::passed`]).
    pub pass: bool,
    ncomp: u8,
    nschemes: u8,
    strain: [f64; RECORD_COMPONENTS],
    stress: [f64; RECORD_COMPONENTS],
    /// Largest of norm, entry and soft-direction error per scheme (NaN: not compared).
    worst: [f64; RECORD_SCHEMES],
}

impl IncrementRecord {
    /// The record of `inc`, whose checks follow `schemes` (the settings' order).
    pub fn of(inc: &IncrementResult, schemes: &[Scheme]) -> IncrementRecord {
        let mut r = IncrementRecord {
            index: inc.index as u32,
            branch: inc.reported_branch,
            state_changed: inc.state_changed,
            pass: inc.passed(),
            ncomp: inc.strain.len().min(RECORD_COMPONENTS) as u8,
            nschemes: schemes.len().min(RECORD_SCHEMES) as u8,
            strain: [0.0; RECORD_COMPONENTS],
            stress: [0.0; RECORD_COMPONENTS],
            worst: [f64::NAN; RECORD_SCHEMES],
        };
        let n = r.ncomp as usize;
        r.strain[..n].copy_from_slice(&inc.strain[..n]);
        r.stress[..n.min(inc.stress.len())].copy_from_slice(&inc.stress[..n.min(inc.stress.len())]);
        for c in &inc.checks {
            if let (Some(k), CheckOutcome::Compared(cmp)) =
                (schemes.iter().position(|&s| s == c.scheme), &c.tangent)
            {
                if k < RECORD_SCHEMES {
                    r.worst[k] = cmp.error();
                }
            }
        }
        r
    }

    /// The branch as the reports name it: the routine's number (when it reports one) and
    /// whether the state changed, e.g. `#1 (state changed)`.
    pub fn branch_label(&self) -> String {
        super::branch_label(self.branch, self.state_changed)
    }

    /// Strain at the end of the increment, routine order.
    pub fn strain(&self) -> &[f64] {
        &self.strain[..self.ncomp as usize]
    }

    /// Stress at the end of the increment, routine order.
    pub fn stress(&self) -> &[f64] {
        &self.stress[..self.ncomp as usize]
    }

    /// Worst error per scheme, in the order of the report's `settings.schemes`; `None` where
    /// the scheme compared nothing (skipped, or the call faulted).
    pub fn worst_errors(&self) -> impl Iterator<Item = Option<f64>> + '_ {
        self.worst[..self.nschemes as usize].iter().map(|&e| (!e.is_nan()).then_some(e))
    }

    /// The largest worst error over the schemes (0 when none compared).
    pub fn worst_error(&self) -> f64 {
        self.worst_errors().flatten().fold(0.0, f64::max)
    }
}

/// The JSON shape of a record.
#[derive(Serialize, Deserialize, schemars::JsonSchema)]
#[schemars(rename = "IncrementRecord")]
struct RecordShape {
    index: u32,
    branch: Option<i32>,
    state_changed: bool,
    pass: bool,
    /// Strain at the end of the increment, routine order.
    strain: Vec<f64>,
    /// Stress at the end of the increment, routine order.
    stress: Vec<f64>,
    /// Largest of norm, entry and soft-direction error per scheme, in the order of
    /// `settings.schemes`; null where the scheme compared nothing.
    worst_error: Vec<Option<f64>>,
}

/// [`RecordShape`] borrowing the record's arrays, for writing: the same fields in the same
/// order, without three allocations per record (a 20,000-increment report has 20,000 records).
#[derive(Serialize)]
struct RecordShapeRef<'a> {
    index: u32,
    branch: Option<i32>,
    state_changed: bool,
    pass: bool,
    strain: &'a [f64],
    stress: &'a [f64],
    worst_error: &'a [Option<f64>],
}

impl Serialize for IncrementRecord {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut worst = [None; RECORD_SCHEMES];
        for (w, e) in worst.iter_mut().zip(self.worst_errors()) {
            *w = e;
        }
        RecordShapeRef {
            index: self.index,
            branch: self.branch,
            state_changed: self.state_changed,
            pass: self.pass,
            strain: self.strain(),
            stress: self.stress(),
            worst_error: &worst[..self.nschemes as usize],
        }
        .serialize(s)
    }
}

impl<'de> Deserialize<'de> for IncrementRecord {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let r = RecordShape::deserialize(d)?;
        let too_long = |what: &str, n: usize, max: usize| {
            serde::de::Error::custom(format!("an increment record has {n} {what}; at most {max}"))
        };
        if r.strain.len() > RECORD_COMPONENTS || r.stress.len() != r.strain.len() {
            return Err(too_long(
                "strain/stress components",
                r.strain.len().max(r.stress.len()),
                RECORD_COMPONENTS,
            ));
        }
        if r.worst_error.len() > RECORD_SCHEMES {
            return Err(too_long("scheme errors", r.worst_error.len(), RECORD_SCHEMES));
        }
        let mut out = IncrementRecord {
            index: r.index,
            branch: r.branch,
            state_changed: r.state_changed,
            pass: r.pass,
            ncomp: r.strain.len() as u8,
            nschemes: r.worst_error.len() as u8,
            strain: [0.0; RECORD_COMPONENTS],
            stress: [0.0; RECORD_COMPONENTS],
            worst: [f64::NAN; RECORD_SCHEMES],
        };
        out.strain[..r.strain.len()].copy_from_slice(&r.strain);
        out.stress[..r.stress.len()].copy_from_slice(&r.stress);
        for (w, e) in out.worst.iter_mut().zip(&r.worst_error) {
            *w = e.unwrap_or(f64::NAN);
        }
        Ok(out)
    }
}

impl schemars::JsonSchema for IncrementRecord {
    fn schema_name() -> Cow<'static, str> {
        RecordShape::schema_name()
    }

    fn json_schema(generator: &mut schemars::SchemaGenerator) -> schemars::Schema {
        RecordShape::json_schema(generator)
    }
}

/// A passing increment as [`Collector::push_passed`] takes it.
#[derive(Clone, Copy, Debug)]
pub struct PassedIncrement<'a> {
    /// 1-based.
    pub index: usize,
    pub branch: Option<i32>,
    pub state_changed: bool,
    /// Strain and stress at the end of the increment, routine order.
    pub strain: &'a [f64],
    pub stress: &'a [f64],
    /// Per scheme, in the settings' order: its passing comparison, `None` when skipped.
    pub schemes: [Option<PassedScheme>; RECORD_SCHEMES],
    /// The routine returned ∂σ/∂T (and it was checked).
    pub dtemp_checked: bool,
}

/// Which increments a report keeps in full detail.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize, schemars::JsonSchema)]
#[serde(rename_all = "kebab-case")]
pub enum Keep {
    /// Every increment (what library users and the probes get).
    #[default]
    All,
    /// Only the increments that failed, faulted or were looked at more closely; every
    /// increment still has its record.
    Failures,
}

/// Builds the increments, records and summaries of a report one increment at a time.
#[derive(Debug)]
pub struct Collector {
    keep: Keep,
    schemes: Vec<Scheme>,
    pub(crate) records: Vec<IncrementRecord>,
    pub(crate) increments: Vec<IncrementResult>,
    pub(crate) summary: Vec<SchemeSummary>,
    pub(crate) branches: Vec<BranchSummary>,
    /// The index of the increment whose base call faulted (the path stops there).
    pub(crate) stopped_at: Option<usize>,
    /// The path stopped at outputs that are not finite numbers, not at a fault.
    pub(crate) stopped_not_finite: bool,
    pub(crate) any_fault: bool,
    pub(crate) all_passed: bool,
    pub(crate) twin_unsafe: bool,
    pub(crate) state_ever_changed: bool,
    /// Some increment's routine returned ∂σ/∂T (and it was checked).
    pub(crate) dtemp_checked: bool,
    /// Increments whose diagnosis found the stress jumping across the point.
    pub(crate) jumps: Vec<usize>,
}

impl Collector {
    pub fn new(settings: &Settings, keep: Keep, increments: usize) -> Collector {
        Collector {
            keep,
            schemes: settings.schemes.clone(),
            records: Vec::with_capacity(increments + 1),
            increments: Vec::with_capacity(if keep == Keep::All { increments + 1 } else { 0 }),
            summary: settings
                .schemes
                .iter()
                .map(|&scheme| SchemeSummary {
                    scheme,
                    checks: 0,
                    failed: 0,
                    cleared: 0,
                    skipped: 0,
                    worst_norm_error: 0.0,
                    worst_entry_error: 0.0,
                    worst_error: 0.0,
                    tol: settings.scheme(scheme).tol,
                    dtemp_failed: 0,
                    dtemp_worst_error: 0.0,
                    dtemp_checks: 0,
                })
                .collect(),
            branches: Vec::new(),
            stopped_at: None,
            stopped_not_finite: false,
            any_fault: false,
            all_passed: true,
            twin_unsafe: false,
            state_ever_changed: false,
            dtemp_checked: false,
            jumps: Vec::new(),
        }
    }

    /// Add the next increment.
    pub fn push(&mut self, inc: IncrementResult) {
        let record = IncrementRecord::of(&inc, &self.schemes);
        if inc
            .diagnosis
            .as_ref()
            .and_then(|d| d.kink.as_ref())
            .is_some_and(|k| k.columns.iter().any(|c| c.jump))
        {
            self.jumps.push(inc.index);
        }
        for c in &inc.checks {
            let Some(s) = self.summary.iter_mut().find(|s| s.scheme == c.scheme) else { continue };
            match &c.tangent {
                CheckOutcome::Compared(cmp) => {
                    s.checks += 1;
                    s.worst_norm_error = s.worst_norm_error.max(cmp.norm_error);
                    s.worst_entry_error = s.worst_entry_error.max(cmp.worst_entry_error);
                    s.worst_error = s.worst_error.max(cmp.error());
                }
                CheckOutcome::Skipped { .. } => s.skipped += 1,
                CheckOutcome::Fault(_) => s.checks += 1,
            }
            // A failed check at an increment the closer look cleared (a kink, a poor default
            // step, a twin set aside) is no failure of the tangent: counted apart, so the
            // counts agree with the verdict.
            let cleared = !c.passed() && inc.diagnosis.as_ref().is_some_and(|d| d.pass);
            s.dtemp_checks += matches!(c.dstress_dtemp, Some(CheckOutcome::Compared(_))) as usize;
            s.failed += (!c.passed() && !cleared) as usize;
            s.cleared += cleared as usize;
            // The ∂σ/∂T part of a failed check (only failed increments: every one is pushed in
            // full, so the compact and the full report count the same).
            if let (Some(CheckOutcome::Compared(d)), false) = (&c.dstress_dtemp, c.passed() || cleared) {
                if !d.pass {
                    s.dtemp_failed += 1;
                    s.dtemp_worst_error = s.dtemp_worst_error.max(d.error());
                }
            }
        }
        let worst = inc
            .checks
            .iter()
            .filter_map(|c| match &c.tangent {
                CheckOutcome::Compared(x) => Some(x.error()),
                _ => None,
            })
            .fold(0.0, f64::max);
        // An increment whose base call faulted gave no outputs: it reached no branch (its
        // label says so), and the branch summaries count only increments that did.
        if inc.fault.is_none() {
            let b = self.branch(inc.reported_branch, inc.state_changed);
            b.increments += 1;
            b.failed += (!record.pass) as usize;
            b.cleared += (record.pass
                && inc.diagnosis.as_ref().is_some_and(|d| d.pass)
                && !inc.checks.iter().all(SchemeCheck::passed)) as usize;
            b.worst_error = b.worst_error.max(worst);
        }
        if (inc.fault.is_some() || !inc.non_finite.is_empty()) && self.stopped_at.is_none() {
            self.stopped_at = Some(inc.index);
            self.stopped_not_finite = inc.fault.is_none();
        }
        self.any_fault |= inc.fault.is_some()
            || inc.checks.iter().any(|c| {
                matches!(c.tangent, CheckOutcome::Fault(_))
                    || matches!(c.dstress_dtemp, Some(CheckOutcome::Fault(_)))
            });
        self.all_passed &= record.pass;
        self.twin_unsafe |= inc.diagnosis.as_ref().is_some_and(|d| d.twin_unsafe);
        self.state_ever_changed |= inc.state_changed;
        self.dtemp_checked |= inc.checks.iter().any(|c| c.dstress_dtemp.is_some());
        self.records.push(record);
        let full = match self.keep {
            Keep::All => true,
            Keep::Failures => !record.pass || inc.diagnosis.is_some() || inc.fault.is_some(),
        };
        if full {
            self.increments.push(inc);
        }
    }

    /// Add the next increment when it passed with nothing more to say (no fault, no
    /// diagnosis, every comparison passed): its index, branch, end strain and stress, and per
    /// scheme (the settings' order) the numbers of its passing comparison, `None` for a skipped
    /// scheme. The same record and summaries as [`Collector::push`] of the full result, made
    /// from a few numbers; only for [`Keep::Failures`], which keeps no detail of such an
    /// increment.
    pub fn push_passed(&mut self, inc: &PassedIncrement<'_>) {
        assert_eq!(self.keep, Keep::Failures, "a collector that keeps every increment needs its detail");
        let n = inc.strain.len().min(RECORD_COMPONENTS);
        let mut record = IncrementRecord {
            index: inc.index as u32,
            branch: inc.branch,
            state_changed: inc.state_changed,
            pass: true,
            ncomp: n as u8,
            nschemes: self.schemes.len().min(RECORD_SCHEMES) as u8,
            strain: [0.0; RECORD_COMPONENTS],
            stress: [0.0; RECORD_COMPONENTS],
            worst: [f64::NAN; RECORD_SCHEMES],
        };
        record.strain[..n].copy_from_slice(&inc.strain[..n]);
        let ns = n.min(inc.stress.len());
        record.stress[..ns].copy_from_slice(&inc.stress[..ns]);
        let mut worst = 0.0f64;
        for (scheme, passed) in self.schemes.iter().zip(&inc.schemes) {
            if let Some(k) = self.schemes.iter().position(|s| s == scheme) {
                if let (Some(p), true) = (passed, k < RECORD_SCHEMES) {
                    record.worst[k] = p.error;
                }
            }
            let Some(s) = self.summary.iter_mut().find(|s| s.scheme == *scheme) else { continue };
            match passed {
                Some(p) => {
                    s.checks += 1;
                    s.dtemp_checks += inc.dtemp_checked as usize;
                    s.worst_norm_error = s.worst_norm_error.max(p.norm_error);
                    s.worst_entry_error = s.worst_entry_error.max(p.worst_entry_error);
                    s.worst_error = s.worst_error.max(p.error);
                    worst = worst.max(p.error);
                }
                None => s.skipped += 1,
            }
        }
        let b = self.branch(inc.branch, inc.state_changed);
        b.increments += 1;
        b.worst_error = b.worst_error.max(worst);
        self.state_ever_changed |= inc.state_changed;
        self.dtemp_checked |= inc.dtemp_checked;
        self.records.push(record);
    }

    /// The summary of a branch, made when first reached.
    fn branch(&mut self, reported_branch: Option<i32>, state_changed: bool) -> &mut BranchSummary {
        match self
            .branches
            .iter()
            .position(|b| b.reported_branch == reported_branch && b.state_changed == state_changed)
        {
            Some(k) => &mut self.branches[k],
            None => {
                self.branches.push(BranchSummary {
                    branch: super::branch_label(reported_branch, state_changed),
                    reported_branch,
                    state_changed,
                    increments: 0,
                    failed: 0,
                    cleared: 0,
                    worst_error: 0.0,
                });
                self.branches.last_mut().expect("just pushed")
            }
        }
    }

    /// Whether the last increment's base call faulted (the path stops).
    pub fn last_faulted(&self) -> bool {
        self.stopped_at.is_some()
    }

    /// Add the increments `other` collected after those of `self` (a later share of the path
    /// checked on another thread): the same result as pushing them here one by one.
    pub fn append(&mut self, other: Collector) {
        for (s, o) in self.summary.iter_mut().zip(&other.summary) {
            s.checks += o.checks;
            s.failed += o.failed;
            s.cleared += o.cleared;
            s.skipped += o.skipped;
            s.worst_norm_error = s.worst_norm_error.max(o.worst_norm_error);
            s.worst_entry_error = s.worst_entry_error.max(o.worst_entry_error);
            s.worst_error = s.worst_error.max(o.worst_error);
            s.dtemp_failed += o.dtemp_failed;
            s.dtemp_worst_error = s.dtemp_worst_error.max(o.dtemp_worst_error);
            s.dtemp_checks += o.dtemp_checks;
        }
        for ob in other.branches {
            match self
                .branches
                .iter_mut()
                .find(|b| b.reported_branch == ob.reported_branch && b.state_changed == ob.state_changed)
            {
                Some(b) => {
                    b.increments += ob.increments;
                    b.failed += ob.failed;
                    b.cleared += ob.cleared;
                    b.worst_error = b.worst_error.max(ob.worst_error);
                }
                None => self.branches.push(ob),
            }
        }
        if self.stopped_at.is_none() {
            self.stopped_at = other.stopped_at;
            self.stopped_not_finite = other.stopped_not_finite;
        }
        self.any_fault |= other.any_fault;
        self.all_passed &= other.all_passed;
        self.twin_unsafe |= other.twin_unsafe;
        self.state_ever_changed |= other.state_ever_changed;
        self.dtemp_checked |= other.dtemp_checked;
        self.records.extend(other.records);
        self.increments.extend(other.increments);
    }

    /// Increments added so far.
    pub fn len(&self) -> usize {
        self.records.len()
    }

    pub fn is_empty(&self) -> bool {
        self.records.is_empty()
    }

    pub fn keep(&self) -> Keep {
        self.keep
    }
}
