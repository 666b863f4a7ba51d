//! Precomputed chi-square control limits for the usual coverages, so that firmware needs
//! no quantile code at run time. Generated: `cargo run -p covgate-host --example chi2_table >
//! src/math/chi2_table.rs`; checked by the host test `const_table_is_the_rounded_f64_function`.

/// Chi-square upper quantiles `q` with `P(X > q) = alpha`, for 1 to 6 degrees of freedom.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Chi2Table {
    /// The false-alarm rates, one per column.
    pub alpha: [f64; 6],
    /// The coverages `1 - alpha` as written (0.90 ... 0.9999), one per column.
    pub coverages: [f64; 6],
    /// `f64` limits, row `df - 1`, column as in `alpha`.
    pub f64: [[f64; 6]; 6],
    /// The same limits rounded to `f32`.
    pub f32: [[f32; 6]; 6],
}

impl Chi2Table {
    /// The coverage of column `k` (`None` past the last column).
    pub fn coverage(&self, k: usize) -> Option<f64> {
        self.coverages.get(k).copied()
    }

    /// The `f32` limit for `df` degrees of freedom and the column whose `alpha` equals the
    /// given one exactly; `None` if there is no such entry.
    pub fn lookup_f32(&self, df: u32, alpha: f64) -> Option<f32> {
        let k = self.alpha.iter().position(|&a| a == alpha)?;
        let row = self.f32.get((df as usize).checked_sub(1)?)?;
        row.get(k).copied()
    }
}

/// The table: coverages 0.90, 0.95, 0.99, 0.9973, 0.999, 0.9999.
pub const CHI2_LIMITS: Chi2Table = Chi2Table {
    alpha: [0.10, 0.05, 0.01, 0.0027, 0.001, 0.0001],
    coverages: [0.90, 0.95, 0.99, 0.9973, 0.999, 0.9999],
    f64: [
        [
            2.7055434540954146,
            3.8414588206941254,
            6.634896601021217,
            8.999861956749696,
            10.827566170662735,
            15.136705226623395,
        ],
        [
            4.605170185988091,
            5.991464547107982,
            9.210340371976184,
            11.829007011943707,
            13.815510557964274,
            18.420680743952364,
        ],
        [
            6.2513886311703235,
            7.81472790325118,
            11.344866730144373,
            14.156252500540928,
            16.266236196238133,
            21.107513466160214,
        ],
        [
            7.779440339734857,
            9.487729036781158,
            13.276704135987625,
            16.251171152210592,
            18.46682695290317,
            23.512742444990838,
        ],
        [
            9.236356899781118,
            11.070497693516353,
            15.086272469388991,
            18.205136741736094,
            20.51500565243288,
            25.744831959055873,
        ],
        [
            10.64464067566842,
            12.59158724374398,
            16.811893829770934,
            20.061901972375544,
            22.457744484825326,
            27.856341236013915,
        ],
    ],
    f32: [
        [
            2.7055435, 3.8414588, 6.6348968, 8.999862, 10.827566, 15.136705,
        ],
        [
            4.6051702, 5.9914646, 9.2103405, 11.829007, 13.815511, 18.420681,
        ],
        [
            6.2513885, 7.814728, 11.344867, 14.156253, 16.266235, 21.107513,
        ],
        [
            7.7794404, 9.487729, 13.276704, 16.251171, 18.466827, 23.512743,
        ],
        [
            9.236357, 11.0704975, 15.086272, 18.205137, 20.515005, 25.744831,
        ],
        [
            10.644641, 12.591587, 16.811893, 20.061901, 22.457745, 27.85634,
        ],
    ],
};
