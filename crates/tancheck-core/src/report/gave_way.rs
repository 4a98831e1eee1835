//! How a check asked for on several threads gave way to one (see `concurrent`): kept in the
//! report for its caller (not serialised), so that the command line can make the check again
//! on a new instance of the library and place the note where `check::run` places it.

/// Why a check on several threads gave way to one thread.
#[derive(Clone, Debug, PartialEq)]
pub enum Serial {
    /// The routine failed the probe, or an increment ended in another state than the walk
    /// reached: the report says so.
    Because(String),
    /// A call of the walk or of the probe faulted (the increment and the fault): the check on
    /// one thread meets the fault where it is, or, when it does not, says so.
    Faulted(String),
}

/// A check asked for on several threads that gave way to one (see [`Serial`]): the routine's
/// results depend on the calls made before, or at the same time on other threads. The check
/// on one thread then ran on a routine those calls had already been made to; a caller that can
/// give a fresh instance of it (a library loaded anew, its static and SAVE variables as at
/// load) makes the check again there, with `jobs` 1, and adds the note with
/// [`GaveWay::add_note`], so that the report is the one of `--jobs 1` but for the note.
#[derive(Clone, Debug, PartialEq)]
pub struct GaveWay {
    /// The threads the check was to run on.
    pub threads: usize,
    /// How many notes the check had when it gave way (where the note goes).
    pub at: usize,
    pub serial: Serial,
}

impl GaveWay {
    /// Add the note saying why the check ran on one thread to `notes`, the notes of that check
    /// (`met_fault`: it met a fault). A faulted walk or probe is worth a note only when the
    /// check on one thread met no fault (otherwise the report shows the fault where it is).
    pub fn add_note(&self, notes: &mut Vec<String>, met_fault: bool) {
        let n = self.threads;
        match &self.serial {
            Serial::Because(why) => {
                notes.insert(self.at.min(notes.len()), format!("checked on one thread instead of {n}: {why}"))
            }
            Serial::Faulted(fault) if !met_fault => notes.push(format!(
                "checked on one thread instead of {n}: a call made to prepare the threads faulted ({fault}), \
                 where the check on one thread met no fault: the routine's results depend on the calls made \
                 before it or at the same time on other threads"
            )),
            Serial::Faulted(_) => {}
        }
    }
}
