//! A backend wrapper that sends fewer bytes over a slow link.
//!
//! ratatui hands the backend only the cells that changed, and the
//! crossterm backend moves the cursor (`ESC [ row ; col H`, six to eight
//! bytes) before every run of changed cells. When the panel shows another
//! station, the changed cells are words separated by a space or two that
//! did not change, so most of the bytes are cursor moves. [`ThinLink`]
//! keeps a copy of what the terminal shows and, where the gap between two
//! changed runs on a row is shorter than a cursor move and drawn in the
//! same style, it sends the unchanged cells again instead of moving. The
//! screen ends up exactly as without it (checked in the tests by a
//! terminal emulator reading both byte streams).

use std::io;

use ratatui::backend::{Backend, ClearType, WindowSize};
use ratatui::buffer::Cell;
use ratatui::layout::{Position, Size};

/// Bytes of a cursor move to cell (`x`, `y`): `ESC [ row ; col H`, one
/// based. A gap of plain cells no longer than this is cheaper sent again.
fn move_cost(x: u16, y: u16) -> u16 {
    let digits = |n: u16| {
        if n >= 100 {
            3
        } else if n >= 10 {
            2
        } else {
            1
        }
    };
    4 + digits(y + 1) + digits(x + 1)
}

/// A backend that fills short gaps between changed cells from its copy of
/// the screen.
pub struct ThinLink<B> {
    inner: B,
    /// What the terminal shows, row by row (`None`: not known, never sent
    /// again as a filler).
    screen: Vec<Option<Cell>>,
    size: Size,
}

impl<B: Backend> ThinLink<B> {
    /// Wrap a backend; nothing is known of the screen until it is cleared
    /// or drawn.
    pub fn new(inner: B) -> ThinLink<B> {
        ThinLink {
            inner,
            screen: Vec::new(),
            size: Size::new(0, 0),
        }
    }

    /// The wrapped backend.
    pub fn inner(&self) -> &B {
        &self.inner
    }

    /// The wrapped backend, to take what it wrote (tests, benchmarks).
    pub fn inner_mut(&mut self) -> &mut B {
        &mut self.inner
    }

    fn forget(&mut self, size: Size) {
        self.size = size;
        self.screen = vec![None; size.width as usize * size.height as usize];
    }

    fn at(&self, x: u16, y: u16) -> Option<&Cell> {
        if x >= self.size.width || y >= self.size.height {
            return None;
        }
        self.screen[y as usize * self.size.width as usize + x as usize].as_ref()
    }

    /// A cell that can be sent again as a filler after one drawn in
    /// `like`'s style: known, one byte wide and drawn alike.
    fn filler(&self, x: u16, y: u16, like: &Cell) -> Option<Cell> {
        let c = self.at(x, y)?;
        let plain = c.symbol().len() == 1
            && c.symbol().is_ascii()
            && c.diff_option == ratatui::buffer::CellDiffOption::None;
        let alike = c.fg == like.fg
            && c.bg == like.bg
            && c.modifier == like.modifier
            && c.underline_color == like.underline_color;
        (plain && alike).then(|| c.clone())
    }
}

impl<B: Backend> Backend for ThinLink<B> {
    type Error = B::Error;

