//! Chemical equilibrium of the twelve product species (N2, O2, Ar, CO2,
//! H2O, CO, H2, OH, O, H, NO, N) of an ideal-gas mixture at a given
//! temperature and pressure, by minimising the Gibbs energy for fixed
//! element totals.
//!
//! The method is the element-potential Newton iteration of Gordon and
//! McBride (NASA RP-1311, 1994, chapter 2, the "TP" problem without
//! condensed species): unknowns are the corrections to each species' log
//! moles, found from one linear system in the element potentials and the
//! correction to the log of the total moles; steps are damped as that
//! report describes (no log step above 2 for the main species, and minor
//! species not carried above a mole fraction of 1e-4 in one step).
//! Iteration stops when the correction to the log of the total moles is
//! below 1e-11 and every species' log-mole correction, weighted by its mole
//! fraction over 1e-3, is too (far tighter than the report's test: a
//! species at a mole fraction of 1e-3 or more converges to 1e-11 of
//! itself, one at 1e-9 to 1e-5 at worst, and in practice the quadratic last
//! steps take them all much further); the cap is 300 iterations, and not
//! converging is an error, never a silent answer.
//!
//! Chemical potential of species j over RT:
//! `mu_j/RT = g0_j(T)/RT + ln(n_j / n) + ln(p / p0)` with the standard state
//! at `p0` = 1e5 Pa (that of NASA TM-4513, the source of the polynomials).
//! A species containing an element absent from the mixture is left out.

use super::species::{SPECIES_COUNT, Species};
use super::{GasError, MixtureBuilder};

/// Standard-state pressure of the species data, Pa (NASA TM-4513: 1 bar).
pub const P_STANDARD: f64 = 1.0e5;

const MAX_ITERATIONS: u32 = 300;
const TOLERANCE: f64 = 1e-11;
/// Mole fraction below which a species' log correction is scaled down
/// in the convergence test (a species at 1e-9 converges to 1e-8 of itself).
const TRACE: f64 = 1e-3;
const NE: usize = 5;

