//! Double-word ("float-float") arithmetic: a value held as an unevaluated sum
//! hi + lo of two floats, from the error-free transformations TwoSum (Knuth,
//! TAOCP vol. 2 §4.2.2) and TwoProduct with Veltkamp's splitting (Dekker 1971,
//! "A floating-point technique for extending the available precision",
//! Numer. Math. 18:224–242). Used where f32 must carry an exponent of the
//! size of 60 to better than one ulp; no fused multiply-add is needed (libm's
//! software `fmaf` would go through f64).

use crate::Real;

/// hi + lo with |lo| ≤ ulp(hi)/2.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Dw<F> {
    pub(crate) hi: F,
    pub(crate) lo: F,
}

impl<F: Real> Dw<F> {
    pub(crate) fn of(v: F) -> Self {
        Dw { hi: v, lo: F::ZERO }
    }

    /// The value rounded to one float.
    pub(crate) fn value(self) -> F {
        self.hi + self.lo
    }

    /// Exact a + b.
    pub(crate) fn two_sum(a: F, b: F) -> Self {
        let s = a + b;
        let bb = s - a;
        let e = (a - (s - bb)) + (b - bb);
        Dw { hi: s, lo: e }
    }

    fn fast_two_sum(a: F, b: F) -> Self {
        let s = a + b;
        Dw {
            hi: s,
            lo: b - (s - a),
        }
    }

    fn split(a: F) -> (F, F) {
        let c = F::SPLITTER * a;
        let hi = c - (c - a);
        (hi, a - hi)
    }

    /// Exact a · b (barring underflow).
    pub(crate) fn two_prod(a: F, b: F) -> Self {
        let p = a * b;
        let (ah, al) = Self::split(a);
        let (bh, bl) = Self::split(b);
        let e = ((ah * bh - p) + ah * bl + al * bh) + al * bl;
        Dw { hi: p, lo: e }
    }

    pub(crate) fn add(self, o: Self) -> Self {
        let s = Self::two_sum(self.hi, o.hi);
        Self::fast_two_sum(s.hi, s.lo + self.lo + o.lo)
    }

    pub(crate) fn mul(self, o: Self) -> Self {
        let p = Self::two_prod(self.hi, o.hi);
        Self::fast_two_sum(p.hi, p.lo + (self.hi * o.lo + self.lo * o.hi))
    }

    pub(crate) fn div(self, o: Self) -> Self {
        let q = self.hi / o.hi;
        let p = Dw::of(q).mul(o);
        let r = ((self.hi - p.hi) - p.lo + self.lo) / o.hi;
        Self::fast_two_sum(q, r)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn products_and_quotients_carry_extra_bits() {
        let a = 1.1_f32;
        let b = 3.3_f32;
        let p = Dw::two_prod(a, b);
        let exact = f64::from(a) * f64::from(b);
        assert_eq!(f64::from(p.hi) + f64::from(p.lo), exact);
        let q = Dw::of(a).div(Dw::of(b));
        let want = f64::from(a) / f64::from(b);
        assert!(((f64::from(q.hi) + f64::from(q.lo)) / want - 1.0).abs() < 1e-13);
        let s = Dw::two_sum(1e8_f32, 1.25);
        assert_eq!(f64::from(s.hi) + f64::from(s.lo), 1e8 + 1.25);
    }
}
