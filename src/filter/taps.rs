//! How a filter holds its taps: a whole table of exactly `N` (`&[T; N]`, its length known when
//! the firmware is compiled) or a slice of 1 to `N` taps known only at run time (a calibration
//! table read from flash, taps designed on the device). The filter code is the same for both:
//! it reads the taps through [`TapTable::as_slice`], and the tap count only decides how much of
//! the history (always the last `N` inputs) the sum covers.

use crate::Error;

mod sealed {
    /// Keeps [`TapTable`](super::TapTable) to the two holders whose length rules are checked.
    pub trait Sealed {}
}

/// A borrowed tap set as a filter of capacity `N` holds it: `&'a [T; N]` (exactly `N` taps,
/// nothing to check) or `&'a [T]` (1 to `N` taps, checked by the constructors). Sealed.
///
/// The filter types take it as their last type parameter, `&'a [T; N]` by default; the aliases
/// [`FirUpTo`](crate::filter::FirUpTo), [`DecimatorUpTo`](crate::filter::DecimatorUpTo) and
/// [`MultiChannelFirUpTo`](crate::filter::MultiChannelFirUpTo) name the slice form.
///
/// **Numerics:** none; a filter computes the same sum, rounds and saturates the same way with
/// either holder, bit for bit (the sum runs over the newest `taps.len()` inputs of its history).
///
/// ```
/// use tapline::filter::TapTable;
/// static TABLE: [i16; 3] = [1, 2, 3];
/// assert_eq!(TapTable::<i16, 3>::within_capacity(&TABLE), Ok(3));
/// let part: &[i16] = &TABLE[..2];
/// assert_eq!(TapTable::<i16, 3>::within_capacity(part), Ok(2));
/// assert_eq!(TapTable::<i16, 1>::within_capacity(part).err(),
///     Some(tapline::Error::TooManyTaps { capacity: 1, found: 2 }));
/// ```
pub trait TapTable<'a, T: 'a, const N: usize>: Copy + sealed::Sealed {
    /// The taps, h\[0\] first.
    fn as_slice(self) -> &'a [T];

    /// The tap count when it is between 1 and `N`.
    ///
    /// # Errors
    /// [`Error::NoTaps`] for an empty slice, [`Error::TooManyTaps`] for more than `N`. A whole
    /// table of `N` always passes.
    fn within_capacity(self) -> Result<usize, Error>;
}

impl<T, const N: usize> sealed::Sealed for &[T; N] {}
impl<T> sealed::Sealed for &[T] {}

impl<'a, T: 'a, const N: usize> TapTable<'a, T, N> for &'a [T; N] {
    #[inline(always)]
    fn as_slice(self) -> &'a [T] {
        self
    }

    #[inline(always)]
    fn within_capacity(self) -> Result<usize, Error> {
        Ok(N)
    }
}

impl<'a, T: 'a, const N: usize> TapTable<'a, T, N> for &'a [T] {
    #[inline(always)]
    fn as_slice(self) -> &'a [T] {
        self
    }

    fn within_capacity(self) -> Result<usize, Error> {
        match self.len() {
            0 => Err(Error::NoTaps),
            found if found > N => Err(Error::TooManyTaps { capacity: N, found }),
            found => Ok(found),
        }
    }
}

/// The staged span for `taps` taps out of a capacity of `N`: the span the ring lays out holds
/// `N − 1` history values before the staged block, and a sum over `taps` taps needs only the
/// last `taps − 1` of them. For a whole table (`taps == N`, a constant) this is the span itself.
#[inline(always)]
pub(crate) fn span_for<S, const N: usize>(span: &[S], taps: usize) -> &[S] {
    span.get(N.saturating_sub(taps)..).unwrap_or(&[])
}
