//! `tck_options`: the struct, its defaults, and turning it into what a check needs.

use std::ffi::{c_char, c_int, CStr};

use tancheck_abi::GuardLevel;
use tancheck_core::path::{Path, PathIncrement, Shape};
use tancheck_core::{
    Component, Convention, PointKind, PointState, RoutineInfo, Scheme, Settings, ShearMeasure,
};

use crate::status::Failure;

/// `TCK_OPTIONS_VERSION`: the layout of [`Options`] this library knows.
pub const OPTIONS_VERSION: i32 = 2;
/// `TCK_SCHEME_SLOTS`.
pub const SCHEME_SLOTS: usize = 8;

/// `tck_kind` values, in the order of the header.
pub const KINDS: [(i32, PointKind); 7] = [
    (1, PointKind::Solid3d),
    (2, PointKind::PlaneStrain),
    (3, PointKind::Axisymmetric),
    (4, PointKind::PlaneStress),
    (5, PointKind::Uniaxial),
    (6, PointKind::Cohesive3d),
    (7, PointKind::Cohesive2d),
];

/// `tck_component` values.
pub const COMPONENTS: [(i32, Component); 9] = [
    (1, Component::Opening),
    (2, Component::Slip1),
    (3, Component::Slip2),
    (11, Component::C11),
    (12, Component::C12),
    (13, Component::C13),
    (22, Component::C22),
    (23, Component::C23),
    (33, Component::C33),
];

/// `tck_shear` values.
pub const SHEARS: [(i32, ShearMeasure); 2] = [(0, ShearMeasure::Engineering), (1, ShearMeasure::Tensor)];

/// A built-in path of the C API: the kind's default, a shape's ramp, or uniaxial stress.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum ShapeChoice {
    /// The kind's default path (`Path::kind_default`), as the command line's.
    KindDefault,
    Ramp(Shape),
    /// ε11 prescribed, every other stress held at zero.
    UniaxialStress,
}

impl ShapeChoice {
    /// The name in `TCK_SHAPE_<NAME>` (upper case, `-` as `_`).
    pub fn name(self) -> &'static str {
        match self {
            ShapeChoice::KindDefault => "default",
            ShapeChoice::Ramp(s) => s.name(),
            ShapeChoice::UniaxialStress => "uniaxial-stress",
        }
    }
}

/// `tck_shape` values.
pub const SHAPES: [(i32, ShapeChoice); 8] = [
    (0, ShapeChoice::KindDefault),
    (1, ShapeChoice::Ramp(Shape::UniaxialStrain)),
    (2, ShapeChoice::Ramp(Shape::Shear12)),
    (3, ShapeChoice::Ramp(Shape::Biaxial)),
    (4, ShapeChoice::Ramp(Shape::Hydrostatic)),
    (5, ShapeChoice::Ramp(Shape::TensionShear)),
    (6, ShapeChoice::Ramp(Shape::MixedMode)),
    (7, ShapeChoice::UniaxialStress),
];

/// `tck_scheme` values: index into `rel_step` and `tol`, bit `1 << index` of `schemes`.
pub const SCHEMES: [(i32, Scheme); 6] = [
    (0, Scheme::Forward),
    (1, Scheme::Backward),
    (2, Scheme::Central),
    (3, Scheme::Central4),
    (4, Scheme::Richardson),
    (5, Scheme::ComplexStep),
];

/// `tck_guard_level` values.
pub const GUARD_LEVELS: [(i32, GuardLevel); 3] =
    [(0, GuardLevel::Off), (1, GuardLevel::Light), (2, GuardLevel::Full)];

/// `tck_options`, field for field. Fields only ever append; [`OPTIONS_VERSION`] counts the
/// layouts.
#[derive(Clone, Copy, Debug)]
#[repr(C)]
pub struct Options {
    pub version: i32,
    pub kind: i32,
    pub shear: i32,
    pub norder: i32,
    pub order: *const i32,
    pub name: *const c_char,
    pub nproperties: i32,
    pub nstate: i32,
    pub properties: *const f64,
    pub state0: *const f64,
    pub strain0: *const f64,
    pub stress0: *const f64,
    pub temperature: f64,
    pub shape: i32,
    pub steps: i32,
    pub back: i32,
    pub nincrements: i32,
    pub peak: f64,
    pub increments: *const f64,
    pub increment_dtemp: *const f64,
    pub increment_dtime: *const f64,
    pub schemes: i32,
    pub guard_level: i32,
    pub rel_step: [f64; SCHEME_SLOTS],
    pub tol: [f64; SCHEME_SLOTS],
    pub diagnose: i32,
    pub fp_traps: i32,
}