    fn draw<'a, I>(&mut self, content: I) -> Result<(), Self::Error>
    where
        I: Iterator<Item = (u16, u16, &'a Cell)>,
    {
        let size = self.inner.size()?;
        if size != self.size {
            self.forget(size);
        }
        let mut out: Vec<(u16, u16, Cell)> = Vec::new();
        for (x, y, cell) in content {
            if let Some((px, py, prev)) = out.last()
                && *py == y
                && x > px + 1
                && x - px - 1 <= move_cost(x, y)
            {
                let (px, prev) = (*px, prev.clone());
                let gap: Option<Vec<Cell>> =
                    (px + 1..x).map(|gx| self.filler(gx, y, &prev)).collect();
                if let Some(gap) = gap {
                    for (i, c) in gap.into_iter().enumerate() {
                        out.push((px + 1 + i as u16, y, c));
                    }
                }
            }
            out.push((x, y, cell.clone()));
        }
        for (x, y, c) in &out {
            if *x < self.size.width && *y < self.size.height {
                let i = *y as usize * self.size.width as usize + *x as usize;
                self.screen[i] = Some(c.clone());
            }
        }
        self.inner.draw(out.iter().map(|(x, y, c)| (*x, *y, c)))
    }

    fn append_lines(&mut self, n: u16) -> Result<(), Self::Error> {
        let size = self.size;
        self.forget(size);
        self.inner.append_lines(n)
    }

    fn hide_cursor(&mut self) -> Result<(), Self::Error> {
        self.inner.hide_cursor()
    }

    fn show_cursor(&mut self) -> Result<(), Self::Error> {
        self.inner.show_cursor()
    }

    fn get_cursor_position(&mut self) -> Result<Position, Self::Error> {
        self.inner.get_cursor_position()
    }

    fn set_cursor_position<P: Into<Position>>(&mut self, position: P) -> Result<(), Self::Error> {
        self.inner.set_cursor_position(position)
    }

    fn clear(&mut self) -> Result<(), Self::Error> {
        self.clear_region(ClearType::All)
    }

    fn clear_region(&mut self, clear_type: ClearType) -> Result<(), Self::Error> {
        self.inner.clear_region(clear_type)?;
        let size = self.inner.size()?;
        if clear_type == ClearType::All {
            self.size = size;
            self.screen = vec![Some(Cell::EMPTY); size.width as usize * size.height as usize];
        } else {
            self.forget(size);
        }
        Ok(())
    }

    fn size(&self) -> Result<Size, Self::Error> {
        self.inner.size()
    }

    fn window_size(&mut self) -> Result<WindowSize, Self::Error> {
        self.inner.window_size()
    }

    fn flush(&mut self) -> Result<(), Self::Error> {
        self.inner.flush()
    }
}

/// The bytes a terminal of a given size would receive: the crossterm
/// encoding written into memory instead of to a terminal. For tests and
/// benchmarks that measure what a key costs on the link.
pub struct Wire {
    out: ratatui::backend::CrosstermBackend<Sink>,
    sink: Sink,
    size: Size,
}

impl Wire {
    /// A terminal of `w` x `h` cells.
    pub fn new(w: u16, h: u16) -> Wire {
        let sink = Sink::default();
        Wire {
            out: ratatui::backend::CrosstermBackend::new(sink.clone()),
            sink,
            size: Size::new(w, h),
        }
    }

    /// The bytes written since the last call.
    pub fn take(&mut self) -> Vec<u8> {
        std::mem::take(&mut *self.sink.0.borrow_mut())
    }
}

impl Backend for Wire {
    type Error = io::Error;

    fn draw<'a, I>(&mut self, content: I) -> io::Result<()>
    where
        I: Iterator<Item = (u16, u16, &'a Cell)>,
    {
        self.out.draw(content)
    }

    fn hide_cursor(&mut self) -> io::Result<()> {
        self.out.hide_cursor()
    }

    fn show_cursor(&mut self) -> io::Result<()> {
        self.out.show_cursor()
    }

    fn get_cursor_position(&mut self) -> io::Result<Position> {
        Ok(Position::new(0, 0))
    }

    fn set_cursor_position<P: Into<Position>>(&mut self, position: P) -> io::Result<()> {
        self.out.set_cursor_position(position)
    }

    fn clear(&mut self) -> io::Result<()> {
        self.out.clear()
    }

    fn clear_region(&mut self, clear_type: ClearType) -> io::Result<()> {
        self.out.clear_region(clear_type)
    }

    fn size(&self) -> io::Result<Size> {
        Ok(self.size)
    }

    fn window_size(&mut self) -> io::Result<WindowSize> {
        Ok(WindowSize {
            columns_rows: self.size,
            pixels: Size::new(0, 0),
        })
    }

    fn flush(&mut self) -> io::Result<()> {
        Backend::flush(&mut self.out)
    }
}

/// Memory the wire's encoder writes into, shared with the wire.
#[derive(Clone, Default)]
struct Sink(std::rc::Rc<std::cell::RefCell<Vec<u8>>>);

impl io::Write for Sink {
    fn write(&mut self, b: &[u8]) -> io::Result<usize> {
        self.0.borrow_mut().extend_from_slice(b);
        Ok(b.len())
    }
    fn flush(&mut self) -> io::Result<()> {
        Ok(())
    }
}
