//! The inline "row/col" label of a compared entry (no allocation; text only when printed).

use std::borrow::Cow;
use std::fmt;

use serde::{Deserialize, Serialize};

/// An entry's "row/col" label, e.g. "11/23" or "s1/T": at most [`Label::CAP`] bytes, inline
/// (no allocation); text only when displayed or serialised.
#[derive(Clone, Copy, PartialEq, Eq)]
pub struct Label {
    len: u8,
    bytes: [u8; Label::CAP],
}

impl Label {
    pub const CAP: usize = 14;

    /// `row` + "/" + `col`, cut at [`Label::CAP`] bytes (component labels are 1–2 bytes).
    pub fn pair(row: &str, col: &str) -> Label {
        let mut l = Label { len: 0, bytes: [0; Label::CAP] };
        // The usual case: both fit (whole strings, so no character is cut).
        let (r, c) = (row.as_bytes(), col.as_bytes());
        if r.len() + 1 + c.len() <= Label::CAP {
            l.bytes[..r.len()].copy_from_slice(r);
            l.bytes[r.len()] = b'/';
            l.bytes[r.len() + 1..r.len() + 1 + c.len()].copy_from_slice(c);
            l.len = (r.len() + 1 + c.len()) as u8;
            return l;
        }
        for part in [row, "/", col] {
            for &b in part.as_bytes() {
                if (l.len as usize) < Label::CAP {
                    l.bytes[l.len as usize] = b;
                    l.len += 1;
                }
            }
        }
        // Never cut inside a character (component labels are ASCII: nothing to check then).
        while !l.bytes[..l.len as usize].is_ascii()
            && std::str::from_utf8(&l.bytes[..l.len as usize]).is_err()
        {
            l.len -= 1;
        }
        l
    }

    pub fn as_str(&self) -> &str {
        std::str::from_utf8(&self.bytes[..self.len as usize]).unwrap_or("")
    }
}

impl std::ops::Deref for Label {
    type Target = str;
    fn deref(&self) -> &str {
        self.as_str()
    }
}

impl fmt::Display for Label {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.pad(self.as_str())
    }
}

impl fmt::Debug for Label {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt::Debug::fmt(self.as_str(), f)
    }
}

impl PartialEq<&str> for Label {
    fn eq(&self, other: &&str) -> bool {
        self.as_str() == *other
    }
}

impl PartialEq<str> for Label {
    fn eq(&self, other: &str) -> bool {
        self.as_str() == other
    }
}

impl PartialEq<String> for Label {
    fn eq(&self, other: &String) -> bool {
        self.as_str() == other
    }
}

impl From<Label> for String {
    fn from(l: Label) -> String {
        l.as_str().to_string()
    }
}

impl Serialize for Label {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.as_str())
    }
}

impl<'de> Deserialize<'de> for Label {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Label, D::Error> {
        let s = Cow::<str>::deserialize(d)?;
        let (row, col) = s.split_once('/').unwrap_or((&s, ""));
        let l = Label::pair(row, col);
        if l.as_str() != s {
            return Err(serde::de::Error::custom(format!(
                "entry label `{s}` longer than {} bytes",
                Label::CAP
            )));
        }
        Ok(l)
    }
}