/// The equilibrium composition (kmol of each species, in the order of
/// [`Species::ALL`]) of a mixture with the element totals of `start` at
/// temperature `t` (K) and pressure `p` (Pa). `start` also seeds the
/// iteration where it holds the species (a previous solution converges
/// in a few steps).
pub fn solve(start: &MixtureBuilder, t: f64, p: f64) -> Result<[f64; SPECIES_COUNT], GasError> {
    if !(t.is_finite() && (200.0..=6000.0).contains(&t)) {
        return Err(GasError::OutOfRange {
            t,
            min: 200.0,
            max: 6000.0,
            model: "equilibrium",
        });
    }
    if !(p.is_finite() && p > 0.0) {
        return Err(GasError::BadParameter {
            what: "equilibrium pressure",
            value: p,
            why: "it must be positive",
        });
    }
    let b0 = start.elements();
    let total: f64 = b0.iter().sum();
    if !(total.is_finite() && total > 0.0 && b0.iter().all(|b| *b >= 0.0)) {
        return Err(GasError::BadParameter {
            what: "element totals",
            value: total,
            why: "an equilibrium needs positive amounts of its elements",
        });
    }
    // Elements present, and the species made only of them.
    let present: [bool; NE] = std::array::from_fn(|k| b0[k] > 1e-14 * total);
    let active: Vec<usize> = (0..SPECIES_COUNT)
        .filter(|&j| {
            Species::ALL[j]
                .atoms()
                .iter()
                .enumerate()
                .all(|(k, a)| *a == 0.0 || present[k])
        })
        .collect();
    let elems: Vec<usize> = (0..NE).filter(|&k| present[k]).collect();
    let a: Vec<[f64; NE]> = active.iter().map(|&j| Species::ALL[j].atoms()).collect();
    let g0: Vec<f64> = active
        .iter()
        .map(|&j| Species::ALL[j].g0_rt(t) + (p / P_STANDARD).ln())
        .collect();
    // Start: the given moles where positive, a small floor elsewhere.
    let given = start.all_moles();
    let n_start: f64 = given.iter().filter(|x| **x > 0.0).sum();
    let mut ln_nj: Vec<f64> = active
        .iter()
        .map(|&j| given[j].max(1e-6 * n_start).ln())
        .collect();
    let mut ln_n = n_start.ln();
    let m = elems.len() + 1;
    let mut last = f64::INFINITY;
    for _ in 0..MAX_ITERATIONS {
        let nj: Vec<f64> = ln_nj.iter().map(|x| x.exp()).collect();
        let n = ln_n.exp();
        let sum_n: f64 = nj.iter().sum();
        let mu: Vec<f64> = (0..active.len()).map(|q| g0[q] + ln_nj[q] - ln_n).collect();
        // The linear system: rows for each element, then the total.
        let mut mat = vec![vec![0.0; m + 1]; m];
        for (r, &k) in elems.iter().enumerate() {
            for (c, &i) in elems.iter().enumerate() {
                mat[r][c] = (0..active.len()).map(|q| a[q][k] * a[q][i] * nj[q]).sum();
            }
            let akn: f64 = (0..active.len()).map(|q| a[q][k] * nj[q]).sum();
            mat[r][m - 1] = akn;
            let amu: f64 = (0..active.len()).map(|q| a[q][k] * nj[q] * mu[q]).sum();
            mat[r][m] = b0[k] - akn + amu;
        }
        for (c, &i) in elems.iter().enumerate() {
            mat[m - 1][c] = (0..active.len()).map(|q| a[q][i] * nj[q]).sum();
        }
        mat[m - 1][m - 1] = sum_n - n;
        let nmu: f64 = (0..active.len()).map(|q| nj[q] * mu[q]).sum();
        mat[m - 1][m] = n - sum_n + nmu;
        let x = gauss(mat).ok_or(GasError::NoConvergence {
            what: "chemical equilibrium (singular element matrix)",
            iterations: 0,
            residual: f64::NAN,
        })?;
        let d_ln_n = x[m - 1];
        let d: Vec<f64> = (0..active.len())
            .map(|q| {
                -mu[q]
                    + elems
                        .iter()
                        .enumerate()
                        .map(|(c, &k)| a[q][k] * x[c])
                        .sum::<f64>()
                    + d_ln_n
            })
            .collect();
        // Damping (RP-1311 eq. 3.1 to 3.3).
        let mut big = 5.0 * d_ln_n.abs();
        let mut lambda2 = f64::INFINITY;
        for q in 0..active.len() {
            let frac = ln_nj[q] - ln_n;
            if frac > -18.420681 {
                if d[q] > 0.0 {
                    big = big.max(d[q].abs());
                }
            } else if d[q] >= 0.0 && (d[q] - d_ln_n).abs() > 0.0 {
                lambda2 = lambda2.min(((-frac - 9.2103404) / (d[q] - d_ln_n)).abs());
            }
        }
        let lambda1 = if big > 2.0 { 2.0 / big } else { 1.0 };
        let lambda = 1f64.min(lambda1).min(lambda2);
        // Each species' correction weighted by its mole fraction: a species
        // near 1e-10 of the mixture is fixed by a difference of element
        // totals near 1e-16 relative, so its own log correction has a
        // round-off floor; weighted, it converges like the rest.
        let worst = d
            .iter()
            .zip(&nj)
            .map(|(dq, x)| dq.abs() * (x / sum_n) / TRACE)
            .fold(d_ln_n.abs(), f64::max);
        for q in 0..active.len() {
            ln_nj[q] += lambda * d[q];
            // Species far below anything measurable are held at a floor
            // (their exponent would otherwise underflow).
            ln_nj[q] = ln_nj[q].max(ln_n - 230.0);
        }
        ln_n += lambda * d_ln_n;
        last = worst;
        if worst < TOLERANCE && lambda == 1.0 {
            let mut out = [0.0; SPECIES_COUNT];
            for (q, &j) in active.iter().enumerate() {
                out[j] = ln_nj[q].exp();
            }
            return Ok(out);
        }
    }
    Err(GasError::NoConvergence {
        what: "chemical equilibrium of the products",
        iterations: MAX_ITERATIONS,
        residual: last,
    })
}

