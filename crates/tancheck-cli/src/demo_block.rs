//! The block part of `tancheck demo`: a made-up alloy plate under impact. A plate struck
//! face-on deforms in uniaxial strain, fast; the explicit solver calls a Johnson–Cook block
//! routine with damage and deletion for its points. The correct routine passes the block checks;
//! one whose deleted points come back when the plate is compressed again is caught.
//!
//! Every number here is invented for the demo ("demo alloy"): not data for any real material.

use std::io::Write;
use std::path::Path as FsPath;

use anyhow::{Context, Result};
use tancheck_abi::compile::{build_library, BuildOptions};

use crate::block_session::run_block_manifest;
use crate::manifest::Manifest;
use crate::report::terminal::{Detail, Terminal};
use crate::report::Reporter;

const SOURCES: [(&str, &str); 2] = [
    ("jc.c", include_str!("../../../fortran-shim/examples/c/jc.c")),
    ("jc_block.c", include_str!("../../../fortran-shim/examples/c/jc_block.c")),
];

/// Demo alloy (invented): E 110 GPa, ν 0.31, Johnson–Cook A 900, B 600 MPa, n 0.3, C 0.02, m 1.0,
/// T_room 293 K, T_melt 1900 K, reference rate 1/s, density 4.4e-9 t/mm³, heat capacity
/// 5.3e8 mm²/(s² K), Taylor–Quinney 0.9, damage D1..D5 0.1, 0.9, −2.0, 0.01, 0.5, modulus
/// softening k_E 0.4, fracture energy 15 N/mm, deletion at d = 0.99.
const ALLOY: &str = "[110000, 0.31, 900, 600, 0.3, 0.02, 1.0, 293, 1900, 1.0, 4.4e-9, 5.3e8, 0.9, \
                     0.1, 0.9, -2.0, 0.01, 0.5, 0.4, 15.0, 0.99]";

fn manifest(lib: &str, symbol: &str) -> String {
    format!(
        r#"{{
  "routine": {{ "library": "{lib}", "symbol": "{symbol}", "interface": "block", "kind": "solid-3d",
               "states": 13, "properties": {ALLOY} }},
  "start": {{ "temperature": 350 }},
  "path": {{ "shape": "uniaxial-strain", "peak": 0.25, "steps": 25, "back": 10, "dtime": 4e-6 }},
  "block": {{ "density": 4.4e-9, "characteristic_length": 1.5, "softening": true,
              "rate_law": {{ "reference_rate": 1.0, "coefficient": 0.02 }} }}
}}
"#
    )
}

/// Build the plate routines in `dir`, check the correct one and the flawed one; whether both
/// got the verdict they should.
pub fn run(dir: &FsPath, out: &mut dyn Write, verbose: bool) -> Result<bool> {
    let src_dir = dir.join("plate-src");
    std::fs::create_dir_all(&src_dir)?;
    for (file, text) in SOURCES {
        std::fs::write(src_dir.join(file), text)?;
    }
    let lib = dir.join("libplate.so");
    build_library(&BuildOptions::new([src_dir.join("jc_block.c")], &lib))
        .context("building the plate example")?;
    writeln!(out, "   built {} (C block routines, with complex-step twins)\n", lib.display())?;
    let mut all = true;
    for (title, symbol, file, pass) in [
        (
            "demo alloy plate under impact: Johnson–Cook block with damage and deletion, C",
            "c_jc_block",
            "plate.json",
            true,
        ),
        (
            "the same plate, deleted points revived under compression (flawed on purpose), C",
            "c_jc_block_revived",
            "plate_revived.json",
            false,
        ),
    ] {
        let text = manifest("libplate.so", symbol);
        let mpath = dir.join(file);
        std::fs::write(&mpath, &text)?;
        let m = Manifest::parse(&text, &mpath)?;
        let path = m.path_or(crate::session::default_path(m.routine.kind)).map_err(anyhow::Error::msg)?;
        let report = run_block_manifest(&m, dir, &path)?;
        let ok = report.passed() == pass;
        all &= ok;
        writeln!(out, "-- {title} --")?;
        writeln!(out, "   manifest: {}", mpath.display())?;
        out.flush()?;
        let detail = if verbose { Detail::Verbose } else { Detail::Quiet };
        Terminal::new(detail, crate::survive::stdout()).block(&report)?;
        writeln!(
            out,
            "   expected {}, got {}: {}\n",
            if pass { "PASS" } else { "FAIL" },
            if report.passed() { "PASS" } else { "FAIL" },
            if ok { "as it should be" } else { "NOT AS EXPECTED" }
        )?;
    }
    Ok(all)
}
