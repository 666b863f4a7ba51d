//! A small seeded generator and the draws the confidence bounds need: uniform, normal,
//! chi-square. No heap, no `std`, the same sequence on every core and on the host.

use super::Real;

/// xoshiro128** (Blackman & Vigna 2018, "Scrambled linear pseudorandom number generators"):
/// 128 bits of state, 32-bit output, period 2^128 - 1, only 32-bit operations per draw (cheap
/// on a Cortex-M0). Seeded from a `u64` through SplitMix64 (the seeding the same authors
/// recommend), so every seed, 0 included, gives a usable state.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Xoshiro128 {
    s: [u32; 4],
}

impl Xoshiro128 {
    /// The generator for `seed`.
    pub fn new(seed: u64) -> Self {
        let mut z = seed;
        let mut next = || {
            z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut x = z;
            x = (x ^ (x >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            x = (x ^ (x >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            x ^ (x >> 31)
        };
        let (a, b) = (next(), next());
        Xoshiro128 {
            s: [a as u32, (a >> 32) as u32, b as u32, (b >> 32) as u32],
        }
    }

    /// The next 32 random bits.
    pub fn next_u32(&mut self) -> u32 {
        let s = &mut self.s;
        let out = s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s[1] << 9;
        s[2] ^= s[0];
        s[3] ^= s[1];
        s[1] ^= s[2];
        s[0] ^= s[3];
        s[2] ^= t;
        s[3] = s[3].rotate_left(11);
        out
    }

    /// Uniform on the open interval (0, 1): 45 random bits and a half step, so neither end
    /// occurs (in `f32` the value is rounded and capped just below 1).
    pub fn uniform<T: Real>(&mut self) -> T {
        let hi = T::from_u32(self.next_u32() >> 8); // 24 bits
        let lo = T::from_u32(self.next_u32() >> 11); // 21 bits
        let u = (hi + (lo + T::from_f64(0.5)) * T::from_f64(1.0 / 2_097_152.0))
            * T::from_f64(1.0 / 16_777_216.0);
        u.min(T::ONE - T::EPSILON * T::from_f64(0.5))
    }

    /// Two independent standard normals (Box & Muller 1958).
    pub fn normal_pair<T: Real>(&mut self) -> (T, T) {
        let u = self.uniform::<T>();
        let v = self.uniform::<T>();
        let r = (-(u.ln() + u.ln())).sqrt();
        let t = v * T::from_f64(core::f64::consts::TAU);
        (r * t.cos(), r * t.sin())
    }

    /// A chi-square draw with `dof >= 1` degrees of freedom: twice a gamma(dof / 2) draw by
    /// Marsaglia & Tsang (2000), ACM TOMS 26(3), with their `u^(1/a)` boost below shape 1.
    /// The rejection loop accepts with probability above 0.95 per try; it is capped at 64
    /// tries, after which (probability below 1e-80) the mean `dof` is returned, so the time is
    /// bounded.
    pub fn chi_square<T: Real>(&mut self, dof: u32) -> T {
        let half = T::from_f64(0.5);
        let a = T::from_u32(dof) * half;
        let (shape, boost) = if dof >= 2 {
            (a, T::ONE)
        } else {
            let u = self.uniform::<T>();
            (a + T::ONE, (u.ln() / a).exp())
        };
        let d = shape - T::from_f64(1.0 / 3.0);
        let c = T::ONE / (T::from_f64(9.0) * d).sqrt();
        for _ in 0..64 {
            let (x, _) = self.normal_pair::<T>();
            let v = T::ONE + c * x;
            if !(v > T::ZERO) {
                continue;
            }
            let v = v * v * v;
            let u = self.uniform::<T>();
            if u.ln() < half * x * x + d - d * v + d * v.ln() {
                return (d + d) * v * boost;
            }
        }
        T::from_u32(dof)
    }
}
