//! The three descriptions of the C API agree: the header (tancheck.h), the Rust side and the
//! Fortran module (tancheck_api.f90). Constants, the layout of tck_options, and the functions
//! the library exports.

mod common;

use std::collections::BTreeMap;
use std::mem::offset_of;

use common::*;
use tancheck_capi::options::{self, Options};
use tancheck_capi::{code, verdict};

fn header() -> String {
    std::fs::read_to_string(shim().join("include/tancheck.h")).unwrap()
}

fn fortran_module() -> String {
    std::fs::read_to_string(shim().join("fortran/tancheck_api.f90")).unwrap()
}

/// `NAME = value` of every enumerator and `#define NAME value` of the header, for TCK_ names.
fn header_constants() -> BTreeMap<String, i64> {
    let mut m = BTreeMap::new();
    for line in header().lines() {
        let line = line.trim();
        let (name, value) = if let Some(rest) = line.strip_prefix("#define ") {
            let mut w = rest.split_whitespace();
            match (w.next(), w.next()) {
                (Some(n), Some(v)) => (n.to_string(), v.to_string()),
                _ => continue,
            }
        } else if let Some((n, v)) = line.split_once(" = ") {
            (n.trim().to_string(), v.split([',', ' ', '/']).next().unwrap_or("").to_string())
        } else {
            continue;
        };
        if name.starts_with("TCK_") {
            if let Ok(v) = value.parse::<i64>() {
                assert!(m.insert(name.clone(), v).is_none(), "{name} twice in the header");
            }
        }
    }
    m
}

/// `tck_name = value` of every integer parameter of the Fortran module.
fn fortran_constants() -> BTreeMap<String, i64> {
    let mut m = BTreeMap::new();
    for line in fortran_module().lines() {
        let Some((decl, rest)) = line.split_once("::") else { continue };
        if !decl.contains("parameter") || !decl.trim_start().starts_with("integer") {
            continue;
        }
        let Some((name, value)) = rest.split_once('=') else { continue };
        let value = value.trim().split('_').next().unwrap_or("");
        if let Ok(v) = value.parse::<i64>() {
            m.insert(name.trim().to_string(), v);
        }
    }
    m
}

/// What the Rust side says each constant is.
fn rust_constants() -> BTreeMap<String, i64> {
    let mut m = BTreeMap::new();
    let mut put = |n: &str, v: i64| {
        m.insert(n.to_string(), v);
    };
    for (n, v) in [
        ("TCK_OK", code::OK),
        ("TCK_ERROR_NULL", code::ERROR_NULL),
        ("TCK_ERROR_VERSION", code::ERROR_VERSION),
        ("TCK_ERROR_INVALID", code::ERROR_INVALID),
        ("TCK_ERROR_GUARD", code::ERROR_GUARD),
        ("TCK_ERROR_BUFFER", code::ERROR_BUFFER),
        ("TCK_ERROR_INTERNAL", code::ERROR_INTERNAL),
        ("TCK_VERDICT_PASS", verdict::PASS),
        ("TCK_VERDICT_TANGENT_FAILURE", verdict::TANGENT_FAILURE),
        ("TCK_VERDICT_ROUTINE_FAULT", verdict::ROUTINE_FAULT),
        ("TCK_VERDICT_TWIN_NOT_SAFE", verdict::TWIN_NOT_SAFE),
    ] {
        put(n, i64::from(v));
    }
    put("TCK_OPTIONS_VERSION", i64::from(options::OPTIONS_VERSION));
    put("TCK_SCHEME_SLOTS", options::SCHEME_SLOTS as i64);
    put("TCK_VERSION_MAJOR", env!("CARGO_PKG_VERSION_MAJOR").parse().unwrap());
    put("TCK_VERSION_MINOR", env!("CARGO_PKG_VERSION_MINOR").parse().unwrap());
    put("TCK_VERSION_PATCH", env!("CARGO_PKG_VERSION_PATCH").parse().unwrap());
    for (v, k) in options::KINDS {
        put(&format!("TCK_KIND_{}", k.name().to_uppercase().replace('-', "_")), v.into());
    }
    for (v, c) in options::COMPONENTS {
        let label = match c.label() {
            "n" => "OPENING".to_string(),
            "s1" => "SLIP1".to_string(),
            "s2" => "SLIP2".to_string(),
            other => other.to_string(),
        };
        put(&format!("TCK_COMPONENT_{label}"), v.into());
    }
    put("TCK_SHEAR_ENGINEERING", 0);
    put("TCK_SHEAR_TENSOR", 1);
    assert_eq!(options::SHEARS.map(|(v, _)| v), [0, 1]);
    for (v, s) in options::SHAPES {
        put(&format!("TCK_SHAPE_{}", s.name().to_uppercase().replace('-', "_")), v.into());
    }
    for (v, s) in options::SCHEMES {
        put(&format!("TCK_SCHEME_{}", s.name().to_uppercase().replace('-', "_")), v.into());
    }
    for (v, l) in options::GUARD_LEVELS {
        put(&format!("TCK_GUARD_{}", l.name().to_uppercase()), v.into());
    }
    m
}

