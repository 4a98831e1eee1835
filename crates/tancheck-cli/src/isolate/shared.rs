//! The record an `--isolate` worker and its parent share in memory (a file both map,
//! [`SHARED_LEN`] bytes): a counter the worker raises before every routine call, the inputs
//! of the last call it recorded (a point check's base call of each increment, or a
//! finite-strain call), and the routine's name. The worker writes it through [`Writer`], the
//! parent reads it through [`SharedView`]; every access is an atomic word, so neither makes a
//! system call per routine call.

use std::fs::File;
use std::path::Path;
use std::sync::atomic::{AtomicU64, Ordering};

use tancheck_core::report::CallRecord;

pub use crate::worker_env::{FiniteCall, RunningCall};

/// Bytes of the shared record: the call counter, the sequence word, the record's length in
/// words, its kind, and the inputs of the last recorded call (8-byte words); in its last
/// [`NAME_WORDS`] words the routine's name (its length in bytes, then the bytes). A sparse
/// file: pages the record does not reach take no room.
pub const SHARED_LEN: u64 = 1 << 20;
/// Words at the end of the shared record that hold the routine's name.
const NAME_WORDS: usize = 64;
/// Word offsets in the shared record.
const W_CALLS: usize = 0;
const W_SEQ: usize = 1;
const W_LEN: usize = 2;
const W_KIND: usize = 3;
const W_RECORD: usize = 4;
/// Words of a record before its arrays: increment, temperature and its increment, time and
/// its increment, the length of the properties, a word of the kind's own (a point call's
/// number of stress components, whether a finite-strain call was the twin's), the length of
/// the state.
const RECORD_HEAD: usize = 8;
/// The kinds of record.
const KIND_POINT: u64 = 0;
const KIND_FINITE: u64 = 1;

/// The words of a shared record mapped in memory.
fn words(map: &[u8]) -> &[AtomicU64] {
    let n = map.len() / 8;
    // SAFETY: the map is page-aligned (so 8-aligned) and `n` words long; AtomicU64 has the
    // size and alignment of u64, and every access to the shared words is atomic.
    unsafe { std::slice::from_raw_parts(map.as_ptr().cast::<AtomicU64>(), n) }
}

/// The worker's side: the map, the calls counted and the sequence word's value.
pub struct Writer {
    map: memmap2::MmapMut,
    calls: u64,
    seq: u64,
}

impl Writer {
    /// Map the record the parent made, and write the routine's name into it (before any call:
    /// the parent names the routine when the worker dies).
    pub fn open(heartbeat: &Path, name: &str) -> std::io::Result<Writer> {
        let file = std::fs::OpenOptions::new().read(true).write(true).open(heartbeat)?;
        if file.metadata()?.len() < SHARED_LEN {
            file.set_len(SHARED_LEN)?;
        }
        // SAFETY: the file is the worker folder's own, made by the parent, which only reads
        // it; its length is not changed while mapped.
        let map = unsafe { memmap2::MmapMut::map_mut(&file)? };
        let w = Writer { map, calls: 0, seq: 0 };
        w.name(name);
        Ok(w)
    }

    /// The routine's name into the end of the record (cut to fit).
    fn name(&self, name: &str) {
        let w = words(&self.map);
        let at = w.len() - NAME_WORDS;
        let name = name.as_bytes();
        let name = &name[..name.len().min((NAME_WORDS - 1) * 8)];
        for (slot, chunk) in w[at + 1..].iter().zip(name.chunks(8)) {
            let mut b = [0u8; 8];
            b[..chunk.len()].copy_from_slice(chunk);
            slot.store(u64::from_le_bytes(b), Ordering::Relaxed);
        }
        w[at].store(name.len() as u64, Ordering::Release);
    }

    /// A routine call begins.
    pub fn beat(&mut self) {
        self.calls += 1;
        words(&self.map)[W_CALLS].store(self.calls, Ordering::Release);
    }

    /// The call counter, for a sweep that raises it before each of its calls.
    pub fn counter(&self) -> &AtomicU64 {
        &words(&self.map)[W_CALLS]
    }

    /// After such a sweep: the calls it counted.
    pub fn sync_calls(&mut self) {
        self.calls = self.counter().load(Ordering::Acquire);
    }

    /// A point call's inputs.
    pub fn record_point(&mut self, input: &tancheck_core::CallInput<'_, f64>) {
        let head = [
            input.increment as i64 as u64,
            input.temp[0].to_bits(),
            input.temp[1].to_bits(),
            input.time[0].to_bits(),
            input.time[1].to_bits(),
            input.props.len() as u64,
            input.strain.len() as u64,
            input.state0.len() as u64,
        ];
        self.record(
            KIND_POINT,
            head,
            &[input.props, input.strain, input.dstrain, input.stress0, input.state0],
        );
    }

