//! The firmware on emulated Cortex-M0, M3 and M4F (QEMU): builds and runs each board crate
//! under `boards/`, and compares what it prints with the same code run here.
//!
//! Needs `qemu-system-arm`, the three thumb targets and rustup's `llvm-tools`. Without them
//! (detected by `host-tests/build.rs`) the test is `#[ignore]`d with the reason, so cargo's
//! summary counts it as ignored; with `CI=true` it always runs and a missing tool fails it.
//!
//! `cargo test -p covgate-host --test firmware -- --nocapture` prints the instruction counts.

use covgate_host::reference;
use std::path::Path;
use std::process::Command;

const BOARDS: [(&str, &str); 3] = [
    ("qemu-m0", "thumbv6m-none-eabi"),
    ("qemu-m3", "thumbv7m-none-eabi"),
    ("qemu-m4f", "thumbv7em-none-eabihf"),
];

fn tools_missing() -> Option<String> {
    let qemu = Command::new("qemu-system-arm").arg("--version").output();
    if !qemu.is_ok_and(|o| o.status.success()) {
        return Some("qemu-system-arm not found".into());
    }
    let installed = Command::new("rustup")
        .args(["target", "list", "--installed"])
        .output()
        .ok()?;
    let list = String::from_utf8_lossy(&installed.stdout).to_string();
    BOARDS
        .iter()
        .find(|(_, t)| !list.contains(t))
        .map(|(_, t)| format!("rust target {t} not installed"))
}

/// The f32 values of a line of hexadecimal bit patterns after `prefix`, skipping words that
/// are not 8-digit hex (labels such as `mean`, counts).
fn f32_bits(line: &str, prefix: &str) -> Vec<f64> {
    line[prefix.len()..]
        .split_whitespace()
        .filter(|w| w.len() == 8)
        .filter_map(|w| u32::from_str_radix(w, 16).ok())
        .map(|b| f64::from(f32::from_bits(b)))
        .collect()
}

/// The board's f32 statistics against an independent f64 reference (two-pass compensated
/// mean and covariance; Gaussian elimination for d^2), with stated tolerances:
/// mean and covariance within 2e-6 relative to the spread (sd, sqrt(c_ii c_jj)), d^2 within
/// 2e-6 relative + 1e-6 absolute. Returns the worst errors found.
fn f32_against_reference(board: &str, lines: &[&str]) -> (f64, f64, f64) {
    let find = |p: &str| {
        lines
            .iter()
            .find(|l| l.starts_with(p))
            .unwrap_or_else(|| panic!("{board} prints {p}"))
            .to_string()
    };
    let xs: Vec<[f64; 2]> = covgate_firmware::samples()
        .map(|x| [f64::from(x[0]), f64::from(x[1])])
        .collect();
    let r = reference::moments(&xs);
    let rc = r.sample_cov();
    let got = f32_bits(&find("replay-f32 summary "), "replay-f32 summary ");
    assert_eq!(got.len(), 5, "{board}: summary line");
    let sd = [rc[0][0].sqrt(), rc[1][1].sqrt()];
    let mean_err = (0..2)
        .map(|i| (got[i] - r.mean[i]).abs() / sd[i])
        .fold(0.0, f64::max);
    let cov_err = [(0, 0, 2), (0, 1, 3), (1, 1, 4)]
        .iter()
        .map(|&(i, j, k)| (got[k] - rc[i][j]).abs() / (sd[i] * sd[j]))
        .fold(0.0, f64::max);
    assert!(mean_err < 2e-6, "{board}: f32 mean off by {mean_err:e} sd");
    assert!(cov_err < 2e-6, "{board}: f32 covariance off by {cov_err:e}");
    // d^2 of every sample against the board's learned baseline, recomputed in f64.
    let base = f32_bits(&find("replay-f32 mean "), "replay-f32 mean ");
    let d2 = f32_bits(&find("replay-f32 d2"), "replay-f32 d2");
    assert_eq!(d2.len(), xs.len(), "{board}: one d^2 per sample");
    let (m, c) = ([base[0], base[1]], [[base[2], base[3]], [base[3], base[4]]]);
    let mut d2_err: f64 = 0.0;
    for (x, &g) in xs.iter().zip(d2.iter()) {
        let want = reference::mahalanobis2(&m, &c, x).unwrap();
        let e = (g - want).abs() / (want + 0.5);
        assert!(e < 2e-6, "{board}: d^2 at {x:?}: f32 {g}, f64 {want}");
        d2_err = d2_err.max(e);
    }
    (mean_err, cov_err, d2_err)
}