#[test]
fn the_header_and_the_rust_side_have_the_same_constants() {
    let h = header_constants();
    let r = rust_constants();
    assert_eq!(h, r, "header (left) and Rust (right) differ");
}

#[test]
fn the_fortran_module_mirrors_every_constant() {
    let h = header_constants();
    let f = fortran_constants();
    for (name, value) in &h {
        let lower = name.to_lowercase();
        assert_eq!(f.get(&lower), Some(value), "{lower} in tancheck_api.f90 (header: {name} = {value})");
    }
    let extra: Vec<_> = f.keys().filter(|k| !h.contains_key(&k.to_uppercase())).collect();
    assert!(extra.is_empty(), "Fortran parameters the header lacks: {extra:?}");
}

/// Every function the header declares, and no other, is exported by the shared library.
#[test]
fn the_library_exports_what_the_header_declares() {
    use object::{Object, ObjectSymbol};
    let text = header();
    let mut declared: Vec<String> = text
        .lines()
        .filter(|l| !l.trim_start().starts_with("typedef") && !l.trim_start().starts_with('*'))
        .filter_map(|l| {
            let i = l.find("tck_")?;
            let rest = &l[i..];
            let name: String = rest.chars().take_while(|c| c.is_ascii_alphanumeric() || *c == '_').collect();
            rest[name.len()..].starts_with('(').then_some(name)
        })
        .collect();
    declared.sort();
    declared.dedup();
    let data = std::fs::read(library_dir().join("libtancheck_capi.so")).unwrap();
    let file = object::File::parse(&*data).unwrap();
    let mut exported: Vec<String> = file
        .dynamic_symbols()
        .filter(|s| s.is_definition() && s.is_global() && s.kind() == object::SymbolKind::Text)
        .filter_map(|s| s.name().ok().map(str::to_string))
        .filter(|n| n.starts_with("tck_") || n.starts_with("tc_"))
        .collect();
    exported.sort();
    assert_eq!(declared, exported, "declared in tancheck.h (left), exported (right)");
    assert!(declared.len() >= 13, "{declared:?}");
}

/// Offsets of the fields of tck_options, by name, on the Rust side.
fn rust_layout() -> Vec<(&'static str, usize)> {
    vec![
        ("size", std::mem::size_of::<Options>()),
        ("version", offset_of!(Options, version)),
        ("kind", offset_of!(Options, kind)),
        ("shear", offset_of!(Options, shear)),
        ("norder", offset_of!(Options, norder)),
        ("order", offset_of!(Options, order)),
        ("name", offset_of!(Options, name)),
        ("nproperties", offset_of!(Options, nproperties)),
        ("nstate", offset_of!(Options, nstate)),
        ("properties", offset_of!(Options, properties)),
        ("state0", offset_of!(Options, state0)),
        ("strain0", offset_of!(Options, strain0)),
        ("stress0", offset_of!(Options, stress0)),
        ("temperature", offset_of!(Options, temperature)),
        ("shape", offset_of!(Options, shape)),
        ("steps", offset_of!(Options, steps)),
        ("back", offset_of!(Options, back)),
        ("nincrements", offset_of!(Options, nincrements)),
        ("peak", offset_of!(Options, peak)),
        ("increments", offset_of!(Options, increments)),
        ("increment_dtemp", offset_of!(Options, increment_dtemp)),
        ("increment_dtime", offset_of!(Options, increment_dtime)),
        ("schemes", offset_of!(Options, schemes)),
        ("guard_level", offset_of!(Options, guard_level)),
        ("rel_step", offset_of!(Options, rel_step)),
        ("tol", offset_of!(Options, tol)),
        ("diagnose", offset_of!(Options, diagnose)),
        ("fp_traps", offset_of!(Options, fp_traps)),
    ]
}

