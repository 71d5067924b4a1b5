//! Goals solved together.
//!
//! Each goal is first met on its own by bracketing (Brent on its low to
//! high range, in `solve_goals`). When two or more goals are active, each
//! one's solution moves the others' targets, so the set is then solved
//! together by Newton's method: residuals r_i = (value_i - target_i) /
//! |target_i|, a Jacobian by forward differences from incremental
//! recomputes, the step damped by halving until the largest residual
//! falls, and every varied given kept inside its goal's range. A goal
//! that is not met to the tolerance afterwards is a problem naming what
//! it reached and its residual, never a silent "met".

use super::Engine;
use crate::book::Goal;

/// Largest relative residual a goal may keep and be met.
pub const GOAL_TOLERANCE: f64 = 1e-9;

/// Most Newton iterations of the coupled solve.
const NEWTON_CAP: u32 = 40;

impl Engine {
    /// The residuals of the goals `active` at the current state (None
    /// where a target is not computed).
    fn goal_residuals(&self, goals: &[Goal], active: &[usize]) -> Option<Vec<f64>> {
        active
            .iter()
            .map(|&i| {
                let g = &goals[i];
                let t = g.value.si();
                let v = self.value(&g.target).ok().flatten()?;
                Some((v - t) / t.abs().max(1e-12))
            })
            .collect()
    }

    /// Set the varied givens of `active` to `x` and recompute.
    fn goal_state(&mut self, goals: &[Goal], active: &[usize], x: &[f64]) -> bool {
        for (&i, &xi) in active.iter().zip(x) {
            if self.set_si_quiet(&goals[i].vary, xi).is_err() {
                return false;
            }
        }
        self.run_nodes();
        true
    }

    /// Newton's method over every goal met on its own (see the module).
    pub(super) fn couple_goals(&mut self, goals: &[Goal]) {
        let active: Vec<usize> = (0..goals.len())
            .filter(|&i| !goals[i].off && self.goals.get(i).is_some_and(|o| o.value.is_some()))
            .collect();
        if active.len() < 2 {
            return;
        }
        let bounds: Vec<(f64, f64)> = active
            .iter()
            .map(|&i| (goals[i].low.si(), goals[i].high.si()))
            .collect();
        let mut x: Vec<f64> = active
            .iter()
            .map(|&i| self.goals[i].value.unwrap_or(f64::NAN))
            .collect();
        let start = x.clone();
        let norm = |r: &[f64]| r.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let mut evaluations = 0u32;
        let mut failed: Option<String> = None;
        for _ in 0..NEWTON_CAP {
            evaluations += 1;
            if !self.goal_state(goals, &active, &x) {
                failed = Some("a varied given could not be set".into());
                break;
            }
            let Some(r) = self.goal_residuals(goals, &active) else {
                failed = Some("a target is not computed at the coupled solution".into());
                break;
            };
            let n0 = norm(&r);
            if n0 < 0.1 * GOAL_TOLERANCE {
                break;
            }
            // Jacobian by forward differences, stepping inward from a bound.
            let n = active.len();
            let mut jac = vec![vec![0.0; n]; n];
            let mut ok = true;
            for j in 0..n {
                let (lo, hi) = bounds[j];
                let mut h = 1e-7 * x[j].abs().max(1e-3 * (hi - lo));
                if x[j] + h > hi {
                    h = -h;
                }
                let mut xp = x.clone();
                xp[j] += h;
                evaluations += 1;
                let rp = if self.goal_state(goals, &active, &xp) {
                    self.goal_residuals(goals, &active)
                } else {
                    None
                };
                match rp {
                    Some(rp) => {
                        for i in 0..n {
                            jac[i][j] = (rp[i] - r[i]) / h;
                        }
                    }
                    None => {
                        ok = false;
                        break;
                    }
                }
            }
            let Some(dx) = ok
                .then(|| solve_linear(jac, r.iter().map(|v| -v).collect()))
                .flatten()
            else {
                failed = Some(
                    "the goals do not move their targets independently (singular Jacobian)".into(),
                );
                break;
            };
            // Damped: halve the step until the largest residual falls.
            let mut alpha = 1.0;
            let mut taken = false;
            for _ in 0..16 {
                let xn: Vec<f64> = x
                    .iter()
                    .zip(&dx)
                    .zip(&bounds)
                    .map(|((xi, di), (lo, hi))| (xi + alpha * di).clamp(*lo, *hi))
                    .collect();
                evaluations += 1;
                if self.goal_state(goals, &active, &xn)
                    && let Some(rn) = self.goal_residuals(goals, &active)
                    && norm(&rn) < n0
                {
                    x = xn;
                    taken = true;
                    break;
                }
                alpha *= 0.5;
            }
            if !taken {
                failed = Some(format!(
                    "the coupled solve stalled with a largest residual of {:.3e}",
                    n0
                ));
                break;
            }
        }
        // A failed coupled solve leaves the values met one by one.
        if failed.is_some() {
            x = start;
        }
        self.goal_state(goals, &active, &x);
        for (k, &i) in active.iter().enumerate() {
            let o = &mut self.goals[i];
            o.value = Some(x[k]);
            o.iterations += evaluations;
            if let Some(why) = &failed {
                o.problem = Some(why.clone());
            }
        }
    }

