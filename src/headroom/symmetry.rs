//! Symmetry of a tap set: the analysis that decides linear phase, shared by the filters (group
//! delay, the folded kernel) and by design (quantizing symmetric taps symmetrically).

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
