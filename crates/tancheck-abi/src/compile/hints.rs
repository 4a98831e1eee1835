//! What to tell the user after a failed compile or link: hints read from the compiler's output.

use super::language::Language;

pub(super) fn compile_hint(output: &str, lang: Language, complex: bool) -> String {
    let mut h = String::new();
    if output.contains("Cannot open module file") {
        h.push_str(
            "A module this source uses was not found: give the source that defines it too \
             (tancheck compiles Fortran sources in the order of their modules). The modules \
             tancheck_routine and tancheck_cstep are provided.",
        );
    }
    if complex {
        if !h.is_empty() {
            h.push(' ');
        }
        h.push_str(match lang {
            Language::C => {
                "The source compiled as a real routine but not as its complex-step twin \
                 (-DTC_COMPLEX, where tc_real is double _Complex): compare real parts only \
                 (tc_re(x) < 0), declare every number of the routine tc_real, and use the \
                 helpers of tancheck_cstep.h (tc_abs, tc_sqrt, ...) instead of libm; or build \
                 without the twin (--no-twin)."
            }
            Language::Fortran => {
                "The source compiled as a real routine but not as its complex-step twin \
                 (-DTC_COMPLEX): declare the routine's numbers TC_REAL from tancheck_twin.inc, \
                 name it bind(C, name=\"...\"//TC_SUFFIX) and use the generics of module \
                 tancheck_cstep, or build without the twin (--no-twin)."
            }
        });
    }
    if h.is_empty() {
        h
    } else {
        format!("\n{h}")
    }
}

pub(super) fn link_hint(output: &str, twin: bool, defines_modules: bool) -> String {
    let mut h = Vec::new();
    if output.contains("multiple definition") {
        if twin && defines_modules {
            h.push(
                "Every source is compiled twice (the routine and its complex-step twin), so a \
                 procedure inside a Fortran module is defined twice: write the routine as an \
                 external procedure named bind(C, name=\"...\"//TC_SUFFIX) (see tancheck_twin.inc), \
                 or build without the twin (--no-twin).",
            );
        } else if twin {
            h.push(
                "Every source is compiled twice (the routine and its complex-step twin): a \
                 function with external linkage that does not go through TC_NAME() / \
                 TC_SUFFIX is defined twice. Make helpers static, name routines with \
                 TC_ROUTINE() or TC_SUFFIX, or build without the twin (--no-twin).",
            );
        } else {
            h.push("Two sources define the same name: rename one or leave one out.");
        }
    }
    if output.contains("undefined reference") {
        h.push(
            "A name the sources use is defined nowhere: add the source that defines it. \
             A name ending in `_` is a Fortran external procedure; one ending in `_cx` is a \
             complex-step twin that a source did not get.",
        );
    }
    if h.is_empty() {
        String::new()
    } else {
        format!("\n{}", h.join(" "))
    }
}