impl Default for Options {
    /// The defaults `tck_options_init` writes: a 3D solid in the default order with
    /// engineering shear, no properties or state, the tension-shear path to 4e-3 in 8
    /// increments and back in 4, the schemes, steps and tolerances of [`Settings::default`],
    /// light guards, no traps.
    fn default() -> Self {
        let settings = Settings::default();
        let mut rel_step = [0.0; SCHEME_SLOTS];
        let mut tol = [0.0; SCHEME_SLOTS];
        let mut schemes = 0;
        for (id, s) in SCHEMES {
            let ss = settings.scheme(s);
            rel_step[id as usize] = ss.rel_step;
            tol[id as usize] = ss.tol;
            if settings.schemes.contains(&s) {
                schemes |= 1 << id;
            }
        }
        Options {
            version: OPTIONS_VERSION,
            kind: 1,
            shear: 0,
            norder: 0,
            order: std::ptr::null(),
            name: std::ptr::null(),
            nproperties: 0,
            nstate: 0,
            properties: std::ptr::null(),
            state0: std::ptr::null(),
            strain0: std::ptr::null(),
            stress0: std::ptr::null(),
            temperature: 0.0,
            shape: 0,
            steps: 8,
            back: 4,
            nincrements: 0,
            peak: 4e-3,
            increments: std::ptr::null(),
            increment_dtemp: std::ptr::null(),
            increment_dtime: std::ptr::null(),
            schemes,
            guard_level: 1,
            rel_step,
            tol,
            diagnose: i32::from(settings.diagnose),
            fp_traps: 0,
        }
    }
}

/// Everything a check needs, read out of the options.
#[derive(Clone, Debug)]
pub struct Plan {
    pub info: RoutineInfo,
    pub properties: Vec<f64>,
    pub start: PointState,
    pub path: Path,
    pub settings: Settings,
    pub guard_level: GuardLevel,
    pub fp_traps: bool,
}

fn lookup<T: Copy>(table: &[(i32, T)], value: i32) -> Option<T> {
    table.iter().find(|(v, _)| *v == value).map(|(_, t)| *t)
}

fn values<T>(table: &[(i32, T)]) -> String {
    table.iter().map(|(v, _)| v.to_string()).collect::<Vec<_>>().join(", ")
}

/// `n` values at `p`, or `None` for a NULL pointer.
///
/// # Safety
/// A non-NULL `p` must point to `n` readable values.
unsafe fn slice<'a, T>(p: *const T, n: usize) -> Option<&'a [T]> {
    if p.is_null() {
        None
    } else if n == 0 {
        Some(&[])
    } else {
        // SAFETY: forwarded from the caller.
        Some(unsafe { std::slice::from_raw_parts(p, n) })
    }
}

fn count(field: &str, value: i32, what: &str) -> Result<usize, Failure> {
    usize::try_from(value).map_err(|_| {
        Failure::invalid(format!("tck_options.{field} is {value}; give the number of {what} (0 or more)"))
    })
}

fn finite(field: &str, v: &[f64]) -> Result<(), Failure> {
    match v.iter().position(|x| !x.is_finite()) {
        Some(i) => Err(Failure::invalid(format!(
            "tck_options.{field}[{i}] is {}; every value must be a finite number",
            v[i]
        ))),
        None => Ok(()),
    }
}

