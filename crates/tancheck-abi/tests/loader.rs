//! Loading errors say what is wrong and what to do.

mod common;

use std::path::Path;
use std::process::Command;

use common::*;
use tancheck_abi::{build_library, BuildOptions, Library, LoadError};

#[test]
fn a_missing_file_is_named() {
    let e = Library::open("/nonexistent/dir/libmodel.so").unwrap_err();
    assert!(matches!(e, LoadError::NotFound { .. }), "{e:?}");
    let m = e.to_string();
    assert!(m.starts_with("no file `/nonexistent/dir/libmodel.so`"), "{m}");
    assert!(m.contains("tancheck build"), "{m}");
}

#[test]
fn a_text_file_is_not_a_library() {
    let dir = scratch("text");
    let p = dir.join("libmodel.so");
    std::fs::write(&p, "E = 210000\nnu = 0.3\n").unwrap();
    let e = Library::open(&p).unwrap_err();
    assert!(matches!(e, LoadError::NotALibrary { .. }), "{e:?}");
    let m = e.to_string();
    assert!(m.contains("is not a shared library: it is a text file"), "{m}");
    assert!(m.contains("tancheck build"), "{m}");

    let e = Library::open(&dir).unwrap_err();
    assert!(e.to_string().contains("it is a directory"), "{e}");
}

#[test]
#[cfg_attr(tancheck_no_cc, ignore = "needs a C compiler (set CC or install gcc)")]
fn an_object_file_is_not_a_library() {
    let dir = scratch("object");
    let o = dir.join("misbehave.o");
    let status = Command::new("cc")
        .arg("-c")
        .arg("-I")
        .arg(shim().join("include"))
        .arg(shim().join("examples/c/misbehave.c"))
        .arg("-o")
        .arg(&o)
        .status()
        .unwrap();
    assert!(status.success());
    let m = Library::open(&o).unwrap_err().to_string();
    assert!(m.contains("it is an object file (.o)"), "{m}");
    assert!(m.contains("-shared"), "{m}");
}

/// The same library with its ELF machine field set to another architecture.
#[test]
#[cfg_attr(not(target_os = "linux"), ignore = "needs ELF")]
fn a_library_for_another_machine_is_refused_with_both_names() {
    let data = std::fs::read(misbehave_library()).unwrap();
    let little = data[5] == 1;
    let (machine, name): (u16, &str) =
        if cfg!(target_arch = "aarch64") { (62, "x86-64") } else { (183, "64-bit ARM (aarch64)") };
    let mut foreign = data.clone();
    let bytes = if little { machine.to_le_bytes() } else { machine.to_be_bytes() };
    foreign[18..20].copy_from_slice(&bytes); // e_machine
    let dir = scratch("foreign");
    let p = dir.join("libforeign.so");
    std::fs::write(&p, &foreign).unwrap();
    let e = Library::open(&p).unwrap_err();
    assert!(matches!(e, LoadError::WrongArchitecture { .. }), "{e:?}");
    let m = e.to_string();
    assert!(m.contains(&format!("is a library for {name}")), "{m}");
    assert!(m.contains("this tancheck runs on"), "{m}");
}

#[test]
fn a_missing_symbol_lists_the_near_names() {
    let lib = Library::open(misbehave_library()).unwrap();
    let e = lib.routine("bad_null_derf", elastic_info("x")).unwrap_err();
    let LoadError::SymbolMissing { near, .. } = &e else { panic!("{e:?}") };
    assert_eq!(near.first().map(String::as_str), Some("bad_null_deref"), "{near:?}");
    assert!(near.len() <= 5);
    let m = e.to_string();
    assert!(m.contains("exports no symbol `bad_null_derf`"), "{m}");
    assert!(m.contains("`bad_null_deref`"), "{m}");
    assert!(m.contains("gfortran appends an underscore"), "{m}");
    assert!(m.contains("extern \"C\""), "{m}");
    assert!(m.contains("looked up as `bad_null_derf_cx`"), "{m}");

    // Case is ignored when ranking.
    let e = lib.routine("BAD_ABORT", elastic_info("x")).unwrap_err();
    let LoadError::SymbolMissing { near, .. } = &e else { panic!("{e:?}") };
    assert_eq!(near[0], "bad_abort");
    assert!(e.to_string().contains("differs only in case"), "{e}");
}

fn write(dir: &Path, name: &str, text: &str) -> std::path::PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// A routine compiled by gfortran without bind(C) is exported with a trailing underscore; a
/// module procedure as __module_MOD_name. The message says so.
#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_decorations_are_explained() {
    let dir = scratch("decorated");
    let src = write(
        &dir,
        "decorated.f90",
        "subroutine hardening(x)\n  implicit none\n  double precision, intent(inout) :: x\n  x = 2 * x\n\
         end subroutine hardening\n\
         module materials\n  implicit none\ncontains\n  subroutine softening(x)\n    \
         double precision, intent(inout) :: x\n    x = x / 2\n  end subroutine softening\n\
         end module materials\n",
    );
    let out = dir.join("libdecorated.so");
    let mut opts = BuildOptions::new([&src], &out);
    opts.twin = false;
    build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    let lib = Library::open(&out).unwrap();

    let m = lib.routine("hardening", elastic_info("x")).unwrap_err().to_string();
    assert!(m.contains("The library exports `hardening_`: that is how gfortran names"), "{m}");
    assert!(m.contains("bind(C, name=\"hardening\")"), "{m}");

    let m = lib.routine("softening", elastic_info("x")).unwrap_err().to_string();
    assert!(m.contains("`__materials_MOD_softening`"), "{m}");
    assert!(m.contains("module `materials`"), "{m}");

    // Asked with the underscore, the decorated name is found.
    let r = lib.routine("hardening_", elastic_info("x"));
    assert!(r.is_ok(), "{:?}", r.err());
}

