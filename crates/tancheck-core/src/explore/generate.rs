//! Random load paths and their mutations.
//!
//! A fresh path is a few segments, each of one kind: a proportional ramp, a reversal of the
//! previous direction, a cycle (swings back and forth), a non-proportional turn (the direction
//! rotating from the previous one towards a new one increment by increment), or a ramp under
//! mixed control (some stress components held, at zero or at a value within the stress scale).
//! Segment amplitudes are log-uniform from 0.1 to 25 times the strain scale, spread over 1 to
//! 10 increments, with tiny increments (1e-6 to 1e-3 of the scale) mixed in: increment sizes
//! span about seven decades. Temperature increments keep the temperature inside its window;
//! time increments are 1 or log-uniform from 1e-4 to 1e2.
//!
//! A mutation keeps a prefix of a path that reached something new and continues it: a new
//! segment, a reversal of its last increment, or one increment scaled.

use crate::path::{Path, PathIncrement};

use super::random::Rng;

/// What the paths may do, and at which scale.
#[derive(Clone, Debug)]
pub struct Space {
    /// The canonical components (0..6) the routine has.
    pub slots: Vec<usize>,
    /// The strain and stress scale (see [`super::scale`]).
    pub strain: f64,
    pub stress: f64,
    /// Temperatures the path stays within, and the start temperature; None: no temperature
    /// increments.
    pub temperature: Option<(f64, f64)>,
    pub start_temp: f64,
    /// The most increments of a path.
    pub max_increments: usize,
}

/// A path being built: its increments and where it is.
struct Builder<'a> {
    space: &'a Space,
    incs: Vec<PathIncrement>,
    /// The direction of the last segment (unit, canonical).
    last: [f64; 6],
    temp: f64,
}

