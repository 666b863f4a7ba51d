//! Detects whether the emulator checks can run here (`qemu-system-arm`, the three thumb
//! targets, `llvm-objdump` / `llvm-size` of rustup's `llvm-tools`). When they cannot, and `CI`
//! is not `true`, it sets `cfg(covgate_no_emulator)`, which marks the firmware test
//! `#[ignore]` with the reason, so cargo's own summary shows it as ignored rather than passed.
//! With `CI=true` the test always runs, and fails if a tool is missing.

use std::path::PathBuf;
use std::process::Command;

const TARGETS: [&str; 3] = [
    "thumbv6m-none-eabi",
    "thumbv7m-none-eabi",
    "thumbv7em-none-eabihf",
];

fn main() {
    println!("cargo::rustc-check-cfg=cfg(covgate_no_emulator)");
    println!("cargo::rerun-if-env-changed=CI");
    println!("cargo::rerun-if-env-changed=PATH");
    // Installing QEMU or a target changes one of these folders.
    for dir in std::env::var("PATH").unwrap_or_default().split(':') {
        if !dir.is_empty() && PathBuf::from(dir).is_dir() {
            println!("cargo::rerun-if-changed={dir}");
        }
    }
    let sysroot = Command::new(std::env::var("RUSTC").unwrap_or_else(|_| "rustc".into()))
        .args(["--print", "sysroot"])
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim().to_string())
        .unwrap_or_default();
    let rustlib = PathBuf::from(&sysroot).join("lib/rustlib");
    if rustlib.is_dir() {
        println!("cargo::rerun-if-changed={}", rustlib.display());
    }
    let mut missing = Vec::new();
    let qemu = Command::new("qemu-system-arm").arg("--version").output();
    if !qemu.is_ok_and(|o| o.status.success()) {
        missing.push("qemu-system-arm".to_string());
    }
    for t in TARGETS {
        if !rustlib.join(t).is_dir() {
            missing.push(format!("target {t}"));
        }
    }
    let has_objdump = std::fs::read_dir(&rustlib).ok().is_some_and(|entries| {
        entries
            .flatten()
            .any(|e| e.path().join("bin/llvm-objdump").exists())
    });
    if !has_objdump {
        missing.push("llvm-tools".to_string());
    }
    let ci = std::env::var("CI").as_deref() == Ok("true");
    if !missing.is_empty() && !ci {
        println!("cargo::rustc-cfg=covgate_no_emulator");
        println!(
            "cargo::warning=emulator checks will show as ignored: missing {}",
            missing.join(", ")
        );
    }
}