/// The firmware's own replay function, run here on the host.
fn host_replay() -> (String, String, String) {
    let mut out = String::new();
    covgate_firmware::replay(&mut out);
    let line = |prefix: &str| {
        out.lines()
            .find(|l| l.starts_with(prefix))
            .unwrap_or_else(|| panic!("host replay prints {prefix}"))
            .to_string()
    };
    (
        line("replay-int "),
        line("replay-f32 verdicts "),
        line("replay-f32 mean "),
    )
}

#[test]
#[cfg_attr(
    covgate_no_emulator,
    ignore = "qemu-system-arm, a thumb target or llvm-tools missing (see DEVELOPERS.md; CI=true makes this a failure)"
)]
fn firmware_runs_on_three_cores_and_matches_the_host() {
    if let Some(why) = tools_missing() {
        panic!("the emulator tests cannot run: {why} (install qemu-system-arm, the thumb targets and llvm-tools; see DEVELOPERS.md)");
    }
    let (int, verdicts, stats) = host_replay();
    let mut host_out = String::new();
    covgate_firmware::replay(&mut host_out);
    let host_lines: Vec<String> = host_out.lines().map(str::to_string).collect();
    let boards = Path::new(env!("CARGO_MANIFEST_DIR")).join("../boards");
    let mut table = Vec::new();
    for (board, _) in BOARDS {
        let out = Command::new(env!("CARGO"))
            .args(["run", "--release", "--quiet"])
            .current_dir(boards.join(board))
            .env_remove("CARGO_TARGET_DIR")
            .output()
            .expect("cargo runs");
        let stdout = String::from_utf8_lossy(&out.stdout).to_string();
        let stderr = String::from_utf8_lossy(&out.stderr).to_string();
        assert!(
            out.status.success(),
            "{board}: exit {:?}\n{stdout}\n{stderr}",
            out.status.code()
        );
        let lines: Vec<&str> = stdout.lines().collect();
        assert!(lines.contains(&"done 0"), "{board}: {stdout}");
        for l in lines.iter().filter(|l| l.starts_with("check ")) {
            assert!(l.split_whitespace().nth(2) == Some("ok"), "{board}: {l}");
        }
        // The integer path is bit-identical; the f32 verdicts and statistics too (same code,
        // IEEE single precision on every core, soft or hard float).
        assert!(
            lines.contains(&int.as_str()),
            "{board}: integer replay differs\nhost: {int}\n{stdout}"
        );
        assert!(
            lines.contains(&verdicts.as_str()),
            "{board}: verdicts differ\nhost: {verdicts}\n{stdout}"
        );
        assert!(
            lines.contains(&stats.as_str()),
            "{board}: f32 statistics differ\nhost: {stats}\n{stdout}"
        );
        for p in ["replay-f32 d2", "replay-f32 summary ", "replay-f32 bound "] {
            let host = host_lines.iter().find(|l| l.starts_with(p));
            assert!(
                host.is_some_and(|h| lines.contains(&h.as_str())),
                "{board}: {p} differs from the host"
            );
        }
        let (me, ce, de) = f32_against_reference(board, &lines);
        println!("{board}: f32 vs f64 reference: mean {me:.1e} sd, covariance {ce:.1e}, d^2 {de:.1e} (relative + 1e-6 absolute); tolerance 2e-6");
        for l in lines.iter().filter(|l| l.starts_with("count ")) {
            let f: Vec<&str> = l.split_whitespace().collect();
            table.push((board, f[1].to_string(), f[2].parse::<u64>().unwrap()));
        }
    }
    println!("\ninstructions per call (QEMU -icount shift=0, SysTick calibrated on a known loop):");
    let ops: Vec<String> = table
        .iter()
        .filter(|r| r.0 == "qemu-m0")
        .map(|r| r.1.clone())
        .collect();
    println!(
        "{:<32} {:>10} {:>10} {:>10}",
        "operation", "M0", "M3", "M4F"
    );
    for op in ops {
        let get = |b: &str| {
            table
                .iter()
                .find(|r| r.0 == b && r.1 == op)
                .map_or(0, |r| r.2)
        };
        println!(
            "{op:<32} {:>10} {:>10} {:>10}",
            get("qemu-m0"),
            get("qemu-m3"),
            get("qemu-m4f")
        );
    }
    assert!(table.len() >= 27, "every board prints its counts");
    let flash = no_float_on_the_m0_integer_path(&boards);
    within_budget(&table, &flash);
}

