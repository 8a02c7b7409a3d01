//! The convergence controller: decides, iteration by iteration, whether DIIS extrapolates and
//! how much level shifting and damping are applied, escalating when progress stalls, and
//! writes down what it tried so a failure can say so.
//!
//! Stages (each entered when the best RMS commutator has not halved for `PATIENCE`
//! iterations, or the commutator blows up to 1e3 × its best):
//! 0. DIIS (with the user's level shift / damping, if any);
//! 1. DIIS on a level-shifted Fock matrix, shift ≥ 0.5 Eh (Saunders & Hillier, Int. J.
//!    Quantum Chem. 7 (1973) 699): virtual orbitals pushed up, so occupied–virtual mixing
//!    per step is smaller and oscillating occupations settle;
//! 2. no DIIS, damping 0.5 (Hartree's density mixing) with shift 1.0 Eh for `DAMP_STEPS`
//!    iterations, then DIIS again with the shift kept (stage 3).

/// Iterations without halving the best commutator before escalating.
pub const PATIENCE: usize = 15;
/// Iterations of pure damping in stage 2.
pub const DAMP_STEPS: usize = 10;

/// What the next step does.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Step {
    pub diis: bool,
    pub level_shift: f64,
    pub damping: f64,
}

#[derive(Debug, Clone)]
pub struct Controller {
    stage: usize,
    stage_start: usize,
    best_rms: f64,
    best_iter: usize,
    overall_best: (f64, usize),
    user_shift: f64,
    user_damping: f64,
    attempts: Vec<String>,
}

impl Controller {
    pub fn new(level_shift: f64, damping: f64) -> Self {
        let mut c = Controller {
            stage: 0,
            stage_start: 1,
            best_rms: f64::INFINITY,
            best_iter: 1,
            overall_best: (f64::INFINITY, 0),
            user_shift: level_shift.max(0.0),
            user_damping: damping.clamp(0.0, 0.95),
            attempts: Vec::new(),
        };
        c.attempts.push(c.stage_name(1));
        c
    }

    fn step_of(&self, stage: usize) -> Step {
        match stage {
            0 => Step {
                diis: true,
                level_shift: self.user_shift,
                damping: self.user_damping,
            },
            1 => Step {
                diis: true,
                level_shift: self.user_shift.max(0.5),
                damping: 0.0,
            },
            2 => Step {
                diis: false,
                level_shift: self.user_shift.max(1.0),
                damping: self.user_damping.max(0.5),
            },
            _ => Step {
                diis: true,
                level_shift: self.user_shift.max(1.0),
                damping: 0.0,
            },
        }
    }

    fn stage_name(&self, from_iter: usize) -> String {
        let s = self.step_of(self.stage);
        let mut parts = Vec::new();
        if s.diis {
            parts.push("DIIS".to_string());
        }
        if s.damping > 0.0 {
            parts.push(format!("damping {:.2}", s.damping));
        }
        if s.level_shift > 0.0 {
            parts.push(format!("level shift {:.2} Eh", s.level_shift));
        }
        if parts.is_empty() {
            parts.push("plain Roothaan steps".into());
        }
        format!("{} from iteration {}", parts.join(" + "), from_iter)
    }

    /// Record the RMS commutator of iteration `iter` and return what the step should do.
    pub fn step(&mut self, iter: usize, rms: f64) -> Step {
        if rms < self.overall_best.0 {
            self.overall_best = (rms, iter);
        }
        if rms < 0.5 * self.best_rms {
            self.best_rms = rms;
            self.best_iter = iter;
        }
        let stalled = iter >= self.best_iter + PATIENCE;
        let blown = rms > 1e3 * self.best_rms && iter > self.stage_start + 2;
        let damp_done = self.stage == 2 && iter >= self.stage_start + DAMP_STEPS;
        if (self.stage < 3 && (stalled || blown)) || damp_done {
            self.stage += 1;
            self.stage_start = iter;
            self.best_rms = rms;
            self.best_iter = iter;
            let name = self.stage_name(iter);
            self.attempts.push(name);
        }
        self.step_of(self.stage)
    }

    /// Whether DIIS history must be cleared (a new stage changes the Fock matrices' meaning).
    pub fn stage_started_at(&self) -> usize {
        self.stage_start
    }

    pub fn attempts(&self) -> String {
        self.attempts.join("; ")
    }

    pub fn best(&self) -> (f64, usize) {
        self.overall_best
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steady_progress_stays_in_diis() {
        let mut c = Controller::new(0.0, 0.0);
        for it in 1..40 {
            let s = c.step(it, 10f64.powi(-(it as i32)));
            assert!(s.diis && s.level_shift == 0.0 && s.damping == 0.0);
        }
    }

    #[test]
    fn stalling_escalates_and_is_reported() {
        let mut c = Controller::new(0.0, 0.0);
        let mut shifts = Vec::new();
        for it in 1..80 {
            shifts.push(c.step(it, 1e-3));
        }
        assert!(shifts.iter().any(|s| s.level_shift >= 0.5 && s.diis));
        assert!(shifts.iter().any(|s| !s.diis && s.damping > 0.0));
        let a = c.attempts();
        assert!(a.contains("level shift") && a.contains("damping"), "{a}");
    }
}
