//! The tapline host tool: the whole job in one command (`prepare`: spec and capture in; the
//! Rust tap table, a review plot, a report and the filtered capture out), or its steps alone —
//! design taps from a spec (Kaiser window or equiripple), write them as Rust source, check the
//! headroom of a tap table before it goes into firmware, replay a recorded capture through the
//! filter as the firmware runs it against float64, and plot a design or a table as SVG.
//!
//! Built only with the `cli` feature (`cargo run --features cli -- --help`); the library stays
//! `no_std` without it. Exit status: 0 done (and safe, within the bound); 1 the taps can
//! overflow (`check`, `design`, `emit`, `prepare`) or an output saturated or left the error
//! bound (`replay`, `prepare`); 2 bad input or a file that could not be read or written (one
//! line on stderr naming the file, line and column, and no output file left behind); 130 and
//! 143 interrupted by SIGINT and SIGTERM (what the command had staged removed).
//!
//! Everything it does lives in the library's `tapline::tool` (feature `cli`); this file only
//! parses the arguments, runs the one job they name and prints its report.

use clap::Parser;
use std::process::ExitCode;
use tapline::tool::args::{Cli, one_line, run};

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) if !e.use_stderr() => {
            // --help and --version.
            let _ = e.print();
            return ExitCode::SUCCESS;
        }
        Err(e) => {
            // A usage mistake is bad input too: one line, exit 2.
            let line = one_line(&e.render().to_string());
            if std::env::args().any(|a| a == "--json") {
                println!("{}", serde_json::json!({ "error": line }));
            }
            eprintln!("error: {line}");
            return ExitCode::from(2);
        }
    };
    match run(&cli) {
        Ok(report) => {
            if cli.json {
                println!("{}", report.json);
            } else {
                print!("{}", report.text);
            }
            ExitCode::from(report.status)
        }
        Err(failure) => {
            if cli.json {
                println!("{}", serde_json::json!({ "error": failure.to_string() }));
            }
            eprintln!("error: {failure}");
            ExitCode::from(2)
        }
    }
}
