//! Root finders with explicit stop reasons, below the gas models.
//!
//! Every iterative relation in the crate goes through here, the gas
//! models' temperature inversions included: a safeguarded
//! Newton method on a monotone residual inside a bracket (Newton when the
//! step stays inside, bisection when it does not), and a derivative-free
//! Brent method for residuals without a cheap slope. Both cap their
//! iterations and say why they stopped; the caller turns a failure into a
//! problem naming the station or relation.

/// Why a solver stopped without a root.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Failure {
    /// The iteration cap was reached; `residual` is the last one.
    IterationCap {
        /// Iterations made.
        iterations: u32,
        /// Last residual.
        residual: f64,
    },
    /// The bracket closed on a jump: the residual changes sign there
    /// without passing through zero (a target that switches, such as a
    /// nozzle's choked flag).
    Jump {
        /// Where the bracket closed.
        at: f64,
        /// The residual there.
        residual: f64,
    },
    /// No sign change inside the bracket: no root there.
    NoRoot {
        /// Residual at the low end.
        at_lo: f64,
        /// Residual at the high end.
        at_hi: f64,
    },
}

/// Failure of the solver, or an error from the residual itself.
#[derive(Debug, Clone, PartialEq)]
pub enum SolveError<E> {
    /// The residual function failed (a temperature out of range, say).
    Inner(E),
    /// The solver itself stopped.
    Stopped(Failure),
}

impl<E> From<E> for SolveError<E> {
    fn from(e: E) -> Self {
        SolveError::Inner(e)
    }
}

/// Newton's method on a residual that is monotone in `x` on `[lo, hi]`.
///
/// `f(x)` returns the residual and its slope; `increasing` says whether the
/// residual grows with `x`, which lets every evaluation shrink the bracket
/// without evaluating its ends. Converges when the step is below `xtol`
/// (relative) and the residual below `rtol` (absolute, residuals are
/// expected to be scaled to order one).
#[allow(clippy::too_many_arguments)]
pub fn newton_monotone<E>(
    f: impl FnMut(f64) -> Result<(f64, f64), E>,
    lo: f64,
    hi: f64,
    x0: f64,
    increasing: bool,
    xtol: f64,
    rtol: f64,
    max_iter: u32,
) -> Result<f64, SolveError<E>> {
    let floor = (hi - lo).abs() * 1e-15;
    newton_monotone_floor(f, lo, hi, x0, increasing, xtol, floor, rtol, max_iter)
}

/// [`newton_monotone`] with the absolute floor of the step tolerance
/// given: a step counts as converged below `xtol |x| + floor`. The gas
/// inversions use a zero floor (a purely relative tolerance), since their
/// bracket reaches 10^7 K for a calorically perfect gas.
#[allow(clippy::too_many_arguments)]
pub fn newton_monotone_floor<E>(
    mut f: impl FnMut(f64) -> Result<(f64, f64), E>,
    lo: f64,
    hi: f64,
    x0: f64,
    increasing: bool,
    xtol: f64,
    floor: f64,
    rtol: f64,
    max_iter: u32,
) -> Result<f64, SolveError<E>> {
    let (mut lo, mut hi) = (lo, hi);
    let mut x = if x0 > lo && x0 < hi {
        x0
    } else {
        0.5 * (lo + hi)
    };
    let mut last = f64::NAN;
    for _ in 0..max_iter {
        let (r, d) = f(x)?;
        last = r;
        if r == 0.0 {
            return Ok(x);
        }
        // Root lies above x when the residual is below zero on a rising curve.
        if (r < 0.0) == increasing {
            lo = x;
        } else {
            hi = x;
        }
        let newton = x - r / d;
        let tol = xtol * x.abs() + floor;
        // A Newton step within the tolerance is convergence, even where it
        // rounds onto the bracket end just moved to x (at the last bit of
        // precision the step can vanish): bisecting then would walk the
        // whole bracket back for nothing.
        if newton.is_finite() && r.abs() <= rtol && (newton - x).abs() <= tol {
            return Ok(newton.clamp(lo.min(hi), hi.max(lo)));
        }
        let mut next = newton;
        if !(next.is_finite() && next > lo && next < hi) {
            next = 0.5 * (lo + hi);
        }
        let step = (next - x).abs();
        if r.abs() <= rtol && step <= tol {
            return Ok(next);
        }
        if hi - lo <= tol {
            // The bracket has collapsed: a root only if the residual
            // changes sign across it.
            if r.abs() <= rtol {
                return Ok(x);
            }
            let (r_lo, _) = f(lo)?;
            let (r_hi, _) = f(hi)?;
            if r_lo.signum() == r_hi.signum() {
                return Err(SolveError::Stopped(Failure::NoRoot {
                    at_lo: r_lo,
                    at_hi: r_hi,
                }));
            }
            return Ok(0.5 * (lo + hi));
        }
        x = next;
    }
    Err(SolveError::Stopped(Failure::IterationCap {
        iterations: max_iter,
        residual: last,
    }))
}