/// Committed budgets (`boards/budgets.csv`: board, operation, instructions; operation `flash`
/// for the flash bytes of the board's test firmware). Instruction counts under `-icount` are
/// deterministic, so a count more than 2 % above its budget is a regression and fails, with
/// both numbers printed; so does a count without a budget. A count well below its budget is
/// reported, so the budget can be lowered with the change that earned it.
fn within_budget(table: &[(&str, String, u64)], flash: &[(&str, u64)]) {
    let file = Path::new(env!("CARGO_MANIFEST_DIR")).join("../boards/budgets.csv");
    let text = std::fs::read_to_string(&file).expect("boards/budgets.csv");
    let mut budget = std::collections::HashMap::new();
    for (n, line) in text.lines().enumerate() {
        if line.starts_with('#') || line.trim().is_empty() || line.starts_with("board,") {
            continue;
        }
        let f: Vec<&str> = line.split(',').map(str::trim).collect();
        let v = f.get(2).and_then(|v| v.parse::<u64>().ok());
        let v = v.unwrap_or_else(|| panic!("budgets.csv:{}: board,operation,number", n + 1));
        budget.insert((f[0].to_string(), f[1].to_string()), v);
    }
    let measured = table
        .iter()
        .map(|(b, op, n)| (*b, op.as_str(), *n))
        .chain(flash.iter().map(|(b, n)| (*b, "flash", *n)));
    let (mut over, mut under) = (Vec::new(), Vec::new());
    for (board, op, n) in measured {
        match budget.get(&(board.to_string(), op.to_string())) {
            None => over.push(format!(
                "{board} {op}: {n} has no budget in boards/budgets.csv"
            )),
            Some(&b) if n * 100 > b * 102 => over.push(format!(
                "{board} {op}: measured {n}, budget {b} (+{:.1} %, limit +2 %)",
                100.0 * (n as f64 / b as f64 - 1.0)
            )),
            Some(&b) if n * 100 < b * 90 => under.push(format!("{board} {op}: {n} vs budget {b}")),
            Some(_) => {}
        }
    }
    if !under.is_empty() {
        println!(
            "more than 10 % under budget (lower the budget):\n  {}",
            under.join("\n  ")
        );
    }
    assert!(over.is_empty(), "over budget:\n  {}", over.join("\n  "));
    println!("every count and flash size within 2 % of boards/budgets.csv");
}

