//! Running a command as a user would, for the end-to-end tests of the `covgate` binary.

use std::process::Command;

/// Runs `bin` with `args`; returns the exit code (-1 when killed by a signal), stdout and
/// stderr.
pub fn run(bin: &str, args: &[&str]) -> (i32, String, String) {
    let out = Command::new(bin)
        .args(args)
        .output()
        .expect("the binary runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}
