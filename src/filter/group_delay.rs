//! Linear phase and group delay of a tap set.

use crate::headroom::Symmetry;
use crate::num::Sample;

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
