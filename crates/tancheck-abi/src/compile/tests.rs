//! Tests of the build: source order, languages, command lines, missing compilers.

use std::path::{Path, PathBuf};

use super::build::build_library;
use super::compiler::Compiler;
use super::language::{fortran_modules, order_by_modules, Language};
use super::options::BuildOptions;
use super::shim_files::fresh_build_dir;
use crate::build_log::{BuildCommand, BuildLog};
use crate::error::BuildError;

fn temp(name: &str) -> PathBuf {
    let d = fresh_build_dir().with_file_name(format!("tancheck-compile-test-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

#[test]
fn fortran_sources_follow_their_modules() {
    let d = temp("order");
    let user = d.join("user.f90");
    let lib = d.join("helpers.F90");
    let c = d.join("x.c");
    std::fs::write(
        &user,
        "subroutine s()\n  use, non_intrinsic :: helpers, only: h\n  use tancheck_routine\nend\n",
    )
    .unwrap();
    std::fs::write(&lib, "Module Helpers ! defines h\ncontains\nsubroutine h()\nend\nend module\n").unwrap();
    std::fs::write(&c, "int x;\n").unwrap();
    let (defs, uses) = fortran_modules(&user);
    assert!(defs.is_empty());
    assert_eq!(uses, vec!["helpers", "tancheck_routine"]);
    assert_eq!(fortran_modules(&lib).0, vec!["helpers"]);
    let ordered = order_by_modules(vec![
        (user.clone(), Language::Fortran),
        (c.clone(), Language::C),
        (lib.clone(), Language::Fortran),
    ]);
    let names: Vec<_> = ordered.iter().map(|(p, _)| p.clone()).collect();
    assert_eq!(names, vec![c, lib, user]);
    std::fs::remove_dir_all(&d).unwrap();
}

#[test]
fn languages_come_from_the_extension() {
    for (name, lang) in [
        ("a.c", Some(Language::C)),
        ("a.f", Some(Language::Fortran)),
        ("a.f90", Some(Language::Fortran)),
        ("a.F90", Some(Language::Fortran)),
        ("a.f95", Some(Language::Fortran)),
        ("a.f03", Some(Language::Fortran)),
        ("a.f08", Some(Language::Fortran)),
        ("a.cpp", None),
        ("a", None),
    ] {
        assert_eq!(Language::of(Path::new(name)), lang, "{name}");
    }
}

#[test]
fn commands_are_quoted_for_a_shell() {
    let s = BuildCommand {
        stage: String::new(),
        program: "cc".into(),
        args: vec!["-I".into(), "/tmp/my dir".into(), "-DX='1'".into(), "-O2".into()],
        stdout: String::new(),
        stderr: String::new(),
        success: true,
    };
    assert_eq!(s.command_line(), r#"cc -I '/tmp/my dir' '-DX='\''1'\''' -O2"#);
}

#[test]
fn a_missing_compiler_names_the_variable_to_set() {
    let mut fc = Compiler::from_env(Language::Fortran).unwrap();
    fc.program = "/nonexistent/tancheck-no-such-gfortran".into();
    fc.pre.clear();
    let mut log = BuildLog::default();
    let e = fc.run("compiling".into(), vec!["--version".into()], &mut log, |_| String::new()).unwrap_err();
    let m = e.to_string();
    assert!(matches!(e, BuildError::CompilerMissing { var: "FC", .. }), "{m}");
    assert!(m.contains("Set FC to the Fortran compiler"), "{m}");
    assert!(m.contains("system package manager"), "{m}");
    assert!(m.contains("/nonexistent/tancheck-no-such-gfortran"), "{m}");
}

#[test]
fn the_default_build_makes_the_twin() {
    let d = BuildOptions::default();
    assert!(d.twin && !d.debug && d.sources.is_empty() && d.build_dir.is_none());
}

#[test]
fn empty_source_list_is_refused() {
    let e = build_library(&BuildOptions::new(Vec::<PathBuf>::new(), "x.so")).unwrap_err();
    assert!(matches!(e, BuildError::NoSources), "{e}");
    let e = build_library(&BuildOptions::new(["model.cpp"], "x.so")).unwrap_err();
    assert!(matches!(e, BuildError::SourceNotFound { .. }), "{e}");
}
