//! The one range syntax of every command that takes a list of values
//! (`table --mach`, `table --given`, `atmosphere --altitude`, `sweep --vary`):
//!
//! * `FROM:TO:STEP`: from FROM to TO in steps of STEP, both ends included;
//!   a STEP that does not reach TO in whole steps is refused with a hint
//!   (never rounded to a nearby range silently);
//! * `FROM:TO@N`: N evenly spaced points, both ends included (N >= 2).
//!
//! Lists of numbers and ranges may be mixed with commas (`0.5,1:3:0.5`)
//! where a command reads a list.

/// A range as written, before its numbers are read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Spec<'a> {
    /// One value.
    One(&'a str),
    /// From, to and the step size.
    Step(&'a str, &'a str, &'a str),
    /// From, to and the number of points.
    Points(&'a str, &'a str, usize),
}

/// Split one range or value.
pub fn split(part: &str) -> Result<Spec<'_>, String> {
    let part = part.trim();
    if let Some((span, n)) = part.rsplit_once('@') {
        let n: usize = n.trim().parse().map_err(|_| {
            format!("\"{part}\": after @ comes a whole number of points (FROM:TO@N)")
        })?;
        if n < 2 {
            return Err(format!(
                "\"{part}\": a range has at least 2 points (FROM:TO@N, N >= 2)"
            ));
        }
        let pieces: Vec<&str> = span.split(':').collect();
        return match pieces.as_slice() {
            [a, b] => Ok(Spec::Points(a, b, n)),
            _ => Err(format!(
                "\"{part}\": write FROM:TO@N for N points, or FROM:TO:STEP for a step size"
            )),
        };
    }
    let pieces: Vec<&str> = part.split(':').collect();
    match pieces.as_slice() {
        [one] => Ok(Spec::One(one)),
        [a, b, s] => Ok(Spec::Step(a, b, s)),
        _ => Err(format!(
            "\"{part}\": write a value, FROM:TO:STEP (a step size) or FROM:TO@N (N points)"
        )),
    }
}

/// Number of intervals from `from` to `to` in steps of `step` (SI, or any
/// one unit), refusing a step that does not land on TO. `text` is the range
/// as written, for the messages; `cap` bounds the number of points.
pub fn intervals(from: f64, to: f64, step: f64, text: &str, cap: usize) -> Result<usize, String> {
    if !(step.is_finite() && step > 0.0) {
        return Err(format!("\"{text}\": the step must be positive"));
    }
    if to < from {
        return Err(format!("\"{text}\": TO must not be below FROM"));
    }
    let span = to - from;
    let k = span / step;
    if !k.is_finite() || k >= cap as f64 {
        return Err(format!("\"{text}\": more than {cap} points"));
    }
    let whole = k.round();
    // Whole steps within rounding of the decimal values as typed.
    if (k - whole).abs() > 1e-9 * k.max(1.0) {
        let hint = if step > span && step.fract() == 0.0 {
            // The other reading: a whole number where a step size goes is
            // often meant as a count of steps.
            format!(
                "; if {} was meant as a number of steps, write FROM:TO@{} for that many points",
                step as u64,
                step as u64 + 1
            )
        } else {
            format!(
                "; {} whole steps fall short of TO: choose a step that divides TO - FROM, or write FROM:TO@N for N points",
                k.floor()
            )
        };
        return Err(format!(
            "\"{text}\": the step does not reach TO from FROM in whole steps{hint}"
        ));
    }
    Ok(whole as usize)
}

/// The `i`-th of `intervals + 1` evenly spaced values from `from` to `to`,
/// both ends exact.
pub fn value(from: f64, to: f64, intervals: usize, i: usize) -> f64 {
    if intervals == 0 {
        from
    } else if i == intervals {
        to
    } else {
        from + (to - from) * (i as f64 / intervals as f64)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn step_and_count_forms() {
        assert_eq!(split("1:2:0.5").unwrap(), Spec::Step("1", "2", "0.5"));
        assert_eq!(split("6:16@11").unwrap(), Spec::Points("6", "16", 11));
        assert_eq!(split("3").unwrap(), Spec::One("3"));
        assert!(split("6:16@1").is_err());
        assert!(split("6:16@x").is_err());
        assert!(split("1:2").is_err());
        // 0.5 to 3 in steps of 0.5: five intervals, decimal steps included.
        assert_eq!(intervals(0.5, 3.0, 0.5, "", 1000).unwrap(), 5);
        assert_eq!(intervals(0.0, 0.3, 0.1, "", 1000).unwrap(), 3);
        // A step that misses TO is refused, with the count form as the hint.
        let e = intervals(0.95, 0.99, 1000.0, "0.95:0.99:1000", 10_000_000).unwrap_err();
        assert!(e.contains("@1001"), "{e}");
        assert!(intervals(6.0, 16.0, 3.0, "6:16:3", 1000).is_err());
        assert_eq!(value(0.95, 0.99, 4, 4), 0.99);
    }
}