impl Options {
    /// Read the options into a [`Plan`].
    ///
    /// # Safety
    /// Every non-NULL pointer must point to as many readable values as its count says
    /// (`name` to a NUL-terminated string).
    pub unsafe fn plan(&self) -> Result<Plan, Failure> {
        if self.version < 1 || self.version > OPTIONS_VERSION {
            return Err(Failure::new(
                crate::status::code::ERROR_VERSION,
                format!(
                    "tck_options.version is {}, but this library knows versions 1 to {OPTIONS_VERSION}; \
                     fill the struct with tck_options_init (and build against the tancheck.h that \
                     comes with this library)",
                    self.version
                ),
            ));
        }
        let kind = lookup(&KINDS, self.kind).ok_or_else(|| {
            Failure::invalid(format!(
                "tck_options.kind is {}; use a tck_kind value ({})",
                self.kind,
                values(&KINDS)
            ))
        })?;
        let shear = lookup(&SHEARS, self.shear).ok_or_else(|| {
            Failure::invalid(format!(
                "tck_options.shear is {}; use TCK_SHEAR_ENGINEERING (0) or TCK_SHEAR_TENSOR (1)",
                self.shear
            ))
        })?;
        let norder = count("norder", self.norder, "components in order")?;
        // SAFETY: the caller's contract on `order`.
        let convention = match unsafe { slice(self.order, norder) } {
            Some(codes) if norder > 0 => {
                let mut order = Vec::with_capacity(norder);
                for (i, &c) in codes.iter().enumerate() {
                    order.push(lookup(&COMPONENTS, c).ok_or_else(|| {
                        Failure::invalid(format!(
                            "tck_options.order[{i}] is {c}; use tck_component values ({})",
                            values(&COMPONENTS)
                        ))
                    })?);
                }
                Convention::with_order(kind, &order, shear)
                    .map_err(|e| Failure::invalid(format!("tck_options.order: {e}")))?
            }
            None if norder > 0 => {
                return Err(Failure::invalid(format!(
                    "tck_options.norder is {norder} but order is NULL; give the order or set norder to 0"
                )))
            }
            _ => Convention::new(kind, shear),
        };
        let n = convention.ncomp();

        let name = if self.name.is_null() {
            "routine".to_string()
        } else {
            // SAFETY: the caller's contract on `name`.
            unsafe { CStr::from_ptr(self.name) }.to_string_lossy().into_owned()
        };
        let nproperties = count("nproperties", self.nproperties, "properties")?;
        let nstate = count("nstate", self.nstate, "state variables")?;
        const MAX_COUNT: usize = 100_000;
        for (field, n) in [("nproperties", nproperties), ("nstate", nstate)] {
            if n > MAX_COUNT {
                return Err(Failure::invalid(format!("tck_options.{field} is {n}; at most {MAX_COUNT}")));
            }
        }
        // SAFETY: the caller's contract on `properties`.
        let properties = match unsafe { slice(self.properties, nproperties) } {
            Some(p) => p.to_vec(),
            None if nproperties == 0 => Vec::new(),
            None => {
                return Err(Failure::invalid(format!(
                    "tck_options.nproperties is {nproperties} but properties is NULL; point properties at the {nproperties} properties"
                )))
            }
        };
        finite("properties", &properties)?;
        let info = RoutineInfo { name, convention, nstate, nprop: nproperties };

        let mut start = PointState::zero(&info, self.temperature);
        // SAFETY: the caller's contract on the start arrays.
        unsafe {
            // The limits a manifest's start state has (the command line refuses the same).
            for (field, p, len, dst, max) in [
                ("state0", self.state0, nstate, &mut start.state, f64::MAX),
                ("strain0", self.strain0, n, &mut start.strain, tancheck_core::path::MAX_STRAIN),
                ("stress0", self.stress0, n, &mut start.stress, tancheck_core::path::MAX_STRESS),
            ] {
                if let Some(v) = slice(p, len) {
                    finite(field, v)?;
                    if let Some(x) = v.iter().find(|x| x.abs() > max) {
                        return Err(Failure::invalid(format!(
                            "tck_options.{field} has {x:e}; every entry must be at most {max:e} in magnitude"
                        )));
                    }
                    dst.copy_from_slice(v);
                }
            }
        }
        if !self.temperature.is_finite() || self.temperature.abs() > 1.0e5 {
            return Err(Failure::invalid(
                "tck_options.temperature must be a finite number at most 1e5 in magnitude",
            ));
        }

        // SAFETY: the caller's contract on the increments.
        let path = unsafe { self.path(kind)? };
        let settings = self.settings()?;
        let guard_level = lookup(&GUARD_LEVELS, self.guard_level).ok_or_else(|| {
            Failure::invalid(format!(
                "tck_options.guard_level is {}; use TCK_GUARD_OFF (0), TCK_GUARD_LIGHT (1) or TCK_GUARD_FULL (2)",
                self.guard_level
            ))
        })?;
        Ok(Plan { info, properties, start, path, settings, guard_level, fp_traps: self.fp_traps != 0 })
    }