#[test]
fn without_the_twin_there_is_no_complex_capability() {
    let dir = scratch("no-twin");
    let out = dir.join("libmisbehave-real.so");
    let mut opts = BuildOptions::new([shim().join("examples/c/misbehave.c")], &out);
    opts.twin = false;
    build_library(&opts).unwrap_or_else(|e| panic!("{e}"));
    let lib = Library::open(&out).unwrap();
    assert!(lib.has_symbol("bad_abort"));
    assert!(!lib.has_symbol("bad_abort_cx"));
    let mut r = lib.routine("bad_abort", elastic_info("bad_abort")).unwrap();
    assert!(!r.has_twin());
    use tancheck_core::Routine;
    assert!(r.complex().is_none());
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
    let funcs = lib.exported_functions().unwrap();
    assert_eq!(
        funcs,
        vec![
            "bad_abort",
            "bad_branch_overread",
            "bad_deep_recursion",
            "bad_divide_by_zero",
            "bad_exit",
            "bad_heap_corruption",
            "bad_helper_thread",
            "bad_hidden_state",
            "bad_infinite_loop",
            "bad_late_exit",
            "bad_log_of_negative",
            "bad_null_deref",
            "bad_perturbed_crash",
            "bad_perturbed_overrun",
            "bad_printf",
            "bad_props_overread",
            "bad_scratch_increment",
            "bad_sleep",
            "bad_state_overrun",
            "bad_tangent_hole",
            "bad_thread_exit",
            "bad_unasked_tangent",
            "bad_unguarded_norm",
            "bad_writes_strain",
        ]
    );
}

/// A library with an unresolved name fails at load time (all names are bound then), with
/// a hint, not at the first call.
#[test]
#[cfg_attr(tancheck_no_cc, ignore = "needs a C compiler (set CC or install gcc)")]
fn an_unresolved_name_is_reported_at_load() {
    let dir = scratch("unresolved");
    let src = write(&dir, "u.c", "void flow_rule_(double *);\nvoid r(double *x) { flow_rule_(x); }\n");
    let out = dir.join("libunresolved.so");
    // By hand, without -z defs, as a user might.
    let status = Command::new("cc").args(["-shared", "-fPIC", "-o"]).arg(&out).arg(&src).status().unwrap();
    assert!(status.success());
    let e = Library::open(&out).unwrap_err();
    assert!(matches!(e, LoadError::Open { .. }), "{e:?}");
    let m = e.to_string();
    assert!(m.contains("undefined symbol: flow_rule_"), "{m}");
    assert!(m.contains("The library uses `flow_rule_`"), "{m}");
    assert!(m.contains("gfortran names an external procedure"), "{m}");
}

#[test]
fn the_library_outlives_its_handle() {
    let r = {
        let lib = Library::open(misbehave_library()).unwrap();
        lib.routine("bad_divide_by_zero", elastic_info("d")).unwrap()
    };
    // The Library value is gone; the routine keeps the code loaded.
    let mut r = r;
    let mut b = Real::new();
    b.call(&mut r, 1).unwrap();
    b.assert_elastic();
    assert!(r.library().expect("loaded from a library").path().is_absolute());
}

/// A new instance of a library starts with its static variables as at load, whatever calls
/// the first instance has had; the first keeps its own. `bad_hidden_state` adds a count of
/// its own calls to stress[0] (from increment 2 on).
#[test]
fn a_new_instance_starts_from_the_statics_at_load() {
    let lib = Library::open(misbehave_library()).unwrap();
    let mut first = lib.routine("bad_hidden_state", elastic_info("bad_hidden_state")).unwrap();
    let mut b = Real::new();
    let mut stress0 = Vec::new();
    for _ in 0..3 {
        b.call(&mut first, 2).unwrap();
        stress0.push(b.stress[0]);
    }
    assert!(stress0[0] != stress0[1] && stress0[1] != stress0[2], "{stress0:?}");

    let fresh = Library::open_fresh(misbehave_library()).unwrap();
    assert_eq!(fresh.path(), lib.path(), "the new instance reports the library's own path");
    let mut second = fresh.routine("bad_hidden_state", elastic_info("bad_hidden_state")).unwrap();
    b.call(&mut second, 2).unwrap();
    assert_eq!(b.stress[0].to_bits(), stress0[0].to_bits(), "the count starts again at load");
    b.call(&mut first, 2).unwrap();
    assert!(b.stress[0] != stress0[0] && b.stress[0] != stress0[2], "the first instance counts on");
}

/// A crash in a new instance names the library's own file, not the copy in memory the loader
/// knows it by (so that a check made again on a new instance reports what a first load
/// reports).
#[test]
fn a_crash_in_a_new_instance_names_the_library() {
    let fresh = Library::open_fresh(misbehave_library()).unwrap();
    let mut r = fresh.routine("bad_null_deref", elastic_info("bad_null_deref")).unwrap();
    let mut b = Real::new();
    let what = b.call(&mut r, 2).unwrap_err().to_string();
    let file = misbehave_library().file_name().unwrap().to_string_lossy().into_owned();
    assert!(what.contains(&format!("({file}+0x")), "{what}");
    assert!(!what.contains("/proc/self/fd") && !what.contains("(4+"), "{what}");
}