    /// What each goal reached and its residual; a goal off its target by
    /// more than the tolerance is a problem that says so.
    pub(super) fn report_goals(&mut self, goals: &[Goal]) {
        for (i, g) in goals.iter().enumerate() {
            if g.off {
                continue;
            }
            let t = g.value.si();
            let reached = self.value(&g.target).ok().flatten();
            let Some(o) = self.goals.get_mut(i) else {
                continue;
            };
            if o.value.is_none() {
                continue;
            }
            o.reached = reached;
            o.residual = reached.map(|v| (v - t) / t.abs().max(1e-12));
            match o.residual {
                Some(r) if r.abs() <= GOAL_TOLERANCE => {}
                Some(r) => {
                    let more = o
                        .problem
                        .take()
                        .map_or(String::new(), |p| format!(" ({p})"));
                    o.problem = Some(format!(
                        "{} not met: reached {} (SI) for a target of {}, residual {:+.3e} after {} evaluations{more}",
                        g.target,
                        crate::report::sig(reached.unwrap_or(f64::NAN), 8),
                        g.value.text(),
                        r,
                        o.iterations
                    ));
                }
                None => {
                    o.problem = Some(format!("{} is not computed at the solution", g.target));
                }
            }
        }
    }
}

/// Solve `a x = b` by Gaussian elimination with partial pivoting; None
/// when `a` is singular.
fn solve_linear(mut a: Vec<Vec<f64>>, mut b: Vec<f64>) -> Option<Vec<f64>> {
    let n = b.len();
    let scale = a
        .iter()
        .flatten()
        .fold(0.0f64, |m, v| m.max(v.abs()))
        .max(f64::MIN_POSITIVE);
    for c in 0..n {
        let p = (c..n).max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))?;
        if a[p][c].abs() <= 1e-14 * scale {
            return None;
        }
        a.swap(c, p);
        b.swap(c, p);
        let pivot = a[c].clone();
        for r in c + 1..n {
            let f = a[r][c] / pivot[c];
            for (x, p) in a[r].iter_mut().zip(&pivot).skip(c) {
                *x -= f * p;
            }
            b[r] -= f * b[c];
        }
    }
    let mut x = vec![0.0; n];
    for c in (0..n).rev() {
        let s: f64 = (c + 1..n).map(|k| a[c][k] * x[k]).sum();
        x[c] = (b[c] - s) / a[c][c];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn solve_linear_solves_a_small_system_and_refuses_a_singular_one() {
        // 2x + y = 5, x - 3y = -8: x = 1, y = 3 (by hand).
        let x = solve_linear(vec![vec![2.0, 1.0], vec![1.0, -3.0]], vec![5.0, -8.0]).unwrap();
        assert!((x[0] - 1.0).abs() < 1e-14 && (x[1] - 3.0).abs() < 1e-14);
        assert!(solve_linear(vec![vec![1.0, 2.0], vec![2.0, 4.0]], vec![1.0, 2.0]).is_none());
    }
}