impl Builder<'_> {
    fn full(&self) -> bool {
        self.incs.len() >= self.space.max_increments
    }

    fn random_direction(&self, rng: &mut Rng) -> [f64; 6] {
        let mut d = [0.0; 6];
        if rng.chance(0.3) {
            d[self.space.slots[rng.below(self.space.slots.len())]] = rng.sign();
        } else {
            for &k in &self.space.slots {
                d[k] = rng.normal();
            }
        }
        unit(d).unwrap_or_else(|| {
            let mut e = [0.0; 6];
            e[self.space.slots[0]] = 1.0;
            e
        })
    }

    fn dtemp(&mut self, rng: &mut Rng, n: usize) -> f64 {
        let Some((lo, hi)) = self.space.temperature else { return 0.0 };
        if !rng.chance(0.6) {
            return 0.0;
        }
        let target = rng.range(lo, hi);
        let dt = (target - self.temp) / n as f64;
        self.temp += dt;
        dt
    }

    fn push(&mut self, dstrain: [f64; 6], dtemp: f64, dtime: f64, hold: Option<[Option<f64>; 6]>) {
        if !self.full() {
            self.incs.push(PathIncrement { dstrain, dtemp, dtime, hold_stress: hold });
        }
    }

    /// The increments of one segment of total amplitude `amp` along `dir(k)`.
    #[allow(clippy::too_many_arguments)]
    fn segment(
        &mut self,
        rng: &mut Rng,
        n: usize,
        amp: f64,
        dir: &dyn Fn(usize) -> [f64; 6],
        dtime: f64,
        hold: Option<[Option<f64>; 6]>,
    ) {
        for k in 0..n {
            let mut size = amp / n as f64;
            if rng.chance(0.08) {
                size = self.space.strain * rng.log_range(1e-6, 1e-3);
            }
            let d = dir(k);
            let dtemp = self.dtemp(rng, n);
            let mut ds = d.map(|x| x * size);
            if let Some(h) = &hold {
                for (x, held) in ds.iter_mut().zip(h) {
                    if held.is_some() {
                        *x = 0.0;
                    }
                }
            }
            self.push(ds, dtemp, dtime, hold);
        }
    }

    fn add_segment(&mut self, rng: &mut Rng) {
        let s = self.space.strain;
        let amp = s * rng.log_range(0.1, 25.0);
        let n = rng.between(1, 10);
        let dtime = if rng.chance(0.7) { 1.0 } else { rng.log_range(1e-4, 1e2) };
        let kind = rng.below(5);
        match kind {
            // A reversal of the previous direction, far enough to yield again.
            0 if self.incs.is_empty() => self.ramp(rng, n, amp, dtime),
            0 => {
                let d = self.last.map(|x| -x);
                let amp = amp.max(2.0 * s) * 1.5;
                self.segment(rng, n, amp, &|_| d, dtime, None);
                self.last = d;
            }
            // A cycle: half-cycles of alternating sense.
            1 => {
                let d = self.random_direction(rng);
                let swings = rng.between(2, 4);
                let per = rng.between(1, 4);
                for w in 0..swings {
                    let sign = if w % 2 == 0 { 1.0 } else { -1.0 };
                    let a = if w == 0 { amp } else { 2.0 * amp };
                    let dd = d.map(|x| x * sign);
                    self.segment(rng, per, a, &|_| dd, dtime, None);
                }
                self.last = d;
            }
            // A non-proportional turn from the last direction towards a new one.
            2 => {
                let from = if self.incs.is_empty() { self.random_direction(rng) } else { self.last };
                let to = orthogonal(self.random_direction(rng), &from).unwrap_or(from);
                let angle = rng.range(0.2, std::f64::consts::PI);
                let nn = n.max(2);
                let turn = move |k: usize| {
                    let t = angle * (k as f64 + 0.5) / nn as f64;
                    std::array::from_fn(|i| t.cos() * from[i] + t.sin() * to[i])
                };
                self.segment(rng, nn, amp, &turn, dtime, None);
                let t = angle;
                self.last = std::array::from_fn(|i| t.cos() * from[i] + t.sin() * to[i]);
            }
            // Mixed control: some components' stresses held.
            3 if self.space.slots.len() > 1 => {
                let free = self.space.slots[rng.below(self.space.slots.len())];
                let mut hold = [None; 6];
                for &k in &self.space.slots {
                    if k != free && rng.chance(0.6) {
                        hold[k] = Some(if rng.chance(0.7) {
                            0.0
                        } else {
                            rng.range(-0.8, 0.8) * self.space.stress
                        });
                    }
                }
                if hold.iter().all(Option::is_none) {
                    let other = self.space.slots.iter().copied().find(|&k| k != free).expect("two slots");
                    hold[other] = Some(0.0);
                }
                let mut d = [0.0; 6];
                d[free] = rng.sign();
                self.segment(rng, n, amp, &|_| d, dtime, Some(hold));
                self.last = d;
            }
            _ => self.ramp(rng, n, amp, dtime),
        }
    }

    fn ramp(&mut self, rng: &mut Rng, n: usize, amp: f64, dtime: f64) {
        let d = self.random_direction(rng);
        self.segment(rng, n, amp, &|_| d, dtime, None);
        self.last = d;
    }
}

/// `d` scaled to unit length, or None for a zero vector.
fn unit(d: [f64; 6]) -> Option<[f64; 6]> {
    let n = d.iter().map(|x| x * x).sum::<f64>().sqrt();
    (n > 0.0 && n.is_finite()).then(|| d.map(|x| x / n))
}

/// The part of `d` orthogonal to the unit vector `e`, unit.
fn orthogonal(d: [f64; 6], e: &[f64; 6]) -> Option<[f64; 6]> {
    let p: f64 = d.iter().zip(e).map(|(a, b)| a * b).sum();
    let r: [f64; 6] = std::array::from_fn(|i| d[i] - p * e[i]);
    let n = r.iter().map(|x| x * x).sum::<f64>().sqrt();
    (n > 1e-6).then(|| r.map(|x| x / n))
}