fn parse_layout(out: &str) -> Vec<(String, usize)> {
    out.split_whitespace()
        .map(|w| {
            let (n, v) = w.split_once('=').unwrap_or_else(|| panic!("bad line {w}"));
            (n.to_string(), v.parse().unwrap())
        })
        .collect()
}

fn expected() -> Vec<(String, usize)> {
    rust_layout().into_iter().map(|(n, v)| (n.to_string(), v)).collect()
}

#[test]
fn c_and_rust_lay_out_the_options_alike() {
    if !tancheck_abi::c_available() {
        panic!("no C compiler (set CC or install gcc): the layout cannot be compared");
    }
    let dir = scratch("layout-c");
    let mut src =
        String::from("#include <stdio.h>\n#include <stddef.h>\n#include \"tancheck.h\"\nint main(void) {\n");
    src.push_str("    printf(\"size=%zu\\n\", sizeof(tck_options));\n");
    for (name, _) in rust_layout().into_iter().skip(1) {
        src.push_str(&format!("    printf(\"{name}=%zu\\n\", offsetof(tck_options, {name}));\n"));
    }
    src.push_str("    return 0;\n}\n");
    std::fs::write(dir.join("layout.c"), src).unwrap();
    let inc = format!("-I{}", shim().join("include").display());
    compile("CC", "cc", &["-std=c11", "-Wall", &inc, "layout.c", "-o", "layout"], &dir);
    let (out, stdout, stderr) = run(&dir.join("layout"));
    assert!(out.status.success(), "{stderr}");
    assert_eq!(parse_layout(&stdout), expected());
}

#[test]
#[cfg_attr(tancheck_no_fortran, ignore = "needs gfortran")]
fn fortran_and_rust_lay_out_the_options_alike() {
    let dir = scratch("layout-fortran");
    let mut src = String::from(
        "program layout\n  use, intrinsic :: iso_c_binding, only: c_loc, c_sizeof, c_intptr_t\n  \
         use tancheck_api, only: tck_options\n  implicit none\n  type(tck_options), target :: o\n  \
         integer(c_intptr_t) :: base\n  base = transfer(c_loc(o), base)\n  \
         print '(a, i0)', 'size=', c_sizeof(o)\n",
    );
    for (name, _) in rust_layout().into_iter().skip(1) {
        let field =
            if name == "rel_step" || name == "tol" { format!("o%{name}(0)") } else { format!("o%{name}") };
        src.push_str(&format!("  print '(a, i0)', '{name}=', transfer(c_loc({field}), base) - base\n"));
    }
    src.push_str("end program layout\n");
    std::fs::write(dir.join("layout.f90"), src).unwrap();
    let module = shim().join("fortran/tancheck_api.f90");
    compile("FC", "gfortran", &["-std=f2008", "-Wall", "-c", path_str(&module), "-o", "api.o"], &dir);
    let lib = library_dir();
    let (libdir, rpath) = (format!("-L{}", lib.display()), format!("-Wl,-rpath,{}", lib.display()));
    compile(
        "FC",
        "gfortran",
        &["-std=f2008", "-Wall", "layout.f90", "api.o", &libdir, "-ltancheck_capi", &rpath, "-o", "layout"],
        &dir,
    );
    let (out, stdout, stderr) = run(&dir.join("layout"));
    assert!(out.status.success(), "{stderr}");
    assert_eq!(parse_layout(&stdout), expected());
}
