//! Options read into a plan: defaults, paths, and bad values named.

use super::*;

#[test]
fn the_defaults_are_the_core_defaults() {
    let o = Options::default();
    // SAFETY: all pointers NULL.
    let p = unsafe { o.plan() }.unwrap();
    assert_eq!(p.settings, Settings::default());
    assert_eq!(p.info.convention, Convention::new(PointKind::Solid3d, ShearMeasure::Engineering));
    assert_eq!(p.path, Path::ramp(Shape::TensionShear, 4e-3, 8, 4));
    assert_eq!(p.guard_level, GuardLevel::Light);
    assert_eq!(p.info.name, "routine");
}

#[test]
fn the_default_shape_is_the_kinds_own() {
    // A cohesive point's default loads its slips with its opening (mixed-mode), as the
    // command line's does: the C API's tension-shear left them unloaded, and a cohesive
    // routine without its mixed-mode coupling passed here (a user-style sweep).
    for (kind, value) in [(PointKind::Cohesive2d, 7), (PointKind::Cohesive3d, 6), (PointKind::Uniaxial, 5)] {
        let o = Options { kind: value, ..Options::default() };
        // SAFETY: all pointers NULL.
        let p = unsafe { o.plan() }.unwrap();
        assert_eq!(p.info.convention.kind(), kind);
        assert_eq!(p.path, Path::kind_default(kind, 4e-3, 8, 4));
    }
    let o = Options { kind: 7, ..Options::default() };
    // SAFETY: all pointers NULL.
    let p = unsafe { o.plan() }.unwrap();
    assert!(p.path.increments[0].dstrain[1] > 0.0 && p.path.increments[0].dstrain[0] > 0.0, "{:?}", p.path);
    assert!(p.path.name.starts_with("mixed-mode"), "{}", p.path.name);
    // The other shapes by value, uniaxial stress with its held stresses.
    let o = Options { shape: 6, ..Options::default() };
    // SAFETY: all pointers NULL.
    assert_eq!(unsafe { o.plan() }.unwrap().path, Path::ramp(Shape::MixedMode, 4e-3, 8, 4));
    let o = Options { shape: 7, ..Options::default() };
    // SAFETY: all pointers NULL.
    assert_eq!(unsafe { o.plan() }.unwrap().path, Path::uniaxial_stress(4e-3, 8, 4));
}

#[test]
fn bad_values_name_the_field() {
    type Change = &'static dyn Fn(&mut Options);
    let cases: [(Change, &str); 15] = [
        (&|o| o.kind = 9, "tck_options.kind is 9; use a tck_kind value (1, 2, 3, 4, 5, 6, 7)"),
        (&|o| o.version = 3, "tck_options.version is 3"),
        (&|o| o.nproperties = 3, "nproperties is 3 but properties is NULL"),
        (&|o| o.schemes = 1 << 7, "bits 0x80 that name no scheme"),
        (&|o| o.schemes = 0, "no derivative scheme selected"),
        (&|o| o.steps = 0, "tck_options.steps is 0"),
        (&|o| o.guard_level = 5, "guard_level is 5"),
        // Every count with a NULL array is an error, never the default path.
        (&|o| o.nincrements = 3, "nincrements is 3 but increments is NULL"),
        (&|o| o.norder = 6, "norder is 6 but order is NULL"),
        (&|o| o.nincrements = -1, "nincrements is -1 but increments is NULL"),
        // Numbers out of range.
        (&|o| o.peak = 1e308, "at most 10 in magnitude"),
        // As the command line's path.peak (12 and -11 were taken; a user-style sweep).
        (&|o| o.peak = 12.0, "tck_options.peak is 12; give"),
        (&|o| o.peak = -11.0, "tck_options.peak is -11; give"),
        (&|o| o.nstate = 2_000_000_000, "nstate is 2000000000; at most"),
        (&|o| o.temperature = f64::INFINITY, "temperature must be a finite number"),
    ];
    for (change, want) in cases {
        let mut o = Options::default();
        change(&mut o);
        // SAFETY: all pointers NULL.
        let e = unsafe { o.plan() }.unwrap_err();
        assert!(e.message.contains(want), "{} does not contain {want}", e.message);
    }
}

/// The start state's limits are a manifest's (the command line refused these, the C API
/// ran them).
#[test]
fn a_start_state_out_of_range_is_refused() {
    static BIG_STRESS: [f64; 6] = [2e15, 0.0, 0.0, 0.0, 0.0, 0.0];
    static BIG_STRAIN: [f64; 6] = [0.0, 11.0, 0.0, 0.0, 0.0, 0.0];
    for (stress0, strain0, want) in [
        (
            BIG_STRESS.as_ptr(),
            std::ptr::null(),
            "tck_options.stress0 has 2e15; every entry must be at most 1e15",
        ),
        (
            std::ptr::null(),
            BIG_STRAIN.as_ptr(),
            "tck_options.strain0 has 1.1e1; every entry must be at most 1e1",
        ),
    ] {
        let o = Options { stress0, strain0, ..Options::default() };
        // SAFETY: the start arrays hold 6 entries, the other pointers are NULL.
        let e = unsafe { o.plan() }.unwrap_err();
        assert!(e.message.contains(want), "{} does not contain {want}", e.message);
    }
}

#[test]
fn order_and_increments_are_read() {
    let order = [11, 22, 33, 12, 13, 23];
    let inc = [1e-3, 0.0, 0.0, 0.0, 0.0, 5e-4, -1e-3, 0.0, 0.0, 0.0, 0.0, -5e-4];
    let dtime = [0.5, 2.0];
    let o = Options {
        norder: 6,
        order: order.as_ptr(),
        increments: inc.as_ptr(),
        nincrements: 2,
        increment_dtime: dtime.as_ptr(),
        shear: 1,
        ..Options::default()
    };
    // SAFETY: the pointers point at arrays of the given lengths.
    let p = unsafe { o.plan() }.unwrap();
    assert_eq!(p.info.convention.order()[3], Component::C12);
    assert_eq!(p.info.convention.shear(), ShearMeasure::Tensor);
    assert_eq!(p.path.increments.len(), 2);
    assert_eq!(p.path.increments[1].dstrain[5], -5e-4);
    assert_eq!((p.path.increments[0].dtime, p.path.increments[1].dtemp), (0.5, 0.0));

    let bad = [11, 22, 33, 12, 13, 44];
    let o = Options { norder: 6, order: bad.as_ptr(), ..Options::default() };
    // SAFETY: as above.
    let e = unsafe { o.plan() }.unwrap_err();
    assert!(e.message.contains("tck_options.order[5] is 44"), "{}", e.message);
    let o = Options { norder: 4, order: order.as_ptr(), ..Options::default() };
    // SAFETY: as above (4 of the 6).
    let e = unsafe { o.plan() }.unwrap_err();
    assert!(e.message.contains("has 4 entries"), "{}", e.message);

    // A time increment without increments belongs to nothing.
    let o = Options { increment_dtime: dtime.as_ptr(), ..Options::default() };
    // SAFETY: as above.
    let e = unsafe { o.plan() }.unwrap_err();
    assert!(e.message.contains("without increments"), "{}", e.message);
    // A strain increment of 1e308 is bad input, not a routine failure.
    let huge = [1e308, 0.0, 0.0, 0.0, 0.0, 0.0];
    let o = Options { increments: huge.as_ptr(), nincrements: 1, ..Options::default() };
    // SAFETY: as above.
    let e = unsafe { o.plan() }.unwrap_err();
    assert!(e.message.contains("out of range"), "{}", e.message);
}
