//! The commands of the `covgate` binary, one module each, testable without a process.

/// Runs `$body` with the const `$d` set to the runtime dimension `$n` (1..=6); `$other`
/// (binding the value) for anything else.
macro_rules! by_dim {
    ($n:expr, $d:ident => $body:expr, $v:pat => $other:expr) => {
        match $n {
            1 => {
                const $d: usize = 1;
                $body
            }
            2 => {
                const $d: usize = 2;
                $body
            }
            3 => {
                const $d: usize = 3;
                $body
            }
            4 => {
                const $d: usize = 4;
                $body
            }
            5 => {
                const $d: usize = 5;
                $body
            }
            6 => {
                const $d: usize = 6;
                $body
            }
            $v => $other,
        }
    };
}

pub mod demo;
pub mod fleet;
pub mod limits;
pub mod replay;
pub mod zone;

use std::process::ExitCode;

/// Prints `covgate: <msg>` as one line on stderr and gives exit code 2.
pub fn fail(msg: &str) -> ExitCode {
    eprintln!("covgate: {}", first_line(msg));
    ExitCode::from(2)
}

/// The first non-empty line of a message, without a leading `error: `; a line ending in `:`
/// is joined with the one that follows (clap's "required arguments were not provided:").
pub fn first_line(msg: &str) -> String {
    let mut lines = msg.lines().map(str::trim).filter(|l| !l.is_empty());
    let first = lines.next().unwrap_or("").trim_start_matches("error: ");
    match (first.ends_with(':'), lines.next()) {
        (true, Some(next)) => format!("{first} {next}"),
        _ => first.to_string(),
    }
}