    /// A finite-strain call's inputs (the real parts of the twin's, `complex` set).
    #[allow(clippy::too_many_arguments)]
    pub fn record_finite(
        &mut self,
        increment: i32,
        temperature: [f64; 2],
        time: [f64; 2],
        complex: bool,
        arrays: [&[f64]; 5],
    ) {
        let [props, f0, f1, stress0, state0] = arrays;
        let head = [
            increment as i64 as u64,
            temperature[0].to_bits(),
            temperature[1].to_bits(),
            time[0].to_bits(),
            time[1].to_bits(),
            props.len() as u64,
            complex as u64,
            state0.len() as u64,
        ];
        self.record(KIND_FINITE, head, &[props, f0, f1, stress0, state0]);
    }

    /// A record between two raises of the sequence word (odd while writing); nothing when it
    /// does not fit.
    fn record(&mut self, kind: u64, head: [u64; RECORD_HEAD], arrays: &[&[f64]]) {
        let w = words(&self.map);
        let len = RECORD_HEAD + arrays.iter().map(|a| a.len()).sum::<usize>();
        self.seq += 1;
        w[W_SEQ].store(self.seq, Ordering::Release);
        if W_RECORD + len > w.len() - NAME_WORDS {
            w[W_LEN].store(0, Ordering::Relaxed);
        } else {
            let values = head.into_iter().chain(arrays.iter().flat_map(|a| a.iter().map(|x| x.to_bits())));
            for (slot, v) in w[W_RECORD..].iter().zip(values) {
                slot.store(v, Ordering::Relaxed);
            }
            w[W_KIND].store(kind, Ordering::Relaxed);
            w[W_LEN].store(len as u64, Ordering::Relaxed);
        }
        self.seq += 1;
        w[W_SEQ].store(self.seq, Ordering::Release);
    }
}

/// The parent's view of the shared record.
pub struct SharedView(memmap2::Mmap);

impl SharedView {
    /// Make the record (empty, [`SHARED_LEN`] bytes) and map it.
    pub fn open(heartbeat: &Path) -> std::io::Result<SharedView> {
        let file = File::options().read(true).write(true).create(true).truncate(true).open(heartbeat)?;
        file.set_len(SHARED_LEN)?;
        // SAFETY: the worker writes the file only through its own map, with atomic accesses,
        // and never changes its length.
        Ok(SharedView(unsafe { memmap2::Mmap::map(&file)? }))
    }

    /// Routine calls the worker has begun.
    pub fn calls(&self) -> u64 {
        words(&self.0)[W_CALLS].load(Ordering::Acquire)
    }

    /// The routine's name, once the worker has loaded it and written it (cut at a character
    /// boundary where the record cut it).
    pub fn routine(&self) -> Option<String> {
        let w = words(&self.0);
        let at = w.len() - NAME_WORDS;
        let n = (w[at].load(Ordering::Acquire) as usize).min((NAME_WORDS - 1) * 8);
        if n == 0 {
            return None;
        }
        let bytes: Vec<u8> =
            w[at + 1..].iter().flat_map(|x| x.load(Ordering::Relaxed).to_le_bytes()).take(n).collect();
        Some(String::from_utf8_lossy(&bytes).trim_end_matches('\u{fffd}').to_string())
    }

