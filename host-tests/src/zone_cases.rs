//! The 2-D zone cases of the committed mpmath fixtures (`fixtures/zones/zones.csv`,
//! `fixtures/zones/sweep.csv`): one row each, turned into a zone and a normal distribution in
//! either precision.

use covgate::math::Precision;
use covgate::{CircleZone, Covariance, EllipseZone, RectZone, Zone};

use crate::fixture;

/// One fixture row: zone kind and parameters, normal mean and covariance, and the reference
/// inside and outside probabilities.
#[derive(Clone, Debug)]
pub struct Case {
    /// Line in the fixture file.
    pub line: usize,
    /// `rect`, `circle` or `ellipse`.
    pub kind: String,
    /// Mean of the normal distribution.
    pub mean: [f64; 2],
    /// Its covariance.
    pub cov: [[f64; 2]; 2],
    /// Zone parameters: rect `xlo, xhi, ylo, yhi`; circle `cx, cy, diameter`; ellipse
    /// `cx, cy, a, b, angle in degrees`.
    pub p: [f64; 5],
    /// Reference probability inside.
    pub inside: f64,
    /// Reference probability outside.
    pub outside: f64,
}

/// Every row of a zone fixture (path relative to `fixtures/`).
pub fn load(file: &str) -> Vec<Case> {
    fixture::rows(file)
        .into_iter()
        .map(|r| {
            let g = |k| r.get::<f64>(file, k);
            Case {
                line: r.line,
                kind: r.get(file, 0),
                mean: [g(1), g(2)],
                cov: [[g(3), g(4)], [g(4), g(5)]],
                p: [g(6), g(7), g(8), g(9), g(10)],
                inside: g(11),
                outside: g(12),
            }
        })
        .collect()
}

impl Case {
    /// The zone, its parameters rounded to `T`.
    pub fn zone<T: Precision>(&self) -> Zone<T> {
        let t = |v: f64| T::from_f64(v);
        let p = &self.p;
        match self.kind.as_str() {
            "rect" => Zone::Rect(RectZone::new([t(p[0]), t(p[2])], [t(p[1]), t(p[3])]).unwrap()),
            "circle" => Zone::Circle(CircleZone::new([t(p[0]), t(p[1])], t(p[2])).unwrap()),
            "ellipse" => Zone::Ellipse(
                EllipseZone::new([t(p[0]), t(p[1])], t(p[2]), t(p[3]), t(p[4].to_radians()))
                    .unwrap(),
            ),
            other => panic!("line {}: unknown zone {other}", self.line),
        }
    }

    /// Mean and covariance rounded to `T`.
    pub fn normal<T: Precision>(&self) -> ([T; 2], Covariance<T, 2>) {
        let t = |v: f64| T::from_f64(v);
        (
            [t(self.mean[0]), t(self.mean[1])],
            Covariance::from_matrix(self.cov.map(|r| r.map(t))),
        )
    }
}