/// The M0 has no FPU: nothing reachable from the per-sample integer path
/// (`covgate_firmware::integer_step`: exact update, integer gate, integer point in zone) may
/// call a soft-float or a division routine. The call graph is read from the release binary's
/// disassembly (`llvm-objdump` of the rustup `llvm-tools` component), following `bl`, `blx`
/// and tail-call `b` into other functions.
/// Returns the flash bytes of each board's test firmware (`llvm-size`).
fn no_float_on_the_m0_integer_path(boards: &Path) -> Vec<(&'static str, u64)> {
    let sysroot = Command::new("rustc")
        .args(["--print", "sysroot"])
        .output()
        .unwrap();
    let sysroot = String::from_utf8_lossy(&sysroot.stdout).trim().to_string();
    let host = Command::new("rustc").arg("-vV").output().unwrap();
    let host = String::from_utf8_lossy(&host.stdout)
        .lines()
        .find_map(|l| l.strip_prefix("host: ").map(str::to_string))
        .unwrap();
    let objdump = Path::new(&sysroot)
        .join("lib/rustlib")
        .join(host)
        .join("bin/llvm-objdump");
    assert!(
        objdump.exists(),
        "llvm-objdump is missing: rustup component add llvm-tools"
    );
    // Flash and RAM of each board (llvm-size, Berkeley format: text + data in flash,
    // data + bss in RAM; the M0's 16 KiB RAM holds the 128-sample replay buffer).
    let size = objdump.with_file_name("llvm-size");
    let mut flash = Vec::new();
    for (board, target) in BOARDS {
        let elf = boards
            .join("target")
            .join(target)
            .join("release")
            .join(format!("covgate-{board}"));
        let out = Command::new(&size).arg(&elf).output().unwrap();
        let text = String::from_utf8_lossy(&out.stdout).to_string();
        let f: Vec<u64> = text
            .lines()
            .nth(1)
            .unwrap_or("")
            .split_whitespace()
            .take(3)
            .filter_map(|v| v.parse().ok())
            .collect();
        assert_eq!(
            f.len(),
            3,
            "{board}: llvm-size prints text data bss: {text}"
        );
        flash.push((board, f[0] + f[1]));
        {
            println!("{board}: flash {} bytes (text {} + data {}), RAM {} bytes (data + bss, stack not counted)", f[0] + f[1], f[0], f[1], f[1] + f[2]);
        }
    }
    let elf = boards.join("target/thumbv6m-none-eabi/release/covgate-qemu-m0");
    let dis = Command::new(&objdump)
        .args(["-d", "--demangle"])
        .arg(&elf)
        .output()
        .unwrap();
    assert!(dis.status.success());
    let text = String::from_utf8_lossy(&dis.stdout);
    // Function name -> names it calls.
    let mut calls: std::collections::HashMap<String, Vec<String>> = Default::default();
    let mut current = String::new();
    for line in text.lines() {
        if let Some(name) = line
            .strip_suffix(">:")
            .and_then(|l| l.split_once(" <"))
            .map(|(_, n)| n)
        {
            current = name.to_string();
            calls.entry(current.clone()).or_default();
            continue;
        }
        let t = line.split('\t').collect::<Vec<_>>();
        let is_call = t
            .iter()
            .any(|f| matches!(f.trim(), "bl" | "blx" | "b" | "b.w"));
        if let (true, Some(target)) = (is_call, line.split_once(" <").map(|(_, r)| r)) {
            let callee = target.split('>').next().unwrap_or("");
            if !callee.contains('+') && callee != current {
                calls
                    .entry(current.clone())
                    .or_default()
                    .push(callee.to_string());
            }
        }
    }
    let root = calls
        .keys()
        .find(|k| k.starts_with("covgate_firmware::integer_step"))
        .cloned()
        .expect("integer_step is in the M0 binary");
    let (mut seen, mut todo) = (std::collections::HashSet::new(), vec![root.clone()]);
    while let Some(f) = todo.pop() {
        if !seen.insert(f.clone()) {
            continue;
        }
        let forbidden = f.starts_with("__aeabi_f")
            || f.starts_with("__aeabi_d")
            || (f.starts_with("__aeabi_") && f.contains("div"))
            || f.contains("sf3")
            || f.contains("df3");
        assert!(
            !forbidden,
            "{f} is reachable from the M0 integer path ({root})"
        );
        todo.extend(calls.get(&f).cloned().unwrap_or_default());
    }
    let mut reached: Vec<&String> = seen.iter().filter(|f| **f != root).collect();
    reached.sort();
    println!("M0 integer path calls: {reached:?} (no soft-float, no division)");
    flash
}
