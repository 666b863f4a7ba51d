//! Prints `src/math/chi2_table.rs`, the const table of chi-square limits that firmware uses
//! without computing anything. Regenerate with
//!
//!     cargo run -p covgate-host --example chi2_table > src/math/chi2_table.rs
//!
//! The test `const_table_is_the_rounded_f64_function` checks the committed table against
//! the f64 function.

use covgate::math::ChiSquare;

const ALPHAS: [&str; 6] = ["0.10", "0.05", "0.01", "0.0027", "0.001", "0.0001"];
const COVERAGES: [&str; 6] = ["0.90", "0.95", "0.99", "0.9973", "0.999", "0.9999"];

fn main() {
    let alphas: Vec<f64> = ALPHAS.iter().map(|a| a.parse().unwrap()).collect();
    let mut f64_rows = String::new();
    let mut f32_rows = String::new();
    for df in 1..=6u32 {
        let c = ChiSquare::new(df).unwrap();
        let q: Vec<f64> = alphas
            .iter()
            .map(|&a| c.quantile_upper(a).unwrap())
            .collect();
        let f64s: Vec<String> = q.iter().map(|v| format!("{v:?}")).collect();
        let f32s: Vec<String> = q.iter().map(|v| format!("{:?}", *v as f32)).collect();
        f64_rows.push_str(&format!("        [{}],\n", f64s.join(", ")));
        f32_rows.push_str(&format!("        [{}],\n", f32s.join(", ")));
    }
    print!(
        "//! Precomputed chi-square control limits for the usual coverages, so that firmware needs
//! no quantile code at run time. Generated: `cargo run -p covgate-host --example chi2_table >
//! src/math/chi2_table.rs`; checked by the host test `const_table_is_the_rounded_f64_function`.

/// Chi-square upper quantiles `q` with `P(X > q) = alpha`, for 1 to 6 degrees of freedom.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = \"defmt\", derive(defmt::Format))]
pub struct Chi2Table {{
    /// The false-alarm rates, one per column.
    pub alpha: [f64; 6],
    /// The coverages `1 - alpha` as written (0.90 ... 0.9999), one per column.
    pub coverages: [f64; 6],
    /// `f64` limits, row `df - 1`, column as in `alpha`.
    pub f64: [[f64; 6]; 6],
    /// The same limits rounded to `f32`.
    pub f32: [[f32; 6]; 6],
}}

impl Chi2Table {{
    /// The coverage of column `k` (`None` past the last column).
    pub fn coverage(&self, k: usize) -> Option<f64> {{
        self.coverages.get(k).copied()
    }}

    /// The `f32` limit for `df` degrees of freedom and the column whose `alpha` equals the
    /// given one exactly; `None` if there is no such entry.
    pub fn lookup_f32(&self, df: u32, alpha: f64) -> Option<f32> {{
        let k = self.alpha.iter().position(|&a| a == alpha)?;
        let row = self.f32.get((df as usize).checked_sub(1)?)?;
        row.get(k).copied()
    }}
}}

/// The table: coverages 0.90, 0.95, 0.99, 0.9973, 0.999, 0.9999.
pub const CHI2_LIMITS: Chi2Table = Chi2Table {{
    alpha: [{}],
    coverages: [{}],
    f64: [
{}    ],
    f32: [
{}    ],
}};
",
        ALPHAS.join(", "),
        COVERAGES.join(", "),
        f64_rows,
        f32_rows
    );
}
