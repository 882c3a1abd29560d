//! The `vigil` command line: parse arguments, call the library, print, exit.

use clap::{Parser, Subcommand};
use std::path::PathBuf;
use std::process::ExitCode;
use vigil::app::{self, AppError, RunRequest};

/// Plan signal-detection experiments before fieldwork.
#[derive(Parser)]
#[command(name = "vigil", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Validate a plan and list its scenarios without simulating.
    Check {
        /// The plan file (TOML).
        plan: PathBuf,
    },
    /// Simulate every scenario of a plan, fit each dataset and report.
    Run {
        /// The plan file (TOML).
        plan: PathBuf,
        /// Also write a tidy CSV (one row per design × trials × quantity).
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
        /// Also write everything as JSON, with the resolved plan, seed and version.
        #[arg(long, value_name = "FILE")]
        json: Option<PathBuf>,
        /// Enumerate every outcome of yes/no designs instead of simulating (small counts).
        #[arg(long)]
        exact: bool,
        /// Simulated experiments per scenario, overriding the plan.
        #[arg(long, value_name = "N")]
        experiments: Option<u64>,
        /// No progress bar.
        #[arg(long, short)]
        quiet: bool,
    },
    /// Expected information over a fine grid of trial counts: asymptotic SEs, the d′–c
    /// correlation and whether each design can tell bias from sensitivity, without simulating.
    Explore {
        /// The plan file (TOML).
        plan: PathBuf,
        /// Smallest trial count of the grid (default: each design's smallest listed count).
        #[arg(long, value_name = "N")]
        from: Option<u32>,
        /// Largest trial count of the grid (default: 4 × each design's largest listed count).
        #[arg(long, value_name = "N")]
        to: Option<u32>,
        /// Log-spaced trial counts per design (default 40).
        #[arg(long, value_name = "N")]
        points: Option<usize>,
        /// Also write the results as JSON.
        #[arg(long, value_name = "FILE")]
        json: Option<PathBuf>,
    },
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Explore {
            plan,
            from,
            to,
            points,
            json,
        } => vigil::app_explore::explore(&vigil::app_explore::ExploreRequest {
            plan,
            from,
            to,
            points,
            json,
        }),
        Command::Check { plan } => app::check(&plan),
        Command::Run {
            plan,
            csv,
            json,
            exact,
            experiments,
            quiet,
        } => run(
            RunRequest {
                plan,
                csv,
                json,
                exact,
                experiments,
            },
            quiet,
        ),
    };
    match result {
        Ok(text) => {
            print!("{text}");
            ExitCode::SUCCESS
        }
        Err(e) => {
            eprintln!("error: {e}");
            ExitCode::from(e.exit_code() as u8)
        }
    }
}

fn run(req: RunRequest, quiet: bool) -> Result<String, AppError> {
    let prepared = app::prepare(&req)?;
    let bar = vigil::progress::bar(prepared.total_replicates(), quiet);
    let text = app::execute(prepared, &|n| bar.inc(n));
    bar.finish_and_clear();
    text
}
