//! A block of points walked along increments: owned buffers for the inputs and outputs of
//! one block call, made once, so that a step allocates nothing.

use num_complex::Complex64;

use super::routine::{
    BlockInput, BlockOutcome, BlockOutput, BlockRoutine, Conditions, SpecificEnergy, ELASTIC_RESPONSE,
};
use super::settings::BlockSettings;
use super::step::BlockStep;
use crate::routine::Fault;

/// What the block checks that walk the path read: the routine, its properties, the path's
/// increments and the settings, passed to each as one value.
pub struct BlockWalk<'a> {
    pub routine: &'a mut dyn BlockRoutine,
    pub properties: &'a [f64],
    pub incs: &'a [BlockStep],
    pub settings: &'a BlockSettings,
}

impl BlockWalk<'_> {
    /// The same walk for one more check.
    pub fn reborrow(&mut self) -> BlockWalk<'_> {
        BlockWalk {
            routine: &mut *self.routine,
            properties: self.properties,
            incs: self.incs,
            settings: self.settings,
        }
    }
}

/// The input and the output of one call over the buffers of `$b` (a [`BlockBuffers`] or a
/// [`ComplexPoint`]: the same fields in another scalar), written once for both.
macro_rules! call_views {
    ($b:expr, $properties:expr, $conditions:expr, $time:expr, $time_increment:expr, $increment:expr, $elastic:expr) => {
        (
            BlockInput {
                properties: $properties,
                strain: &$b.strain,
                strain_increment: &$b.strain_increment,
                stress_start: &$b.stress_start,
                state_start: &$b.state_start,
                energy_start: &$b.energy_start,
                conditions: $conditions,
                time: $time,
                time_increment: $time_increment,
                increment: $increment,
                elastic_response: $elastic,
            },
            BlockOutput {
                stress: &mut $b.stress,
                state: &mut $b.state,
                energy: &mut $b.energy,
                deleted: &mut $b.deleted,
                outcome: &mut $b.outcome,
            },
        )
    };
}

/// Inputs and outputs of a block of `npoints` points; `step` makes one call and, on success,
/// makes the outputs the next call's start.
#[derive(Clone, Debug)]
pub struct BlockBuffers {
    pub ncomp: usize,
    pub nstate: usize,
    pub strain: Vec<f64>,
    pub strain_increment: Vec<f64>,
    pub stress_start: Vec<f64>,
    pub state_start: Vec<f64>,
    pub energy_start: Vec<SpecificEnergy<f64>>,
    pub conditions: Vec<Conditions>,
    pub stress: Vec<f64>,
    pub state: Vec<f64>,
    pub energy: Vec<SpecificEnergy<f64>>,
    pub deleted: Vec<i32>,
    pub outcome: BlockOutcome,
    pub time: f64,
}

impl BlockBuffers {
    /// A block at rest: zero strain, stress, energy; the given start state for every point.
    pub fn new(npoints: usize, ncomp: usize, state0: &[f64], conditions: Conditions) -> BlockBuffers {
        let nstate = state0.len();
        BlockBuffers {
            ncomp,
            nstate,
            strain: vec![0.0; npoints * ncomp],
            strain_increment: vec![0.0; npoints * ncomp],
            stress_start: vec![0.0; npoints * ncomp],
            state_start: state0.repeat(npoints),
            energy_start: vec![SpecificEnergy::zero(); npoints],
            conditions: vec![conditions; npoints],
            stress: vec![f64::NAN; npoints * ncomp],
            state: vec![f64::NAN; npoints * nstate],
            energy: vec![SpecificEnergy { internal: f64::NAN, dissipated: f64::NAN }; npoints],
            deleted: vec![0; npoints],
            outcome: BlockOutcome::default(),
            time: 0.0,
        }
    }

    pub fn npoints(&self) -> usize {
        self.conditions.len()
    }

    /// One call with the current `strain_increment` (outputs pre-filled with NaN, as the
    /// interface promises). Leaves the start untouched: see [`BlockBuffers::advance`].
    pub fn call(
        &mut self,
        routine: &mut dyn BlockRoutine,
        properties: &[f64],
        time_increment: f64,
        increment: i32,
    ) -> Result<(), Fault> {
        self.stress.fill(f64::NAN);
        self.state.fill(f64::NAN);
        self.energy.fill(SpecificEnergy { internal: f64::NAN, dissipated: f64::NAN });
        self.deleted.fill(-1);
        let elastic_response = increment == 0 && time_increment == 0.0 && self.time == 0.0;
        let (input, mut output) = call_views!(
            self,
            properties,
            &self.conditions,
            self.time,
            time_increment,
            increment,
            elastic_response
        );
        routine.call(&input, &mut output)
    }