/// Brent's method on `[a, b]`, which must bracket a sign change.
pub fn brent<E>(
    mut f: impl FnMut(f64) -> Result<f64, E>,
    a: f64,
    b: f64,
    xtol: f64,
    max_iter: u32,
) -> Result<f64, SolveError<E>> {
    let (mut a, mut b) = (a, b);
    let mut fa = f(a)?;
    let mut fb = f(b)?;
    // A continuous residual is tiny where the bracket closes; one that is
    // still a good part of the residuals at the ends has jumped there. The
    // floor keeps round-off of a continuous residual (an end that happens
    // to lie next to the root makes the first term vanish) from reading as
    // a jump.
    let jump = (1e-3 * fa.abs().min(fb.abs())).max(1e-12 * fa.abs().max(fb.abs()));
    if fa == 0.0 {
        return Ok(a);
    }
    if fb == 0.0 {
        return Ok(b);
    }
    if fa.signum() == fb.signum() {
        return Err(SolveError::Stopped(Failure::NoRoot {
            at_lo: fa,
            at_hi: fb,
        }));
    }
    if fa.abs() < fb.abs() {
        std::mem::swap(&mut a, &mut b);
        std::mem::swap(&mut fa, &mut fb);
    }
    let (mut c, mut fc) = (a, fa);
    let mut d = b - a;
    let mut mflag = true;
    for _ in 0..max_iter {
        if fb == 0.0 {
            return Ok(b);
        }
        if (b - a).abs() <= xtol * b.abs().max(1e-300) {
            if fb.abs() > jump {
                return Err(SolveError::Stopped(Failure::Jump {
                    at: b,
                    residual: fb,
                }));
            }
            return Ok(b);
        }
        let mut s = if fa != fc && fb != fc {
            a * fb * fc / ((fa - fb) * (fa - fc))
                + b * fa * fc / ((fb - fa) * (fb - fc))
                + c * fa * fb / ((fc - fa) * (fc - fb))
        } else {
            b - fb * (b - a) / (fb - fa)
        };
        let q = (3.0 * a + b) / 4.0;
        let outside = !((s > q.min(b)) && (s < q.max(b)));
        if outside
            || (mflag && (s - b).abs() >= (b - c).abs() / 2.0)
            || (!mflag && (s - b).abs() >= (c - d).abs() / 2.0)
        {
            s = 0.5 * (a + b);
            mflag = true;
        } else {
            mflag = false;
        }
        let fs = f(s)?;
        d = c;
        c = b;
        fc = fb;
        if fa.signum() != fs.signum() {
            b = s;
            fb = fs;
        } else {
            a = s;
            fa = fs;
        }
        if fa.abs() < fb.abs() {
            std::mem::swap(&mut a, &mut b);
            std::mem::swap(&mut fa, &mut fb);
        }
    }
    Err(SolveError::Stopped(Failure::IterationCap {
        iterations: max_iter,
        residual: fb,
    }))
}

/// Golden-section search for the maximum of a unimodal function on `[a, b]`.
pub fn maximise<E>(
    mut f: impl FnMut(f64) -> Result<f64, E>,
    a: f64,
    b: f64,
    xtol: f64,
    max_iter: u32,
) -> Result<(f64, f64), E> {
    let g = 0.5 * (5f64.sqrt() - 1.0);
    let (mut a, mut b) = (a, b);
    let mut x1 = b - g * (b - a);
    let mut x2 = a + g * (b - a);
    let mut f1 = f(x1)?;
    let mut f2 = f(x2)?;
    for _ in 0..max_iter {
        if (b - a).abs() <= xtol * (a.abs() + b.abs()).max(1e-300) {
            break;
        }
        if f1 < f2 {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = a + g * (b - a);
            f2 = f(x2)?;
        } else {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = b - g * (b - a);
            f1 = f(x1)?;
        }
    }
    Ok(if f1 > f2 { (x1, f1) } else { (x2, f2) })
}

