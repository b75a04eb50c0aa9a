//! The one history buffer: exactly the last `N` samples, O(1) push, read as two contiguous
//! slices so that kernels run plain slice loops (no `%`, no per-element bounds checks).
//!
//! RAM: `N` samples plus one `usize` index — no mirrored 2N copy.

/// A ring of the last `N` values pushed, oldest first.
///
/// Before `N` values have been pushed, the missing (older) entries read as the fill value given
/// to [`new`](Ring::new) — for a filter, zero: the signal is taken to be zero before time 0.
///
/// ```
/// use tapline::Ring;
/// let mut ring = Ring::<i16, 3>::new(0);
/// for x in 1..=5 {
///     ring.push(x);
/// }
/// let (older, newer) = ring.as_slices();
/// assert_eq!((older, newer), (&[3][..], &[4, 5][..]));
/// assert!(ring.iter().eq([3, 4, 5].iter()));
/// assert_eq!(ring.latest(), 5);
/// ```
///
/// `N = 0` does not compile:
///
/// ```compile_fail
/// let ring = tapline::Ring::<i16, 0>::new(0);
/// ```
#[derive(Clone, Debug)]
pub struct Ring<T, const N: usize> {
    slots: [T; N],
    /// Where the next value goes, which is also where the oldest value is. Always `< N`.
    next: usize,
}

impl<T: Copy, const N: usize> Ring<T, N> {
    /// A ring whose `N` entries all hold `fill`. `const`, so a ring (or a filter holding one)
    /// can be built in a `static`.
    #[must_use]
    pub const fn new(fill: T) -> Self {
        const { assert!(N > 0, "a ring needs at least one slot") };
        Ring {
            slots: [fill; N],
            next: 0,
        }
    }

    /// The capacity `N`, which is also the number of values it always holds.
    #[must_use]
    pub const fn len(&self) -> usize {
        N
    }

    /// Always `false`: a ring holds exactly `N ≥ 1` values. (Present for API symmetry.)
    #[must_use]
    pub const fn is_empty(&self) -> bool {
        false
    }

    /// Appends `value`, dropping the oldest. O(1); a compare-and-reset, no division.
    #[inline]
    pub fn push(&mut self, value: T) {
        if let Some(slot) = self.slots.get_mut(self.next) {
            *slot = value;
        }
        self.next += 1;
        if self.next >= N {
            self.next = 0;
        }
    }

    /// Appends `value` and returns the value it drops, the one pushed `N` calls ago (the fill
    /// value during the first `N` calls). O(1), as [`push`](Ring::push).
    ///
    /// ```
    /// use tapline::Ring;
    /// let mut ring = Ring::<i32, 2>::new(0);
    /// assert_eq!(ring.shift_in(i32::MIN), 0);
    /// assert_eq!(ring.shift_in(7), 0);
    /// assert_eq!(ring.shift_in(8), i32::MIN);
    /// ```
    #[inline]
    pub fn shift_in(&mut self, value: T) -> T {
        let leaving = match self.slots.get(self.next) {
            Some(&v) => v,
            // `next < N` always holds; this arm only keeps the path free of panics.
            None => value,
        };
        self.push(value);
        leaving
    }

    /// The history as `(older, newer)`: `older` followed by `newer` is every value, oldest to
    /// newest. One of the two may be empty.
    #[inline]
    #[must_use]
    pub fn as_slices(&self) -> (&[T], &[T]) {
        match self.slots.split_at_checked(self.next) {
            Some((newer, older)) => (older, newer),
            // `next < N` always holds; this arm only keeps the path free of panics.
            None => (self.slots.as_slice(), &[]),
        }
    }

    /// The most recently pushed value (the fill value if nothing was pushed).
    #[inline]
    #[must_use]
    pub fn latest(&self) -> T {
        let (older, newer) = self.as_slices();
        match newer.last().or(older.last()) {
            Some(&v) => v,
            // Unreachable: `new` asserts N ≥ 1 at compile time, so one slice is non-empty.
            #[allow(clippy::indexing_slicing)]
            None => self.slots[0],
        }
    }

    /// Every value, oldest to newest.
    pub fn iter(&self) -> impl DoubleEndedIterator<Item = &T> {
        let (older, newer) = self.as_slices();
        older.iter().chain(newer)
    }

    /// Sets every entry to `fill` and restarts at slot 0.
    pub fn fill(&mut self, fill: T) {
        self.slots = [fill; N];
        self.next = 0;
    }
}
