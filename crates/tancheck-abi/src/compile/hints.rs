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
    if complex && lang == Language::C {
        if let Some(word) = complex_macro_used(output) {
            h.push_str(&format!(
                "<complex.h>, included in the twin, defines `I` (the imaginary unit) and `complex` as \
                 macros: the source uses `{word}` as a name (in a line the compiler shows above), which \
                 the twin reads as the macro; rename it. "
            ));
        }
    }
    if complex {
        if !h.is_empty() && !h.ends_with(' ') {
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

/// `I` or `complex` used as a name in a source line the compiler echoes (gcc and clang show
/// the line after `NN |`): <complex.h> makes them macros in the twin (a user's loop index `I`
/// failed the twin with "array subscript is not an integer" and a generic hint).
fn complex_macro_used(output: &str) -> Option<&'static str> {
    let code = output.lines().filter_map(|l| {
        let (num, rest) = l.split_once('|')?;
        num.trim().parse::<u32>().ok().map(|_| rest)
    });
    for line in code {
        let words = line.split(|c: char| !(c.is_ascii_alphanumeric() || c == '_'));
        for w in words {
            if w == "I" {
                return Some("I");
            }
            if w == "complex" && !line.contains("<complex.h>") {
                return Some("complex");
            }
        }
    }
    None
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

#[cfg(test)]
mod tests {
    use super::*;

    // gcc's words for a loop index `I` in the twin (measured with gcc 12): the hint names the
    // macro; a twin failure without it keeps the general hint alone.
    #[test]
    fn a_name_the_complex_header_makes_a_macro_is_named() {
        let gcc = "/tmp/ii.c:6:39: error: array subscript is not an integer\n    6 |     for (int I = 0; I < 6; ++I) stress[I] = dstrain[I];\n      |                                       ^\n";
        let h = compile_hint(gcc, Language::C, true);
        assert!(h.contains("uses `I` as a name") && h.contains("complex-step twin"), "{h}");
        let other = "/tmp/a.c:3:5: error: conflicting types\n    3 |     double x = fabs(y);\n";
        let h = compile_hint(other, Language::C, true);
        assert!(!h.contains("as a name") && h.contains("complex-step twin"), "{h}");
        let complex = "    9 |     double complex z;\n";
        assert!(compile_hint(complex, Language::C, true).contains("uses `complex` as a name"));
        assert!(!compile_hint("    1 | #include <complex.h>\n", Language::C, true).contains("as a name"));
    }
}