    /// The explicit increments when given, else the built-in ramp.
    ///
    /// # Safety
    /// As [`Options::plan`].
    unsafe fn path(&self, kind: PointKind) -> Result<Path, Failure> {
        // Every count with its array: a count without one is an error, never the default.
        if self.increments.is_null() && self.nincrements != 0 {
            return Err(Failure::invalid(format!(
                "tck_options.nincrements is {} but increments is NULL; point increments at the \
                 6 x nincrements strain increments, or set nincrements to 0 for the built-in path",
                self.nincrements
            )));
        }
        if self.increments.is_null() && (!self.increment_dtemp.is_null() || !self.increment_dtime.is_null()) {
            return Err(Failure::invalid(
                "tck_options.increment_dtemp or increment_dtime is given without increments; they \
                 belong to explicit increments (give increments and nincrements too)",
            ));
        }
        if self.increments.is_null() {
            let shape = lookup(&SHAPES, self.shape).ok_or_else(|| {
                Failure::invalid(format!(
                    "tck_options.shape is {}; use a tck_shape value ({}), or give increments",
                    self.shape,
                    values(&SHAPES)
                ))
            })?;
            if self.steps < 1 {
                return Err(Failure::invalid(format!(
                    "tck_options.steps is {}; the path needs at least 1 increment out to the peak",
                    self.steps
                )));
            }
            let back = count("back", self.back, "increments back to zero")?;
            // At most 10, as the command line's `path.peak` (the README says the C API checks
            // the same; 12 and -11 were taken; a user-style sweep).
            if !(self.peak.is_finite() && self.peak != 0.0 && self.peak.abs() <= 10.0) {
                return Err(Failure::invalid(format!(
                    "tck_options.peak is {}; give the size of the leading strain component at the peak \
                     (a nonzero number at most 10 in magnitude, e.g. 4e-3)",
                    self.peak
                )));
            }
            let steps = self.steps as usize;
            let path = match shape {
                // The kind's own, as the command line's: a cohesive point's mixed-mode (the C
                // API's tension-shear left its slips unloaded, and a cohesive routine without
                // its mixed-mode coupling passed here and failed on the command line; a
                // user-style sweep).
                ShapeChoice::KindDefault => Path::kind_default(kind, self.peak, steps, back),
                ShapeChoice::Ramp(s) => Path::ramp(s, self.peak, steps, back),
                ShapeChoice::UniaxialStress => Path::uniaxial_stress(self.peak, steps, back),
            };
            path.validate().map_err(|e| Failure::invalid(format!("tck_options (steps, back, peak): {e}")))?;
            return Ok(path);
        }
        let n = count("nincrements", self.nincrements, "increments")?;
        if n == 0 {
            return Err(Failure::invalid(
                "tck_options.increments is given but nincrements is 0; give at least one increment",
            ));
        }
        let rows =
            n.checked_mul(6).ok_or_else(|| Failure::invalid("tck_options.nincrements is too large"))?;
        // SAFETY: the caller's contract on the increments.
        let (strain, dtemp, dtime) = unsafe {
            (
                slice(self.increments, rows).expect("checked: not NULL"),
                slice(self.increment_dtemp, n),
                slice(self.increment_dtime, n),
            )
        };
        finite("increments", strain)?;
        let mut increments = Vec::with_capacity(n);
        for k in 0..n {
            let mut d = [0.0; 6];
            d.copy_from_slice(&strain[6 * k..6 * k + 6]);
            increments.push(PathIncrement {
                dtemp: dtemp.map_or(0.0, |t| t[k]),
                dtime: dtime.map_or(1.0, |t| t[k]),
                ..PathIncrement::strain(d)
            });
        }
        let path =
            Path { name: format!("explicit ({n} increment{})", if n == 1 { "" } else { "s" }), increments };
        path.validate().map_err(|e| Failure::invalid(format!("tck_options.increments: {e}")))?;
        Ok(path)
    }

    fn settings(&self) -> Result<Settings, Failure> {
        let mut settings =
            Settings { schemes: Vec::new(), diagnose: self.diagnose != 0, ..Settings::default() };
        let known: i32 = SCHEMES.iter().map(|(id, _)| 1 << id).sum();
        if self.schemes & !known != 0 {
            return Err(Failure::invalid(format!(
                "tck_options.schemes has bits {:#x} that name no scheme; use 1 << tck_scheme (schemes 0 to {})",
                self.schemes & !known,
                SCHEMES.len() - 1
            )));
        }
        for (id, s) in SCHEMES {
            let ss = settings.scheme_mut(s);
            ss.rel_step = self.rel_step[id as usize];
            ss.tol = self.tol[id as usize];
            if self.schemes & (1 << id) != 0 {
                settings.schemes.push(s);
            }
        }
        settings.validate().map_err(|e| Failure::invalid(format!("tck_options: {e}")))?;
        Ok(settings)
    }
}

/// `tck_options_init` in Rust.
///
/// # Safety
/// `opts` is NULL or points to writable memory for one [`Options`].
pub unsafe fn init(opts: *mut Options) -> c_int {
    crate::status::run("tck_options_init", || {
        if opts.is_null() {
            return Err(Failure::null("tck_options_init", "opts"));
        }
        // SAFETY: checked non-NULL; the caller's contract says it is writable.
        unsafe { opts.write(Options::default()) };
        Ok(())
    })
}

#[cfg(test)]
mod tests;
