//! The k-of-n rule: raise when at least `k` of the last `n` flags are set.

/// A sliding window of the last `n <= 32` flags (a bit mask), raising when at least `k` are
/// set: `k = n` is a debounce (n in a row), `k = 1, n = 1` passes every flag through.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct KofN {
    bits: u32,
    k: u8,
    n: u8,
}

impl KofN {
    /// `1 <= k <= n <= 32`, else `None`.
    pub fn new(k: u8, n: u8) -> Option<Self> {
        (k >= 1 && k <= n && n <= 32).then_some(KofN { bits: 0, k, n })
    }

    /// Takes one flag; `true` when at least `k` of the last `n` are set.
    #[inline]
    pub fn push(&mut self, flag: bool) -> bool {
        let mask = if self.n >= 32 {
            u32::MAX
        } else {
            (1u32 << self.n) - 1
        };
        self.bits = ((self.bits << 1) | u32::from(flag)) & mask;
        self.bits.count_ones() >= u32::from(self.k)
    }

    /// `(k, n)`.
    pub fn k_of_n(&self) -> (u8, u8) {
        (self.k, self.n)
    }

    /// Forgets the window.
    pub fn reset(&mut self) {
        self.bits = 0;
    }
}

#[cfg(test)]
mod tests {
    use super::KofN;

    #[test]
    fn two_of_three() {
        let mut r = KofN::new(2, 3).unwrap();
        let got: [bool; 6] = [true, false, true, false, false, true].map(|f| r.push(f));
        assert_eq!(got, [false, false, true, false, false, false]);
        assert!(
            KofN::new(0, 3).is_none() && KofN::new(4, 3).is_none() && KofN::new(1, 33).is_none()
        );
        let mut d = KofN::new(32, 32).unwrap();
        assert!((0..31).all(|_| !d.push(true)) && d.push(true));
    }
}
