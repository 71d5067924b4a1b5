//! A character-cell plotter for the T-s and sweep charts.
//!
//! Draws guide lines (labelled isobars), polylines (process paths),
//! segments and points into a grid of characters with axis ticks and
//! labels. Point labels never overwrite a mark or another label and keep a
//! blank cell from the next one: each is tried right, left, above and
//! below its point, and one that finds no room is listed on a line under
//! the chart with its coordinates. Plain ASCII mode uses only ASCII.

/// One series: points (x, y), joined by segments and polylines, with a
/// mark and optional labels per point.
pub struct Series<'a> {
    /// Points.
    pub points: Vec<(f64, f64)>,
    /// Segments as index pairs into `points`.
    pub segments: Vec<(usize, usize)>,
    /// Paths drawn through their points (a process between stations).
    pub polylines: Vec<Vec<(f64, f64)>>,
    /// Mark character.
    pub mark: char,
    /// Labels drawn beside points.
    pub labels: Vec<&'a str>,
    /// x values where the series could not be computed (a failed sweep
    /// point): marked on the bottom row of the plot.
    pub failed: Vec<f64>,
}

impl<'a> Series<'a> {
    /// Points with nothing else.
    pub fn points(points: Vec<(f64, f64)>, mark: char) -> Series<'a> {
        Series {
            points,
            segments: Vec::new(),
            polylines: Vec::new(),
            mark,
            labels: Vec::new(),
            failed: Vec::new(),
        }
    }
}

/// A background line with a label at its upper end (an isobar); it does
/// not widen the chart's range.
pub struct Guide {
    /// Points of the line.
    pub points: Vec<(f64, f64)>,
    /// Its label ("101 kPa").
    pub label: String,
}

fn bounds(series: &[Series]) -> Option<(f64, f64, f64, f64)> {
    let mut it = series
        .iter()
        .flat_map(|s| s.points.iter().chain(s.polylines.iter().flatten()))
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
    render_with(series, &[], width, height, ascii, x_label, y_label)
}

/// A cell of the plot: what is drawn there, and whether a label may not
/// go there (a mark or a label already).
#[derive(Clone, Copy)]
struct Cell {
    ch: char,
    taken: bool,
}

/// [`render`] with guide lines under the series.
pub fn render_with(
    series: &[Series],
    guides: &[Guide],
    width: usize,
    height: usize,
    ascii: bool,
    x_label: &str,
    y_label: &str,
) -> Vec<String> {
    let label_w = 9;
    let Some((x0, x1, y0, y1)) = bounds(series) else {
        return vec!["(nothing computed to plot)".to_string()];
    };
    // Rows: y label, plot, axis, x ticks, x label; one more for labels
    // that found no room, when there are some (decided after a first try).
    let mut note_rows = 0;
    loop {
        let (pw, ph) = (
            width.saturating_sub(label_w + 1),
            height.saturating_sub(4 + note_rows),
        );
        if pw < 10 || ph < 4 {
            return vec!["(enlarge the terminal to see the chart)".to_string()];
        }
        let (grid, unplaced) = draw(series, guides, pw, ph, ascii, (x0, x1, y0, y1));
        let notes = unplaced_notes(&unplaced, width);
        if notes.len() > note_rows && note_rows < 3 {
            note_rows = notes.len().min(3);
            continue;
        }
        return frame(
            grid,
            notes,
            (pw, ph, label_w, height),
            ascii,
            (x0, x1, y0, y1),
            x_label,
            y_label,
        );
    }
}