    /// The inputs of the last recorded call, when the worker finished writing them.
    pub fn last_call(&self) -> Option<RunningCall> {
        let w = words(&self.0);
        let seq = w[W_SEQ].load(Ordering::Acquire);
        let len = w[W_LEN].load(Ordering::Acquire) as usize;
        if seq == 0 || seq % 2 == 1 || len < RECORD_HEAD || W_RECORD + len > w.len() - NAME_WORDS {
            return None;
        }
        let kind = w[W_KIND].load(Ordering::Relaxed);
        let r: Vec<u64> = w[W_RECORD..W_RECORD + len].iter().map(|x| x.load(Ordering::Relaxed)).collect();
        let (np, own, ns) = (r[5] as usize, r[6] as usize, r[7] as usize);
        let lengths = match kind {
            KIND_POINT => [np, own, own, own, ns],
            KIND_FINITE => [np, 9, 9, 6, ns],
            _ => return None,
        };
        if RECORD_HEAD + lengths.iter().sum::<usize>() != len {
            return None;
        }
        let mut at = RECORD_HEAD;
        let [a, b, c, d, e] = lengths.map(|m| {
            let v: Vec<f64> = r[at..at + m].iter().map(|x| f64::from_bits(*x)).collect();
            at += m;
            v
        });
        let f = |i: usize| f64::from_bits(r[i]);
        let increment = r[0] as i64 as i32;
        Some(match kind {
            KIND_POINT => RunningCall::Point(CallRecord {
                increment,
                perturbation: None,
                props: a,
                strain: b,
                dstrain: c,
                temp: f(1),
                dtemp: f(2),
                stress0: d,
                state0: e,
                time: f(3),
                dtime: f(4),
            }),
            _ => RunningCall::Finite(FiniteCall {
                increment,
                perturbation: (own == 1).then(|| "complex-step twin (real parts)".to_string()),
                properties: a,
                f0: b,
                f1: c,
                stress0: d,
                state0: e,
                temperature: Some([f(1), f(2)]),
                time: f(3),
                dtime: f(4),
            }),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// What the worker writes the parent reads back, bit for bit, for both kinds; a record
    /// being written (an odd sequence word) is not read.
    #[test]
    fn records_read_back_as_written() {
        let dir = std::env::temp_dir().join(format!("tancheck-shared-test-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let hb = dir.join("heartbeat");
        let view = SharedView::open(&hb).unwrap();
        assert!(view.last_call().is_none() && view.routine().is_none() && view.calls() == 0);
        let mut w = Writer::open(&hb, "lib.so:my_rubber").unwrap();
        assert_eq!(view.routine().as_deref(), Some("lib.so:my_rubber"));
        let (props, f0, f1, s0, st) = ([10.0, 0.45], [1.0; 9], [1.1; 9], [0.5; 6], [0.25, -3.0]);
        w.beat();
        w.record_finite(3, [293.0, 5.0], [0.5, 0.25], true, [&props, &f0, &f1, &s0, &st]);
        assert_eq!(view.calls(), 1);
        let Some(RunningCall::Finite(c)) = view.last_call() else { panic!("{:?}", view.last_call()) };
        assert_eq!((c.increment, c.properties, c.f0, c.f1), (3, props.to_vec(), f0.to_vec(), f1.to_vec()));
        assert_eq!((c.stress0, c.state0, c.temperature), (s0.to_vec(), st.to_vec(), Some([293.0, 5.0])));
        assert_eq!((c.time, c.dtime, c.perturbation.is_some()), (0.5, 0.25, true));
        let strain = [1e-3, 0.0, 0.0];
        let input = tancheck_core::CallInput {
            props: &props,
            strain: &strain,
            dstrain: &strain,
            stress0: &strain,
            state0: &st,
            temp: [20.0, 1.0],
            time: [0.0, 1.0],
            increment: 7,
            want_tangent: true,
        };
        w.record_point(&input);
        let Some(RunningCall::Point(p)) = view.last_call() else { panic!("{:?}", view.last_call()) };
        assert_eq!(
            (p.increment, p.strain, p.state0, p.temp, p.dtemp),
            (7, strain.to_vec(), st.to_vec(), 20.0, 1.0)
        );
        // A record half written is not read.
        words(&w.map)[W_SEQ].fetch_add(1, Ordering::AcqRel);
        assert!(view.last_call().is_none());
        let _ = std::fs::remove_dir_all(&dir);
    }

    /// The finite-strain last words of the guard (fortran-shim/src/guard.c) parse as a
    /// finite-strain call, a point call's as a point call.
    #[test]
    fn last_words_calls_parse_as_their_kind() {
        let finite = r#"{"increment": 2, "perturbation": null, "properties": [10, 0.45],
            "f0": [1,0,0,0,1,0,0,0,1], "f1": [1.2,0,0,0,1,0,0,0,1], "stress0": [0,0,0,0,0,0],
            "state0": [], "time": 1, "dtime": 1}"#;
        let c: RunningCall = serde_json::from_str(finite).unwrap();
        assert!(matches!(&c, RunningCall::Finite(f) if f.f1[0] == 1.2 && f.temperature.is_none()), "{c:?}");
        let point = r#"{"increment": 4, "perturbation": null, "props": [1], "strain": [0.1],
            "dstrain": [0.1], "temp": 0, "dtemp": 0, "stress0": [0], "state0": [], "time": 0,
            "dtime": 1}"#;
        let c: RunningCall = serde_json::from_str(point).unwrap();
        assert!(matches!(&c, RunningCall::Point(p) if p.increment == 4), "{c:?}");
    }
}