    /// The temperature increment of every point in the next call (the path's `dtemp`).
    pub fn set_temperature_increment(&mut self, temperature_increment: f64) {
        for c in &mut self.conditions {
            c.temperature_increment = temperature_increment;
        }
    }

    /// The outputs become the start of the next increment; the temperature moves on by the
    /// call's temperature increment.
    pub fn advance(&mut self, time_increment: f64) {
        for c in &mut self.conditions {
            c.temperature += c.temperature_increment;
        }
        for (e, d) in self.strain.iter_mut().zip(&self.strain_increment) {
            *e += d;
        }
        self.stress_start.copy_from_slice(&self.stress);
        self.state_start.copy_from_slice(&self.state);
        self.energy_start.copy_from_slice(&self.energy);
        self.time += time_increment;
    }

    /// The strain increment of point `p`.
    pub fn increment_of(&mut self, p: usize) -> &mut [f64] {
        &mut self.strain_increment[p * self.ncomp..(p + 1) * self.ncomp]
    }
}

/// Complex inputs and outputs of one point for the twin (block of 1), made once.
#[derive(Clone, Debug)]
pub struct ComplexPoint {
    pub properties: Vec<Complex64>,
    pub strain: Vec<Complex64>,
    pub strain_increment: Vec<Complex64>,
    pub stress_start: Vec<Complex64>,
    pub state_start: Vec<Complex64>,
    pub energy_start: [SpecificEnergy<Complex64>; 1],
    pub stress: Vec<Complex64>,
    pub state: Vec<Complex64>,
    pub energy: [SpecificEnergy<Complex64>; 1],
    pub deleted: [i32; 1],
    pub outcome: BlockOutcome,
}

impl ComplexPoint {
    pub fn new(nproperties: usize, ncomp: usize, nstate: usize) -> ComplexPoint {
        let z = Complex64::new(0.0, 0.0);
        ComplexPoint {
            properties: vec![z; nproperties],
            strain: vec![z; ncomp],
            strain_increment: vec![z; ncomp],
            stress_start: vec![z; ncomp],
            state_start: vec![z; nstate],
            energy_start: [SpecificEnergy { internal: z, dissipated: z }],
            stress: vec![z; ncomp],
            state: vec![z; nstate],
            energy: [SpecificEnergy { internal: z, dissipated: z }],
            deleted: [0],
            outcome: BlockOutcome::default(),
        }
    }

    /// Load point `p` of a real block as the start (imaginary parts zero).
    pub fn load(&mut self, properties: &[f64], b: &BlockBuffers, p: usize) {
        let (c, s) = (b.ncomp, b.nstate);
        let re = |d: &mut [Complex64], v: &[f64]| {
            for (x, y) in d.iter_mut().zip(v) {
                *x = Complex64::new(*y, 0.0);
            }
        };
        re(&mut self.properties, properties);
        re(&mut self.strain, &b.strain[p * c..(p + 1) * c]);
        re(&mut self.strain_increment, &b.strain_increment[p * c..(p + 1) * c]);
        re(&mut self.stress_start, &b.stress_start[p * c..(p + 1) * c]);
        re(&mut self.state_start, &b.state_start[p * s..(p + 1) * s]);
        let e = b.energy_start[p];
        self.energy_start[0] = SpecificEnergy {
            internal: Complex64::new(e.internal, 0.0),
            dissipated: Complex64::new(e.dissipated, 0.0),
        };
    }

    /// One twin call of this point.
    pub fn call(
        &mut self,
        routine: &mut dyn BlockRoutine,
        conditions: &[Conditions],
        time: f64,
        time_increment: f64,
        increment: i32,
    ) -> Result<(), Fault> {
        let nan = Complex64::new(f64::NAN, f64::NAN);
        self.stress.fill(nan);
        self.state.fill(nan);
        let (input, mut output) =
            call_views!(self, &self.properties, conditions, time, time_increment, increment, false);
        routine.call_complex(&input, &mut output)
    }
}

/// Flags of the first call, for routines that want them.
pub fn flags_of(input: &BlockInput<'_, impl Sized>) -> i32 {
    if input.elastic_response {
        ELASTIC_RESPONSE
    } else {
        0
    }
}
