//! `covgate`: the host command-line tool.
//!
//! Every command prints one JSON object on stdout. Invalid arguments print one line on
//! stderr and exit with code 2.

use std::process::ExitCode;

use clap::{Parser, Subcommand};
use covgate_host::cli;

#[derive(Parser, Debug)]
#[command(
    name = "covgate",
    version,
    about = "covgate host tool: control limits and checks for on-device dispersion gates"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Control limits for a Mahalanobis gate of dimension P at false-alarm rate A.
    Limits(cli::limits::Args),
    /// What-if yield of a tolerance zone for a process mean and covariance.
    Zone(cli::zone::Args),
    /// Decode report frames from files and merge them per node and across the fleet.
    Fleet(cli::fleet::Args),
    /// Replay a recorded capture through the device's code; write verdicts, summary, figure.
    Replay(cli::replay::Args),
    /// Run the bundled demo scenarios end to end into a folder.
    Demo(cli::demo::Args),
}

fn main() -> ExitCode {
    let parsed = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            use clap::error::ErrorKind;
            if matches!(
                e.kind(),
                ErrorKind::DisplayHelp
                    | ErrorKind::DisplayVersion
                    | ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand
            ) {
                let _ = e.print();
                return if e.kind() == ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand {
                    ExitCode::from(2)
                } else {
                    ExitCode::SUCCESS
                };
            }
            return cli::fail(&cli::first_line(&e.to_string()));
        }
    };
    let result = match parsed.command {
        Command::Limits(a) => cli::limits::run(&a),
        Command::Zone(a) => cli::zone::run(&a),
        Command::Fleet(a) => cli::fleet::run(&a),
        Command::Replay(a) => cli::replay::run(&a),
        Command::Demo(a) => cli::demo::run(&a),
    };
    match result {
        Ok(json) => {
            println!("{json}");
            ExitCode::SUCCESS
        }
        Err(msg) => cli::fail(&msg),
    }
}
