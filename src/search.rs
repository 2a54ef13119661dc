//! Integer search shared by every tier: bracket from a guess by galloping,
//! then bisect. The predicate is evaluated O(log(distance from the guess))
//! times.

/// Smallest n in `[min, max]` with `accept(n)`, for a predicate that is false
/// below some point and true from it on; `None` if `accept(max)` is false.
///
/// `guess` is where to start (clamped into the range) and `step` the first
/// galloping stride (doubled on each miss).
pub(crate) fn first_accepted<E>(
    min: u32,
    max: u32,
    guess: u32,
    step: u32,
    mut accept: impl FnMut(u32) -> Result<bool, E>,
) -> Result<Option<u32>, E> {
    let b = bracket(min, max, guess, step, &mut accept)?;
    let b = bisect(b, 1, &mut accept)?;
    Ok(b.answer(max))
}

/// A bracket of the switch point: `lo` is rejected (or `min - 1`), `hi` is
/// accepted (or `max + 1`, standing for "none in range").
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Bracket {
    /// Largest n known to be rejected.
    pub lo: i64,
    /// Smallest n known to be accepted.
    pub hi: i64,
}

impl Bracket {
    /// The switch point once the bracket is closed (`hi - lo == 1`).
    pub(crate) fn answer(self, max: u32) -> Option<u32> {
        if self.hi > i64::from(max) {
            None
        } else {
            Some(self.hi as u32)
        }
    }
}

/// Gallops from `guess` with strides `step`, `2 step`, … to a bracket.
pub(crate) fn bracket<E>(
    min: u32,
    max: u32,
    guess: u32,
    step: u32,
    accept: &mut impl FnMut(u32) -> Result<bool, E>,
) -> Result<Bracket, E> {
    let mut lo = i64::from(min) - 1;
    let mut hi = i64::from(max) + 1;
    let g = i64::from(guess.clamp(min, max));
    let mut stride = i64::from(step.max(1));
    if accept(g as u32)? {
        hi = g;
        loop {
            let t = hi - stride;
            if t <= lo {
                break;
            }
            if accept(t as u32)? {
                hi = t;
                stride = stride.saturating_mul(2);
            } else {
                lo = t;
                break;
            }
        }
    } else {
        lo = g;
        loop {
            let t = lo + stride;
            if t >= hi {
                break;
            }
            if accept(t as u32)? {
                hi = t;
                break;
            }
            lo = t;
            stride = stride.saturating_mul(2);
        }
    }
    Ok(Bracket { lo, hi })
}

/// Bisects until `hi - lo <= width` (width ≥ 1).
pub(crate) fn bisect<E>(
    mut b: Bracket,
    width: i64,
    accept: &mut impl FnMut(u32) -> Result<bool, E>,
) -> Result<Bracket, E> {
    while b.hi - b.lo > width.max(1) {
        let m = b.lo + (b.hi - b.lo) / 2;
        if accept(m as u32)? {
            b.hi = m;
        } else {
            b.lo = m;
        }
    }
    Ok(b)
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #[test]
        fn finds_the_switch_point(t in 0u32..5000, guess in 0u32..6000, step in 0u32..300) {
            let mut calls = 0u32;
            let got = first_accepted::<()>(0, 5000, guess, step, |n| { calls += 1; Ok(n >= t) }).unwrap();
            prop_assert_eq!(got, Some(t));
            prop_assert!(calls <= 40);
        }

        #[test]
        fn reports_none_when_never_accepted(guess in 0u32..100) {
            let got = first_accepted::<()>(3, 50, guess, 2, |_| Ok(false)).unwrap();
            prop_assert_eq!(got, None);
        }
    }

    #[test]
    fn handles_full_u32_range() {
        let got = first_accepted::<()>(0, u32::MAX, 7, 1, |n| Ok(n >= u32::MAX - 3)).unwrap();
        assert_eq!(got, Some(u32::MAX - 3));
        let got = first_accepted::<()>(1, u32::MAX, u32::MAX, 1, |n| Ok(n >= 1)).unwrap();
        assert_eq!(got, Some(1));
    }
}
