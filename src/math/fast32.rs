//! Single-precision kernels for the zone quadratures: `exp`, `sin` and `cos` on the ranges the
//! quadratures use, and the standard normal tails. They replace `libm`'s general routines at
//! every quadrature node of the `f32` path, where those dominate the cost (on an FPU without
//! double precision, `libm`'s `sinf` works in software `f64`). Accuracy: a few ulp of `f32`
//! (the host test `kernels_against_f64` measures it); the `f32` zone probabilities they feed
//! are tested against mpmath.

/// `log2(e)`.
const LOG2E: f32 = core::f32::consts::LOG2_E;
/// `ln 2` split Cody–Waite style: the high part has 15 significant bits, so `k LN2_HI` is
/// exact for `|k| <= 256`.
const LN2_HI: f32 = 0.693_145_75;
const LN2_LO: f32 = 1.428_606_8e-6;
/// 1.5 * 2^23: adding and subtracting it rounds an `f32` of size below 2^22 to an integer.
const ROUNDER: f32 = 12_582_912.0;

/// `e^x` in single precision.
///
/// Method: `x = k ln 2 + r` with `k = round(x / ln 2)` and `|r| <= ln(2) / 2`, the Taylor
/// polynomial of `e^r` to degree 7 (truncation at most 7.3e-9 relative), scaled by `2^k` through
/// the exponent bits. Results below the smallest normal `f32` (about 1.2e-38, `x < -87.33`)
/// are flushed to 0; `x > 88.72` gives infinity; NaN gives NaN.
#[inline]
pub fn exp32(x: f32) -> f32 {
    if !(x > -87.33) {
        return if x.is_nan() { x } else { 0.0 };
    }
    if x > 88.72 {
        return f32::INFINITY;
    }
    let kf = (x * LOG2E + ROUNDER) - ROUNDER;
    let r = (x - kf * LN2_HI) - kf * LN2_LO;
    let p = 1.0
        + r * (1.0
            + r * (0.5
                + r * (1.0 / 6.0
                    + r * (1.0 / 24.0
                        + r * (1.0 / 120.0 + r * (1.0 / 720.0 + r * (1.0 / 5040.0)))))));
    // k in [-126, 128]: 2^k as exponent bits, with k = 128 split in two.
    let k = kf as i32;
    let (k, extra) = if k > 127 { (k - 1, 2.0) } else { (k, 1.0) };
    p * f32::from_bits(((k + 127) as u32) << 23) * extra
}

/// `sin x` for `|x| <= 1.6` (the quadratures stay within `[-pi/2, pi/2]`): odd Taylor
/// polynomial to degree 13, truncation below 1e-9. Outside that range the result is not `sin`.
#[inline]
pub fn sin32(x: f32) -> f32 {
    let s = x * x;
    x * (1.0
        + s * (-1.0 / 6.0
            + s * (1.0 / 120.0
                + s * (-1.0 / 5040.0
                    + s * (1.0 / 362_880.0
                        + s * (-1.0 / 39_916_800.0 + s * (1.0 / 6_227_020_800.0)))))))
}

/// `cos x` for `|x| <= 1.6`: even Taylor polynomial to degree 14, truncation below 1e-10.
#[inline]
pub fn cos32(x: f32) -> f32 {
    let s = x * x;
    1.0 + s
        * (-0.5
            + s * (1.0 / 24.0
                + s * (-1.0 / 720.0
                    + s * (1.0 / 40_320.0
                        + s * (-1.0 / 3_628_800.0
                            + s * (1.0 / 479_001_600.0 + s * (-1.0 / 87_178_291_200.0)))))))
}

/// `P(t)` of `erfc(z) = t exp(-z^2 + P(t))`, `t = 1 / (1 + z / 2)`, fitted by
/// `fixtures/kernels/generate.py` (its output line:
// mpmath 1.3.0, numpy 2.4.6, degree 11: max |error of P| 9.19e-09 (fit points 9.19e-09)).
#[allow(clippy::excessive_precision)] // the fitted f64 values as printed; rounded to f32 here
const ERFC_P: [f32; 12] = [
    -1.265512133e+00,
    1.000001434e+00,
    3.749703742e-01,
    8.326796707e-02,
    -7.957603577e-02,
    -2.130433000e-01,
    2.797393869e-01,
    -1.127575106e+00,
    2.287552728e+00,
    -2.126123351e+00,
    9.594704392e-01,
    -1.731724128e-01,
];

/// The standard normal tails `(P(Z <= x), P(Z > x))` in single precision.
///
/// Method: the smaller tail is `erfc(|x| / sqrt 2) / 2` from `erfc(z) = t exp(-z^2 + P(t))`,
/// `t = 1 / (1 + z / 2)` (the form of the classic Chebyshev-fitted approximation, with
/// coefficients fitted afresh: relative error of `P` 9e-9 over all `z >= 0` in `f64`, about
/// 3e-8 with the coefficients rounded to `f32`); the larger is
/// one minus it. The smaller tail keeps its relative accuracy out to `|x|` of about 13, beyond
/// which it underflows to 0; the rounding of the exponent `P - x^2 / 2` makes the relative
/// error grow like `(1 + x^2 / 2) 2^-24` (a few ulp near the centre, about 2e-6 at the ppm
/// level `x = 4.75`).
/// `x = -inf` gives (0, 1), `x = inf` (1, 0), NaN gives NaN.
#[inline]
pub fn normal_tails32(x: f32) -> (f32, f32) {
    let z = x.abs() * core::f32::consts::FRAC_1_SQRT_2;
    let t = 1.0 / (1.0 + 0.5 * z);
    let mut p = ERFC_P[ERFC_P.len() - 1];
    for &c in ERFC_P.iter().rev().skip(1) {
        p = p * t + c;
    }
    // z^2 = x^2 / 2 from x itself: one rounding fewer than squaring z.
    super::precision::tails_from_smaller(x, 0.5 * t * exp32(p - x * x * 0.5))
}
