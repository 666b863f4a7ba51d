//! The invented demo scenarios: seeded generators of their captures (the same code writes
//! `fixtures/demo/*.csv` and feeds `covgate demo`).

use std::fmt::Write as _;

use crate::seeded::Rng;

/// A scenario: name, what it shows, its capture, and the replay flags it is run with.
pub struct Scenario {
    /// Folder name.
    pub name: &'static str,
    /// One paragraph for the README and the demo's output.
    pub story: &'static str,
    /// The capture as CSV text.
    pub csv: String,
    /// Replay flags.
    pub flags: &'static [&'static str],
}

/// Bracket drilling cell: hole offsets from true position in micrometres; tool wear from part
/// 250 pushes the holes in +x and widens the spread.
pub fn drilling() -> Scenario {
    let mut rng = Rng::from_seed(0x00D1_2111);
    let mut csv = String::from("part,x,y,spindle_load\n");
    for part in 1..=400u32 {
        let wear = f64::from(part.saturating_sub(250));
        let (z1, z2) = (rng.normal(), rng.normal());
        let x = 2.0 + 0.12 * wear + (6.0 + 0.02 * wear) * z1;
        let y = -1.0 + 5.0 * (0.4 * z1 + 0.917 * z2);
        let load = 61.0 + 0.03 * wear + rng.normal();
        let _ = writeln!(
            csv,
            "{part},{:.1},{:.1},{load:.1}",
            x.round() * 1.0,
            y.round() * 1.0
        );
    }
    Scenario {
        name: "drilling-cell",
        story: "Bracket drilling cell: hole offsets from true position (um). The first 100 parts \
                learn the baseline; the positional tolerance is 60 um diameter. From part 250 \
                tool wear pushes the holes in +x (0.12 um per part) and widens their spread: \
                the MEWMA (lambda 0.1, h 12.34 for an in-control ARL of 1000) raises its alarm \
                long before many holes leave the tolerance. Alarms are acknowledged at once so \
                that every one shows; an alarm before part 250 is a false alarm (a baseline of \
                100 parts makes the real in-control ARL shorter than the known-parameter 1000).",
        csv,
        flags: &[
            "--learn",
            "100",
            "--circle",
            "0,0,60",
            "--chart",
            "mewma:0.1:12.34",
            "--acknowledge",
        ],
    }
}

/// Footbridge pier tilt node: two-axis tilt in microradians at 0.5 urad resolution, with a
/// slow lean on the second axis from reading 300.
///
/// Invented structural-monitoring data: a drift alarm does not replace structural inspection or
/// an engineer's assessment of the structure, and it is not a public warning system (README.md,
/// Safety).
pub fn footbridge() -> Scenario {
    let mut rng = Rng::from_seed(0xB41D_6E00);
    let mut csv = String::from("reading,x,y,temp_c\n");
    for t in 1..=600u32 {
        let (z1, z2) = (rng.normal(), rng.normal());
        let lean = if t > 300 {
            0.02 * f64::from(t - 300)
        } else {
            0.0
        };
        let temp = 12.0 + 3.0 * (f64::from(t) / 90.0).sin();
        let x = 120.0 + 4.0 * z1;
        let y = -35.0 + 2.5 * (0.5 * z1 + 0.866 * z2) + lean;
        let q = |v: f64| (v * 2.0).round() / 2.0;
        let _ = writeln!(csv, "{t},{},{},{temp:.2}", q(x), q(y));
    }
    Scenario {
        name: "footbridge-tilt",
        story: "Footbridge pier tilt node: two-axis tilt (urad, 0.5 urad steps). The first 100 \
                readings learn the baseline; from reading 300 the pier leans slowly along the \
                second axis (0.02 urad per reading). Crosier's CUSUM (k 0.5, h 7.36 for an \
                in-control ARL of 1000) notices the lean while most single readings are still \
                inside the gate. Alarms are acknowledged at once so that every one shows; an \
                alarm before reading 300 is a false alarm.",
        csv,
        flags: &[
            "--learn",
            "100",
            "--chart",
            "mcusum:0.5:7.36",
            "--acknowledge",
        ],
    }
}

/// Every scenario.
pub fn all() -> Vec<Scenario> {
    vec![drilling(), footbridge()]
}
