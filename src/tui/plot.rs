//! A character-cell plotter for the T-s and sweep charts.
//!
//! Draws points and straight segments into a grid of characters with axis
//! ticks and labels. Plain ASCII mode uses only `*`, `.`, `+`, `-` and `|`,
//! so the charts read on any terminal; otherwise a dot and a middle dot.

/// One series: points (x, y), joined by segments when `lines`, with a mark
/// and optional labels per point.
pub struct Series<'a> {
    /// Points.
    pub points: Vec<(f64, f64)>,
    /// Segments as index pairs into `points`.
    pub segments: Vec<(usize, usize)>,
    /// Mark character.
    pub mark: char,
    /// Labels drawn beside points.
    pub labels: Vec<&'a str>,
}

fn bounds(series: &[Series]) -> Option<(f64, f64, f64, f64)> {
    let mut it = series
        .iter()
        .flat_map(|s| s.points.iter())
        .filter(|(x, y)| x.is_finite() && y.is_finite());
    let &(x0, y0) = it.next()?;
    let (mut a, mut b, mut c, mut d) = (x0, x0, y0, y0);
    for &(x, y) in it {
        a = a.min(x);
        b = b.max(x);
        c = c.min(y);
        d = d.max(y);
    }
    let pad = |lo: f64, hi: f64| {
        let span = if hi > lo {
            hi - lo
        } else {
            lo.abs().max(1.0) * 0.1
        };
        (lo - 0.05 * span, hi + 0.05 * span)
    };
    let (a, b) = pad(a, b);
    let (c, d) = pad(c, d);
    Some((a, b, c, d))
}

/// Render to `height` lines of `width` characters, with axis labels.
pub fn render(
    series: &[Series],
    width: usize,
    height: usize,
    ascii: bool,
    x_label: &str,
    y_label: &str,
) -> Vec<String> {
    let label_w = 9;
    // Rows: y label, plot, axis, x ticks, x label.
    let (pw, ph) = (width.saturating_sub(label_w + 1), height.saturating_sub(4));
    if pw < 10 || ph < 4 {
        return vec!["(enlarge the terminal to see the chart)".to_string()];
    }
    let Some((x0, x1, y0, y1)) = bounds(series) else {
        return vec!["(nothing computed to plot)".to_string()];
    };
    let mut grid = vec![vec![' '; pw]; ph];
    let to_cell = |x: f64, y: f64| -> (usize, usize) {
        let cx = ((x - x0) / (x1 - x0) * (pw - 1) as f64)
            .round()
            .clamp(0.0, (pw - 1) as f64) as usize;
        let cy = ((y1 - y) / (y1 - y0) * (ph - 1) as f64)
            .round()
            .clamp(0.0, (ph - 1) as f64) as usize;
        (cx, cy)
    };
    let line_ch = if ascii { '.' } else { '\u{b7}' };
    for s in series {
        for &(a, b) in &s.segments {
            let (Some(&pa), Some(&pb)) = (s.points.get(a), s.points.get(b)) else {
                continue;
            };
            if !(pa.0.is_finite() && pa.1.is_finite() && pb.0.is_finite() && pb.1.is_finite()) {
                continue;
            }
            let (ax, ay) = to_cell(pa.0, pa.1);
            let (bx, by) = to_cell(pb.0, pb.1);
            let n = ax.abs_diff(bx).max(ay.abs_diff(by)).max(1);
            for k in 0..=n {
                let t = k as f64 / n as f64;
                let x = (ax as f64 + (bx as f64 - ax as f64) * t).round() as usize;
                let y = (ay as f64 + (by as f64 - ay as f64) * t).round() as usize;
                if grid[y][x] == ' ' {
                    grid[y][x] = line_ch;
                }
            }
        }
    }
    for s in series {
        // Points that land on one cell share a mark and a joined label
        // ("0,2"), so no station disappears under another.
        let mut cells: Vec<((usize, usize), String)> = Vec::new();
        for (i, &(x, y)) in s.points.iter().enumerate() {
            if !(x.is_finite() && y.is_finite()) {
                continue;
            }
            let c = to_cell(x, y);
            let l = s.labels.get(i).copied().unwrap_or("");
            match cells.iter_mut().find(|(cc, _)| *cc == c) {
                Some((_, lab)) if !l.is_empty() => {
                    if !lab.is_empty() {
                        lab.push(',');
                    }
                    lab.push_str(l);
                }
                Some(_) => {}
                None => cells.push((c, l.to_string())),
            }
        }
        for ((cx, cy), l) in cells {
            grid[cy][cx] = s.mark;
            for (k, ch) in l.chars().enumerate() {
                let px = cx + 1 + k;
                if px < pw && (grid[cy][px] == ' ' || grid[cy][px] == line_ch) {
                    grid[cy][px] = ch;
                }
            }
        }
    }
    let vbar = if ascii { '|' } else { '\u{2502}' };
    let hbar = if ascii { '-' } else { '\u{2500}' };
    let corner = if ascii { '+' } else { '\u{2514}' };
    let mut out = Vec::with_capacity(height);
    out.push(y_label.to_string());
    for (r, row) in grid.iter().enumerate() {
        let tick = if r == 0 {
            crate::report::sig(y1, 5)
        } else if r == ph - 1 {
            crate::report::sig(y0, 5)
        } else if r == ph / 2 {
            crate::report::sig(0.5 * (y0 + y1), 5)
        } else {
            String::new()
        };
        out.push(format!(
            "{tick:>label_w$}{vbar}{}",
            row.iter().collect::<String>()
        ));
    }
    out.push(format!(
        "{:>label_w$}{corner}{}",
        "",
        hbar.to_string().repeat(pw)
    ));
    let lo = crate::report::sig(x0, 5);
    let mid = crate::report::sig(0.5 * (x0 + x1), 5);
    let hi = crate::report::sig(x1, 5);
    let mut axis = vec![' '; pw + label_w + 1];
    let mut put = |at: usize, s: &str| {
        for (k, ch) in s.chars().enumerate() {
            if let Some(c) = axis.get_mut(at + k) {
                *c = ch;
            }
        }
    };
    put(label_w + 1, &lo);
    put(label_w + 1 + pw / 2 - mid.len() / 2, &mid);
    put((label_w + 1 + pw).saturating_sub(hi.len()), &hi);
    let axis: String = axis.into_iter().collect();
    out.push(axis.trim_end().to_string());
    // The x label on its own row, right-aligned under the axis (it used to
    // follow the high tick and fell off the right edge).
    out.push(format!("{x_label:>w$}", w = label_w + 1 + pw));
    out.truncate(height);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ascii_plot_uses_ascii_only_and_places_extremes_at_corners() {
        let s = Series {
            points: vec![(0.0, 0.0), (1.0, 1.0)],
            segments: vec![(0, 1)],
            mark: '*',
            labels: vec!["a", "b"],
        };
        let lines = render(&[s], 40, 12, true, "x", "y");
        assert!(lines.iter().all(|l| l.is_ascii()));
        // The high point is on the first plot row, the low one on the last.
        assert!(lines[1].contains("*b"));
        assert!(lines[lines.len() - 4].contains("*a"));
        // Both axis labels are drawn, whole.
        assert_eq!(lines[0], "y");
        assert_eq!(lines[lines.len() - 1].trim(), "x");
        assert_eq!(lines.len(), 12);
    }
}