/// A fresh random path of one to five segments.
pub fn fresh(space: &Space, rng: &mut Rng, name: String) -> Path {
    let mut b = Builder { space, incs: Vec::new(), last: [0.0; 6], temp: space.start_temp };
    let segments = rng.between(1, 5);
    for _ in 0..segments {
        if b.full() {
            break;
        }
        b.add_segment(rng);
    }
    Path { name, increments: b.incs }
}

/// A mutation of `parent`: a prefix of it, continued.
pub fn mutate(space: &Space, rng: &mut Rng, parent: &Path, name: String) -> Path {
    let keep = rng.between(1, parent.increments.len().max(1)).min(parent.increments.len());
    let incs: Vec<PathIncrement> = parent.increments[..keep].to_vec();
    let temp = space.start_temp + incs.iter().map(|i| i.dtemp).sum::<f64>();
    let last = incs.last().and_then(|i| unit(i.dstrain)).unwrap_or([0.0; 6]);
    let mut b = Builder { space, incs, last, temp };
    match rng.below(4) {
        // Reverse the last increment's direction, far.
        0 if last != [0.0; 6] => {
            let d = last.map(|x| -x);
            let amp = space.strain * rng.log_range(1.0, 30.0);
            let n = rng.between(1, 6);
            b.segment(rng, n, amp, &|_| d, 1.0, None);
            b.last = d;
        }
        // Scale one kept increment by 0.1 to 10.
        1 => {
            let i = rng.below(b.incs.len());
            let f = rng.log_range(0.1, 10.0);
            for x in &mut b.incs[i].dstrain {
                *x *= f;
            }
            b.add_segment(rng);
        }
        _ => {
            let extra = rng.between(1, 2);
            for _ in 0..extra {
                b.add_segment(rng);
            }
        }
    }
    if b.incs.is_empty() {
        return fresh(space, rng, name);
    }
    Path { name, increments: b.incs }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn space() -> Space {
        Space {
            slots: vec![0, 1, 2, 3, 4, 5],
            strain: 1e-3,
            stress: 300.0,
            temperature: Some((20.0, 220.0)),
            start_temp: 20.0,
            max_increments: 40,
        }
    }

    #[test]
    fn paths_are_valid_varied_and_reproducible() {
        let s = space();
        let mut rng = Rng::new(3);
        let (mut held, mut heated, mut reversed, mut tiny, mut large) = (0, 0, 0, 0, 0);
        for k in 0..200 {
            let p = fresh(&s, &mut rng, format!("p{k}"));
            p.validate().unwrap();
            assert!(p.increments.len() <= 40);
            let mut temp = 20.0;
            for w in p.increments.windows(2) {
                let dot: f64 = w[0].dstrain.iter().zip(&w[1].dstrain).map(|(a, b)| a * b).sum();
                reversed += usize::from(dot < 0.0);
            }
            for i in &p.increments {
                held += usize::from(i.hold_stress.is_some());
                heated += usize::from(i.dtemp != 0.0);
                temp += i.dtemp;
                assert!((19.999..=220.001).contains(&temp), "{temp}");
                let size = i.dstrain.iter().fold(0.0f64, |m, x| m.max(x.abs()));
                tiny += usize::from(size > 0.0 && size < 1e-6);
                large += usize::from(size > 2e-3);
            }
            let m = mutate(&s, &mut rng, &p, format!("m{k}"));
            m.validate().unwrap();
        }
        for (what, n) in
            [("held", held), ("heated", heated), ("reversed", reversed), ("tiny", tiny), ("large", large)]
        {
            assert!(n > 20, "{what}: only {n}");
        }
        let a = fresh(&s, &mut Rng::new(9), "a".into());
        let b = fresh(&s, &mut Rng::new(9), "a".into());
        assert_eq!(a, b);
    }
}