/// Composite Simpson integral of `f` over `[a, b]` with `n` (even) panels.
pub fn simpson<E>(
    mut f: impl FnMut(f64) -> Result<f64, E>,
    a: f64,
    b: f64,
    n: usize,
) -> Result<f64, E> {
    let n = n.max(2) + n % 2;
    let h = (b - a) / n as f64;
    let mut sum = f(a)? + f(b)?;
    for i in 1..n {
        let w = if i % 2 == 1 { 4.0 } else { 2.0 };
        sum += w * f(a + h * i as f64)?;
    }
    Ok(sum * h / 3.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn brent_end_next_to_the_root_is_not_a_jump() {
        // sqrt(2) (independent relation: x^2 = 2). The lower end lies one
        // double away from the root, so its residual is round-off; the old
        // jump test compared the final residual with it and refused.
        let r = 2f64.sqrt();
        let a = f64::from_bits(r.to_bits() - 1);
        let x = brent(|x: f64| Ok::<f64, ()>(x * x - 2.0), a, 2.0, 1e-15, 100).unwrap();
        assert!((x - r).abs() <= 2.0 * f64::EPSILON, "{x}");
        // A true jump is still one.
        let j = brent(
            |x: f64| Ok::<f64, ()>(if x < 0.5 { -1.0 } else { 1.0 }),
            0.0,
            1.0,
            1e-15,
            200,
        );
        assert!(j.is_err());
    }

    #[test]
    fn newton_stops_when_the_step_vanishes_at_the_last_bit() {
        // Newton's method is exact on a straight line (independent
        // relation): one step reaches the root to rounding, the next step
        // rounds to zero. It must stop there, not bisect the bracket back
        // (which took about 30 more evaluations before).
        let root = 1_163.583_133_592_61;
        let mut calls = 0;
        let x = newton_monotone_floor::<()>(
            |x| {
                calls += 1;
                Ok((1.0e3 * (x - root), 1.0e3))
            },
            200.0,
            6000.0,
            1195.6,
            true,
            1e-14,
            0.0,
            f64::INFINITY,
            200,
        )
        .unwrap();
        assert!((x - root).abs() <= 1e-12 * root, "{x}");
        assert!(calls <= 3, "{calls} evaluations for a straight line");
    }

    #[test]
    fn newton_finds_cube_root_and_reports_missing_root() {
        let r = newton_monotone::<()>(
            |x| Ok((x * x * x - 2.0, 3.0 * x * x)),
            0.0,
            10.0,
            5.0,
            true,
            1e-14,
            1e-12,
            100,
        )
        .unwrap();
        assert!((r - 2f64.cbrt()).abs() < 1e-13);
        let none = newton_monotone::<()>(
            |x| Ok((x + 1.0, 1.0)),
            0.0,
            10.0,
            5.0,
            true,
            1e-14,
            1e-12,
            200,
        );
        assert!(matches!(
            none,
            Err(SolveError::Stopped(Failure::NoRoot { .. }))
        ));
    }

    #[test]
    fn brent_finds_root_and_refuses_no_bracket() {
        let r = brent::<()>(|x| Ok(x.cos() - x), 0.0, 1.0, 1e-15, 100).unwrap();
        // Dottie number 0.7390851332151607 (fixed point of cos, from memory).
        assert!((r - 0.739_085_133_215_160_7).abs() < 1e-12);
        assert!(brent::<()>(|x| Ok(x * x + 1.0), -1.0, 1.0, 1e-12, 50).is_err());
    }

    #[test]
    fn golden_section_finds_parabola_top() {
        let (x, fx) =
            maximise::<()>(|x| Ok(-(x - 0.3) * (x - 0.3) + 2.0), 0.0, 1.0, 1e-12, 200).unwrap();
        assert!((x - 0.3).abs() < 1e-6 && (fx - 2.0).abs() < 1e-12);
    }
}