/// Labels that found no room, as at most three lines of at most `width`
/// characters, an item never split; what does not fit is counted.
fn unplaced_notes(unplaced: &[(String, f64, f64)], width: usize) -> Vec<String> {
    if unplaced.is_empty() {
        return Vec::new();
    }
    let items: Vec<String> = unplaced
        .iter()
        .map(|(l, x, y)| {
            format!(
                "{l} at ({}, {})",
                crate::report::sig(*x, 3),
                crate::report::sig(*y, 3)
            )
        })
        .collect();
    let mut lines = vec!["labels without room:".to_string()];
    for (i, it) in items.iter().enumerate() {
        let last = lines.len() - 1;
        let more = format!(" (and {} more: enlarge the terminal)", items.len() - i);
        if lines[last].chars().count() + 2 + it.chars().count() <= width {
            let sep = if lines[last].ends_with(':') {
                " "
            } else {
                "; "
            };
            lines[last].push_str(sep);
            lines[last].push_str(it);
        } else if lines.len() < 3 {
            lines.push(format!("  {it}"));
        } else {
            // The last line says how many are left out.
            let l = &mut lines[last];
            while l.chars().count() + more.chars().count() > width && l.contains("; ") {
                let cut = l.rfind("; ").unwrap_or(0);
                l.truncate(cut);
            }
            let shown: usize = lines.iter().map(|l| l.matches(" at (").count()).sum();
            let more = format!(" (and {} more: enlarge the terminal)", items.len() - shown);
            lines[last].push_str(&more);
            break;
        }
    }
    lines
}

#[allow(clippy::type_complexity)]
fn draw(
    series: &[Series],
    guides: &[Guide],
    pw: usize,
    ph: usize,
    ascii: bool,
    (x0, x1, y0, y1): (f64, f64, f64, f64),
) -> (Vec<Vec<Cell>>, Vec<(String, f64, f64)>) {
    let blank = Cell {
        ch: ' ',
        taken: false,
    };
    let mut grid = vec![vec![blank; pw]; ph];
    let to_cell = |x: f64, y: f64| -> Option<(usize, usize)> {
        if !(x.is_finite() && y.is_finite()) {
            return None;
        }
        let fx = (x - x0) / (x1 - x0) * (pw - 1) as f64;
        let fy = (y1 - y) / (y1 - y0) * (ph - 1) as f64;
        if !(-0.5..=(pw as f64 - 0.5)).contains(&fx) || !(-0.5..=(ph as f64 - 0.5)).contains(&fy) {
            return None;
        }
        Some((
            fx.round().clamp(0.0, (pw - 1) as f64) as usize,
            fy.round().clamp(0.0, (ph - 1) as f64) as usize,
        ))
    };
    let seg_ch = if ascii { '.' } else { '\u{b7}' };
    let path_ch = if ascii { 'o' } else { '\u{2218}' };
    let guide_ch = ':';
    // A straight run of cells between two cells, drawn where nothing is.
    let line = |grid: &mut Vec<Vec<Cell>>, a: (usize, usize), b: (usize, usize), ch: char| {
        let n = a.0.abs_diff(b.0).max(a.1.abs_diff(b.1)).max(1);
        for k in 0..=n {
            let t = k as f64 / n as f64;
            let x = (a.0 as f64 + (b.0 as f64 - a.0 as f64) * t).round() as usize;
            let y = (a.1 as f64 + (b.1 as f64 - a.1 as f64) * t).round() as usize;
            let c = &mut grid[y][x];
            if c.ch == ' ' || (c.ch == guide_ch && ch != guide_ch) {
                c.ch = ch;
            }
        }
    };
    let polyline = |grid: &mut Vec<Vec<Cell>>, pts: &[(f64, f64)], ch: char| {
        let cells: Vec<Option<(usize, usize)>> = pts.iter().map(|&(x, y)| to_cell(x, y)).collect();
        for w in cells.windows(2) {
            if let [Some(a), Some(b)] = w {
                line(grid, *a, *b, ch);
            }
        }
    };
    for g in guides {
        polyline(&mut grid, &g.points, guide_ch);
    }
    for s in series {
        for p in &s.polylines {
            polyline(&mut grid, p, path_ch);
        }
        for &(a, b) in &s.segments {
            if let (Some(&pa), Some(&pb)) = (s.points.get(a), s.points.get(b)) {
                polyline(&mut grid, &[pa, pb], seg_ch);
            }
        }
    }
    // Marks first, so that no label covers one.
    let mut wanted: Vec<((usize, usize), String, (f64, f64))> = Vec::new();
    for s in series {
        // Points that land on one cell share a mark and a joined label
        // ("0,2"), so no station disappears under another.
        for (i, &(x, y)) in s.points.iter().enumerate() {
            let Some(c) = to_cell(x, y) else {
                continue;
            };
            grid[c.1][c.0] = Cell {
                ch: s.mark,
                taken: true,
            };
            let l = s.labels.get(i).copied().unwrap_or("");
            if l.is_empty() {
                continue;
            }
            match wanted.iter_mut().find(|(cc, ..)| *cc == c) {
                Some((_, lab, _)) => {
                    lab.push(',');
                    lab.push_str(l);
                }
                None => wanted.push((c, l.to_string(), (x, y))),
            }
        }
        let fail_ch = if ascii { 'x' } else { '\u{d7}' };
        for &x in &s.failed {
            if let Some((cx, _)) = to_cell(x, y0) {
                grid[ph - 1][cx] = Cell {
                    ch: fail_ch,
                    taken: true,
                };
            }
        }
    }
    let mut unplaced = Vec::new();
    // Point labels, then guide labels, each where it fits.
    for ((cx, cy), l, (x, y)) in wanted {
        if !place(&mut grid, cx, cy, &l, true) {
            unplaced.push((l, x, y));
        }
    }
    for g in guides {
        // Near the line's highest point inside the plot, or as near it
        // down the line as there is room.
        let mut cells: Vec<(usize, usize)> = g
            .points
            .iter()
            .filter_map(|&(x, y)| to_cell(x, y))
            .collect();
        cells.sort_by_key(|c| (c.1, std::cmp::Reverse(c.0)));
        for (cx, cy) in cells {
            if place(&mut grid, cx, cy, &g.label, false) {
                break;
            }
        }
    }
    (grid, unplaced)
}

