//! A one-line progress bar on stderr for long replays, drawn only when stderr is a terminal (a
//! pipe, a file or a CI log gets nothing). It redraws at most ten times a second and erases
//! itself when done or dropped, so the report and any error start on a clean line.

use std::format;
use std::io::{IsTerminal, Write};
use std::prelude::rust_2024::*;
use std::time::{Duration, Instant};

/// Width of the bar itself, in characters.
const WIDTH: usize = 30;
/// How often the bar may redraw.
const EVERY: Duration = Duration::from_millis(100);
/// Rows between two looks at the clock.
const ROWS_PER_LOOK: u32 = 1024;

pub struct Bar {
    label: String,
    total: u64,
    start: Instant,
    last: Instant,
    rows: u32,
    drawn: bool,
}

impl Bar {
    /// A bar for `total` bytes of work, or None when stderr is not a terminal.
    pub fn new(label: &str, total: u64) -> Option<Bar> {
        if !std::io::stderr().is_terminal() {
            return None;
        }
        let now = Instant::now();
        let mut bar = Bar {
            label: label.to_string(),
            total,
            start: now,
            last: now,
            rows: 0,
            drawn: false,
        };
        bar.draw(0, 0);
        Some(bar)
    }

    /// `done` bytes of `total` so far, `samples` rows filtered: redraws now and then.
    pub fn tick(&mut self, done: u64, samples: u64) {
        self.rows += 1;
        if self.rows < ROWS_PER_LOOK {
            return;
        }
        self.rows = 0;
        let now = Instant::now();
        if now.duration_since(self.last) >= EVERY {
            self.last = now;
            self.draw(done, samples);
        }
    }

    fn draw(&mut self, done: u64, samples: u64) {
        let fraction = if self.total == 0 {
            1.0
        } else {
            (done as f64 / self.total as f64).clamp(0.0, 1.0)
        };
        let filled = (fraction * WIDTH as f64).round() as usize;
        let bar: String = std::iter::repeat_n('#', filled)
            .chain(std::iter::repeat_n('.', WIDTH - filled.min(WIDTH)))
            .collect();
        let line = format!(
            "\r{} [{bar}] {:3.0}%  {samples} rows  {:.1} s\x1b[K",
            self.label,
            fraction * 100.0,
            self.start.elapsed().as_secs_f64()
        );
        let mut err = std::io::stderr().lock();
        let _ = err.write_all(line.as_bytes());
        let _ = err.flush();
        self.drawn = true;
    }
}

impl Drop for Bar {
    fn drop(&mut self) {
        if self.drawn {
            let mut err = std::io::stderr().lock();
            let _ = err.write_all(b"\r\x1b[K");
            let _ = err.flush();
        }
    }
}
