//! The one history buffer: exactly the last `N` samples, O(1) push, read as **one** contiguous
//! slice so that kernels run a single plain slice loop (no `%`, no wrap, no bounds checks), and
//! so that a block of new samples can be laid out right after the history for the block
//! kernels (several outputs per pass over the taps).
//!
//! Layout: two copies of the N slots back to back ("mirrored"); every value is written to both
//! halves, so the last N values are always one slice, wherever the write position is.
//! RAM: `2·N` samples plus one `usize` index. The second copy is the price of the contiguous
//! window; it is what lets the block path reuse each loaded tap for four outputs.

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
/// assert_eq!(ring.window(), &[3, 4, 5]);
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
    /// `[primary, mirror]`: slot `i` of both halves holds the same value once a write has been
    /// committed. Staged values ([`stage`](Ring::stage)) are in the mirror only.
    slots: [[T; N]; 2],
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
            slots: [[fill; N]; 2],
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

    /// Appends `value`, dropping the oldest. O(1): two stores and a compare-and-reset, no
    /// division.
    #[inline]
    pub fn push(&mut self, value: T) {
        let [primary, mirror] = &mut self.slots;
        if let (Some(a), Some(b)) = (primary.get_mut(self.next), mirror.get_mut(self.next)) {
            *a = value;
            *b = value;
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
        let [primary, _] = &self.slots;
        let leaving = match primary.get(self.next) {
            Some(&v) => v,
            // `next < N` always holds; this arm only keeps the path free of panics.
            None => value,
        };
        self.push(value);
        leaving
    }

    /// The history, oldest to newest, as one slice of `N` values.
    ///
    /// ```
    /// use tapline::Ring;
    /// let mut ring = Ring::<u8, 4>::new(0);
    /// ring.push(1);
    /// ring.push(2);
    /// assert_eq!(ring.window(), &[0, 0, 1, 2]);
    /// ```
    #[inline]
    #[must_use]
    pub fn window(&self) -> &[T] {
        // The oldest value sits at `next` in the primary half; the N values from there run
        // on into the mirror, which repeats the primary's slots 0..next (the newer values).
        // Through a fixed-size chunk, so the kernels see a length of exactly N at compile time.
        let flat = self.slots.as_flattened();
        match flat.get(self.next..).and_then(<[T]>::first_chunk::<N>) {
            Some(window) => window,
            None => flat,
        }
    }

    /// The most recently pushed value (the fill value if nothing was pushed).
    #[inline]
    #[must_use]
    pub fn latest(&self) -> T {
        let [primary, _] = &self.slots;
        match self.window().last() {
            Some(&v) => v,
            // Unreachable: `new` asserts N ≥ 1 at compile time, so the window is non-empty.
            #[allow(clippy::indexing_slicing)]
            None => primary[0],
        }
    }

    /// Every value, oldest to newest.
    pub fn iter(&self) -> impl DoubleEndedIterator<Item = &T> {
        self.window().iter()
    }

    /// Sets every entry to `fill` and restarts at slot 0.
    pub fn fill(&mut self, fill: T) {
        self.slots = [[fill; N]; 2];
        self.next = 0;
    }

    /// Replaces every value `v` of the history by `f(v)` (slot by slot, not in time order),
    /// keeping the write position: `f` runs once per value, and the mirrored copy follows.
    pub(crate) fn update_each(&mut self, mut f: impl FnMut(T) -> T) {
        let [primary, mirror] = &mut self.slots;
        for (a, b) in primary.iter_mut().zip(mirror.iter_mut()) {
            *a = f(*a);
            *b = *a;
        }
    }

    /// Lays `incoming` (at most `N − next` values, between 1 and N; the rest is left unread) out right after the history without committing it, and returns how many values
    /// `k` it took. [`staged_span`](Ring::staged_span) then reads them with the history before
    /// them.
    ///
    /// The staged values go to the mirror half, whose slots there repeat the primary's oldest
    /// values; the primary still holds those until [`commit`](Ring::commit), so a caller that
    /// does not commit leaves the ring's history as it was.
    #[inline]
    pub(crate) fn stage(&mut self, incoming: impl IntoIterator<Item = T>) -> usize {
        let [_, mirror] = &mut self.slots;
        let room = mirror.get_mut(self.next..).unwrap_or(&mut []);
        let mut staged = 0;
        for (slot, x) in room.iter_mut().zip(incoming) {
            *slot = x;
            staged += 1;
        }
        staged
    }

    /// After [`stage`](Ring::stage) took `k` values: the span `x[n−N+2 ..= n+k]`, the last
    /// `N − 1` history values followed by the `k` staged ones (`N − 1 + k` values). Output
    /// `i < k` of the block is the convolution sum over `span[i .. i + N]`.
    #[inline]
    #[must_use]
    pub(crate) fn staged_span(&self, k: usize) -> &[T] {
        let k = k.min(N - self.next);
        self.slots
            .as_flattened()
            .get(self.next + 1..self.next + N + k)
            .unwrap_or(&[])
    }

    /// Makes the `k` values last staged part of the history: copies them into the primary half
    /// and advances the write position past them.
    #[inline]
    pub(crate) fn commit(&mut self, k: usize) {
        let next = self.next;
        let end = (next + k).min(N);
        let [primary, mirror] = &mut self.slots;
        if let (Some(to), Some(from)) = (primary.get_mut(next..end), mirror.get(next..end)) {
            to.copy_from_slice(from);
        }
        self.next = if end >= N { 0 } else { end };
    }
}