/// Put `label` beside cell (`cx`, `cy`): right, left, then the rows above
/// and below, where every cell is free and a blank cell separates it from
/// any other label or mark. `beside` false also tries the cell itself
/// (a guide's label sits on its line's end).
fn place(grid: &mut [Vec<Cell>], cx: usize, cy: usize, label: &str, beside: bool) -> bool {
    let n = label.chars().count();
    let (pw, ph) = (grid[0].len(), grid.len());
    let cy = cy as isize;
    let cx = cx as isize;
    let n_i = n as isize;
    let mut tries: Vec<(isize, isize)> = vec![
        (cx + 1, cy),
        (cx - n_i, cy),
        (cx + 1, cy - 1),
        (cx + 1, cy + 1),
        (cx - n_i, cy - 1),
        (cx - n_i, cy + 1),
        (cx - n_i / 2, cy - 1),
        (cx - n_i / 2, cy + 1),
        (cx + 1, cy - 2),
        (cx + 1, cy + 2),
        (cx - n_i, cy - 2),
        (cx - n_i, cy + 2),
        (cx + 2, cy),
        (cx - n_i - 1, cy),
    ];
    if !beside {
        tries.insert(0, (cx - n_i + 1, cy));
    }
    for (x, y) in tries {
        if y < 0 || y >= ph as isize || x < 0 || x + n_i > pw as isize {
            continue;
        }
        let row = &grid[y as usize];
        let lo = (x - 1).max(0) as usize;
        let hi = ((x + n_i) as usize).min(pw - 1);
        // Its own point may touch it; nothing else taken may.
        let own = |i: usize| y == cy && i as isize == cx;
        if (lo..=hi).any(|i| row[i].taken && !own(i)) {
            continue;
        }
        if (x..x + n_i).any(|i| own(i as usize)) {
            continue;
        }
        // A guide's label covers nothing but its own kind of line, and
        // does not touch a process path.
        if !beside && (lo..=hi).any(|i| !matches!(row[i].ch, ' ' | ':')) {
            continue;
        }
        let row = &mut grid[y as usize];
        for (k, ch) in label.chars().enumerate() {
            row[x as usize + k] = Cell { ch, taken: true };
        }
        return true;
    }
    false
}