/// Solve a small dense system (augmented matrix) by Gaussian elimination
/// with partial pivoting; `None` when singular.
fn gauss(mut a: Vec<Vec<f64>>) -> Option<Vec<f64>> {
    let m = a.len();
    for col in 0..m {
        let piv = (col..m).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[piv][col].is_nan() || a[piv][col].abs() <= 1e-300 {
            return None;
        }
        a.swap(col, piv);
        let pivot_row = a[col].clone();
        for row in a.iter_mut().skip(col + 1) {
            let f = row[col] / pivot_row[col];
            if f != 0.0 {
                for (x, p) in row.iter_mut().zip(&pivot_row).skip(col) {
                    *x -= f * p;
                }
            }
        }
    }
    let mut x = vec![0.0; m];
    for r in (0..m).rev() {
        let s: f64 = (r + 1..m).map(|c| a[r][c] * x[c]).sum();
        x[r] = (a[r][m] - s) / a[r][r];
        if !x[r].is_finite() {
            return None;
        }
    }
    Some(x)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Composition, Fuel};

    #[test]
    fn elements_are_conserved_and_the_gibbs_conditions_hold() {
        // Independent relations: element totals unchanged, and at the
        // solution every species' potential equals the sum of its atoms'
        // element potentials, so the reaction CO2 = CO + 1/2 O2 has
        // ln(x_CO x_O2^0.5 / x_CO2) = -(dG0/RT) - 0.5 ln(p/p0).
        let c = Composition::dry_air().burnt(0.05, Fuel::KEROSENE).unwrap();
        let b = c.builder();
        let (t, p) = (2400.0, 2.0e6);
        let n = solve(&b, t, p).unwrap();
        let mut eq = MixtureBuilder::default();
        for (s, k) in Species::ALL.iter().zip(n) {
            eq.add_moles(*s, k);
        }
        for (x, y) in b.elements().iter().zip(eq.elements()) {
            assert!((x - y).abs() <= 1e-12 * x.abs().max(1e-30), "{x} {y}");
        }
        let total: f64 = n.iter().sum();
        let x = |s: Species| n[s as usize] / total;
        let lhs = (x(Species::CO) * x(Species::O2).sqrt() / x(Species::CO2)).ln();
        let dg = Species::CO.g0_rt(t) + 0.5 * Species::O2.g0_rt(t) - Species::CO2.g0_rt(t);
        let rhs = -dg - 0.5 * (p / P_STANDARD).ln();
        assert!((lhs - rhs).abs() < 1e-9, "{lhs} {rhs}");
    }

    #[test]
    fn cold_products_are_the_complete_products() {
        // At 800 K dissociation is negligible: the main species within
        // 1e-4 of the complete products (some nitric oxide forms from the
        // excess oxygen, as it does at equilibrium), carbon monoxide below
        // 1e-12 of the carbon dioxide.
        let c = Composition::dry_air().burnt(0.02, Fuel::KEROSENE).unwrap();
        let b = c.builder();
        let n = solve(&b, 800.0, 1.0e5).unwrap();
        for s in [Species::CO2, Species::H2O, Species::O2, Species::N2] {
            let want = b.moles(s);
            assert!((n[s as usize] - want).abs() < 1e-4 * want, "{s:?}");
        }
        assert!(n[Species::CO as usize] < 1e-12 * b.moles(Species::CO2));
    }

    #[test]
    fn refuses_what_it_cannot_solve() {
        let b = Composition::dry_air().builder();
        assert!(solve(&b, 100.0, 1e5).is_err());
        assert!(solve(&b, 2000.0, -1.0).is_err());
        assert!(solve(&MixtureBuilder::default(), 2000.0, 1e5).is_err());
    }
}
