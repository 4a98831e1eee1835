//! Reference values that carry where they come from: every number a test compares against
//! names its source and says how it was obtained (the house rule of DEVELOPERS.md: published
//! values, derived values, values from memory and rules of thumb are told apart).

use std::fmt;

/// How a reference value was obtained.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    /// Read from the source (a table, a worked example, a printed constant).
    Read,
    /// Derived from read values by a closed form the source gives.
    Derived,
    /// Recalled, not re-read: to be confirmed against the source.
    FromMemory,
    /// A rule of thumb of the trade, not a value of one source.
    CommonPractice,
}

impl Kind {
    /// The words the reports and REFERENCES.md use.
    pub fn label(self) -> &'static str {
        match self {
            Kind::Read => "read",
            Kind::Derived => "derived",
            Kind::FromMemory => "from memory",
            Kind::CommonPractice => "common practice",
        }
    }
}

/// A value, its source and its kind.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Reference {
    pub value: f64,
    pub source: &'static str,
    pub kind: Kind,
}

impl Reference {
    pub const fn read(value: f64, source: &'static str) -> Reference {
        Reference { value, source, kind: Kind::Read }
    }
    pub const fn derived(value: f64, source: &'static str) -> Reference {
        Reference { value, source, kind: Kind::Derived }
    }
    pub const fn from_memory(value: f64, source: &'static str) -> Reference {
        Reference { value, source, kind: Kind::FromMemory }
    }
    pub const fn common_practice(value: f64, source: &'static str) -> Reference {
        Reference { value, source, kind: Kind::CommonPractice }
    }

    /// Panics, naming the value, its source and kind, unless |got − value| ≤ tol.
    #[track_caller]
    pub fn assert_close(&self, got: f64, tol: f64, what: &str) {
        assert!(
            (got - self.value).abs() <= tol,
            "{what} = {got:e}, expected {self} within {tol:e} (difference {:e})",
            got - self.value
        );
    }

    /// Panics unless |got − value| ≤ rel · |value|.
    #[track_caller]
    pub fn assert_rel(&self, got: f64, rel: f64, what: &str) {
        self.assert_close(got, rel * self.value.abs(), what);
    }
}

impl fmt::Display for Reference {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{:e} ({}, {})", self.value, self.source, self.kind.label())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_miss_names_the_source_and_kind() {
        let r = Reference::derived(667.5774, "Simo & Hughes 1998, Box 3.2");
        r.assert_close(667.57743, 5e-5, "σ11");
        let e = std::panic::catch_unwind(|| r.assert_close(667.6, 5e-5, "σ11")).unwrap_err();
        let text = e.downcast_ref::<String>().unwrap();
        assert!(text.contains("Simo & Hughes 1998, Box 3.2, derived"), "{text}");
        assert_eq!(Kind::FromMemory.label(), "from memory");
    }
}
