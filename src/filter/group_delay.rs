//! Linear phase and group delay of a tap set.

use crate::num::Sample;

/// The symmetry of a tap set, which decides whether its phase is linear.
///
/// Source: a length-N FIR whose taps are symmetric (h\[k\] = h\[N−1−k\]) or antisymmetric
/// (h\[k\] = −h\[N−1−k\]) has exactly linear phase and a constant group delay of (N−1)/2
/// samples (A. V. Oppenheim & R. W. Schafer, *Discrete-Time Signal Processing*, 3rd ed., 2010,
/// §5.7.3).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Symmetry {
    /// h\[k\] = h\[N−1−k\] (types I and II). All-zero taps count as symmetric.
    Symmetric,
    /// h\[k\] = −h\[N−1−k\] (types III and IV).
    Antisymmetric,
    /// Neither: the group delay depends on frequency.
    None,
}

impl Symmetry {
    /// Classifies `taps` by exact comparison of their values.
    ///
    /// ```
    /// use tapline::filter::Symmetry;
    /// assert_eq!(Symmetry::of(&[1i16, 5, 1]), Symmetry::Symmetric);
    /// assert_eq!(Symmetry::of(&[1.0f32, 0.0, -1.0]), Symmetry::Antisymmetric);
    /// assert_eq!(Symmetry::of(&[1i16, 2]), Symmetry::None);
    /// ```
    #[must_use]
    pub fn of<T: Sample>(taps: &[T]) -> Symmetry {
        let pairs = || {
            taps.iter()
                .zip(taps.iter().rev())
                .map(|(a, b)| (a.to_f64(), b.to_f64()))
        };
        if pairs().all(|(a, b)| a == b) {
            Symmetry::Symmetric
        } else if pairs().all(|(a, b)| a == -b) {
            Symmetry::Antisymmetric
        } else {
            Symmetry::None
        }
    }
}

/// A constant group delay, held exactly as a count of half samples: (N−1)/2 samples is a whole
/// number for odd N and a half-integer for even N.
///
/// ```
/// use tapline::GroupDelay;
/// let d = GroupDelay::of(&[1i16, 2, 2, 1]);
/// assert_eq!(d.map(|d| (d.half_samples(), d.samples())), Some((3, 1.5)));
/// assert_eq!(GroupDelay::of(&[1i16, 2]), None); // not linear phase
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GroupDelay {
    half_samples: usize,
}

impl GroupDelay {
    /// The group delay of `taps` when they are symmetric or antisymmetric: (N−1)/2 samples;
    /// `None` when the phase is not linear (the delay then varies with frequency) or `taps` is
    /// empty.
    #[must_use]
    pub fn of<T: Sample>(taps: &[T]) -> Option<GroupDelay> {
        match (taps.len(), Symmetry::of(taps)) {
            (0, _) | (_, Symmetry::None) => None,
            (n, _) => Some(GroupDelay {
                half_samples: n - 1,
            }),
        }
    }

    /// A delay of `half_samples`/2 samples, for structures whose delay follows from their
    /// configuration rather than from a tap table.
    pub(crate) const fn from_half_samples(half_samples: usize) -> GroupDelay {
        GroupDelay { half_samples }
    }

    /// Twice the delay in samples: exact.
    #[must_use]
    pub const fn half_samples(self) -> usize {
        self.half_samples
    }

    /// The delay in samples (exact for any length below 2^24).
    #[must_use]
    pub fn samples(self) -> f32 {
        self.half_samples as f32 / 2.0
    }

    /// The delay in seconds at a sample rate of `sample_rate_hz`.
    ///
    /// ```
    /// use tapline::GroupDelay;
    /// let d = GroupDelay::of(&[1.0f32; 31]);
    /// assert_eq!(d.map(|d| d.seconds(1000.0)), Some(0.015)); // 15 samples at 1 kHz
    /// ```
    #[must_use]
    pub fn seconds(self, sample_rate_hz: f32) -> f32 {
        self.samples() / sample_rate_hz
    }
}