fn frame(
    grid: Vec<Vec<Cell>>,
    notes: Vec<String>,
    (pw, ph, label_w, height): (usize, usize, usize, usize),
    ascii: bool,
    (x0, x1, y0, y1): (f64, f64, f64, f64),
    x_label: &str,
    y_label: &str,
) -> Vec<String> {
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
            row.iter().map(|c| c.ch).collect::<String>()
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
    out.extend(notes.into_iter().take(3));
    out.truncate(height);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ascii_plot_uses_ascii_only_and_places_extremes_at_corners() {
        let s = Series {
            segments: vec![(0, 1)],
            labels: vec!["a", "b"],
            ..Series::points(vec![(0.0, 0.0), (1.0, 1.0)], '*')
        };
        let lines = render(&[s], 40, 12, true, "x", "y");
        assert!(lines.iter().all(|l| l.is_ascii()));
        // The high point is on the first plot row, the low one on the last.
        // Labels beside their points (left where the edge leaves no room).
        assert!(lines[1].contains("*b"), "{lines:?}");
        assert!(lines[lines.len() - 4].contains("*a"), "{lines:?}");
        // Both axis labels are drawn, whole.
        assert_eq!(lines[0], "y");
        assert_eq!(lines[lines.len() - 1].trim(), "x");
        assert_eq!(lines.len(), 12);
    }

    #[test]
    fn labels_never_touch_and_every_one_is_shown_or_listed() {
        // Twelve points crowded into a corner, like a turbofan's cold
        // stations, with names of one and two characters.
        let names = [
            "0", "2", "13", "17", "19", "21", "25", "3", "4", "45", "5", "9",
        ];
        let pts: Vec<(f64, f64)> = (0..12)
            .map(|i| (f64::from(i % 4) * 0.02, f64::from(i / 4) * 0.02))
            .chain([(1.0, 1.0)])
            .collect();
        let mut labels: Vec<&str> = names.to_vec();
        labels.push("far");
        let s = Series {
            labels,
            ..Series::points(pts, '*')
        };
        let lines = render(&[s], 60, 16, true, "x", "y");
        // The plot rows: those with the y axis bar at column 9.
        let plot: Vec<&str> = lines
            .iter()
            .filter(|l| l.chars().nth(9) == Some('|'))
            .map(|l| l.get(10..).unwrap_or(""))
            .collect();
        let text = lines.join("\n");
        // Each label is on the plot whole (between blanks, marks or the
        // edge), or named under it.
        for n in names {
            let on_plot = plot.iter().any(|row| {
                row.split([' ', '*', '.'])
                    .flat_map(|w| w.split(','))
                    .any(|w| w == n)
            });
            let listed = text
                .split(['\n', ';', ':'])
                .filter_map(|item| item.trim().split_once(" at ("))
                .any(|(l, _)| l.split(',').any(|p| p == n));
            assert!(on_plot || listed, "label {n} lost:\n{text}");
        }
        // No two labels run together: every word on the plot is a label
        // or labels joined by commas (points sharing a cell).
        for row in &plot {
            for w in row.split([' ', '*', '.']).filter(|w| !w.is_empty()) {
                assert!(
                    w.split(',').all(|p| names.contains(&p) || p == "far"),
                    "\"{w}\" is not a label:\n{text}"
                );
            }
        }
    }

    #[test]
    fn failed_points_are_marked_on_the_axis() {
        let s = Series {
            failed: vec![0.5],
            ..Series::points(vec![(0.0, 0.0), (1.0, 1.0)], '*')
        };
        let lines = render(&[s], 40, 12, true, "x", "y");
        // The bottom plot row (above the axis) has the x mark near the middle.
        let row = &lines[lines.len() - 4];
        let at = row.find('x').expect("a failed mark");
        let mid = 10 + (40 - 10) / 2;
        assert!(at.abs_diff(mid) <= 2, "{row}");
    }
}
