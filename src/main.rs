//! The `vigil` command line: parse arguments, call the library, print, exit.

use clap::{Parser, Subcommand};
use std::path::PathBuf;
use std::process::ExitCode;
use vigil::commands::{self as app, AppError, RunRequest};
use vigil::progress::{Renderer, Show};

/// Plan signal-detection experiments before fieldwork.
#[derive(Parser)]
#[command(name = "vigil", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
    /// Fit the terminal report to N columns (default: the terminal's width, or 100 when
    /// the output is not a terminal); tables wrap their cells, prose wraps on spaces.
    #[arg(long, global = true, value_name = "N", value_parser = clap::value_parser!(u16).range(60..=1000), conflicts_with = "wide")]
    width: Option<u16>,
    /// Full-width tables and unwrapped lines, however wide they are.
    #[arg(long, global = true)]
    wide: bool,
}

impl Cli {
    fn layout(&self) -> vigil::report::layout::Layout {
        use vigil::report::layout::{DEFAULT_WIDTH, Layout, MIN_WIDTH, terminal_width};
        match (self.wide, self.width) {
            (true, _) => Layout::Wide,
            (false, Some(n)) => Layout::Fit(usize::from(n)),
            (false, None) => {
                Layout::Fit(terminal_width().map_or(DEFAULT_WIDTH, |w| w.max(MIN_WIDTH)))
            }
        }
    }
}

/// How a long command shows its progress on stderr.
#[derive(clap::Args)]
struct ProgressArgs {
    /// No progress bar.
    #[arg(long, short)]
    quiet: bool,
    /// Instead of the bar, one plain line per finished phase on stderr (for batch jobs):
    /// `vigil-phase phase=NAME units=N seconds=S ...`.
    #[arg(long, conflicts_with = "quiet")]
    log: bool,
}

impl ProgressArgs {
    fn show(&self) -> Show {
        match (self.quiet, self.log) {
            (_, true) => Show::Log,
            (true, false) => Show::Quiet,
            (false, false) => Show::Bar,
        }
    }
}

#[derive(Subcommand)]
enum Command {
    /// Print a shell completion script, e.g. `vigil completions bash > ~/.local/share/bash-completion/completions/vigil`.
    Completions {
        /// The shell: bash, zsh, fish, elvish or powershell.
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff), e.g. `vigil manual > vigil.1; man -l vigil.1`.
    Manual,
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
        /// Also write every table as its own CSV into the existing folder DIR: estimates.csv
        /// (as --csv), power.csv, search.csv, group_grid.csv, effort.csv (docs/outputs.md).
        #[arg(long, value_name = "DIR")]
        tables: Option<PathBuf>,
        /// Enumerate every outcome of yes/no designs instead of simulating (small counts).
        #[arg(long)]
        exact: bool,
        /// Simulated experiments per scenario, overriding the plan.
        #[arg(long, value_name = "N")]
        experiments: Option<u64>,
        /// Simulate only part K of a run split into N parts (a job-array task); needs
        /// --part-file. Combine the parts with `vigil merge` (docs/cluster.md).
        #[arg(long, value_name = "K/N", value_parser = vigil::shard::Part::parse)]
        part: Option<vigil::shard::Part>,
        /// The partial-results file the part writes.
        #[arg(long, value_name = "FILE")]
        part_file: Option<PathBuf>,
        /// Save finished chunks to FILE as the run goes (atomically), so an interrupted run
        /// can resume; removed when the run completes.
        #[arg(long, value_name = "FILE")]
        checkpoint: Option<PathBuf>,
        /// Continue from the checkpoint named by --checkpoint (same plan, seed, options).
        #[arg(long)]
        resume: bool,
        /// Run even when the work is estimated above the limit (20 minutes on this machine).
        #[arg(long)]
        allow_long_run: bool,
        #[command(flatten)]
        progress: ProgressArgs,
    },
    /// Combine the partial-results files of a split run (`run --part`) into the outputs of
    /// one whole run, byte for byte; finishes the search and effort split on this machine.
    Merge {
        /// The plan file every part was run from.
        plan: PathBuf,
        /// The partial-results files, in any order.
        #[arg(required = true, value_name = "PART_FILE")]
        parts: Vec<PathBuf>,
        /// Also write a tidy CSV (one row per design × trials × quantity).
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
        /// Also write everything as JSON, with the resolved plan, seed and version.
        #[arg(long, value_name = "FILE")]
        json: Option<PathBuf>,
        /// Also write every table as its own CSV into the existing folder DIR: estimates.csv
        /// (as --csv), power.csv, search.csv, group_grid.csv, effort.csv (docs/outputs.md).
        #[arg(long, value_name = "DIR")]
        tables: Option<PathBuf>,
        #[command(flatten)]
        progress: ProgressArgs,
    },
    /// Run a plan and write a report folder: an HTML page with the figures, the same as
    /// Markdown, a justification text, the figures as SVG, CSV and JSON.
    Report {
        /// The plan file (TOML).
        plan: PathBuf,
        /// The folder to write (new, or one an earlier `vigil report` wrote).
        #[arg(long, value_name = "DIR")]
        out: PathBuf,
        /// Simulated experiments per scenario, overriding the plan.
        #[arg(long, value_name = "N")]
        experiments: Option<u64>,
        #[command(flatten)]
        progress: ProgressArgs,
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
    /// Fit pilot counts (a tidy CSV: animal, condition, stimulus, response, count) animal by
    /// animal, estimate the population's mean and between-animal SD of d′ and c with
    /// intervals, and optionally write a plan skeleton holding them (see docs/pilot.md).
    Pilot {
        /// The pilot file (CSV).
        csv: PathBuf,
        /// Write a plan skeleton (TOML) with the pilot's values, each commented with its interval.
        #[arg(long, value_name = "FILE")]
        plan_out: Option<PathBuf>,
        /// Response categories of the pilot's scale: 2 for yes/no, 3 … 12 for a graded scale.
        #[arg(long, value_name = "K", default_value_t = 2)]
        categories: usize,
        /// On a graded scale, the criterion (1 … K−1) above which responses count as "present"
        /// (default: K/2, rounded down).
        #[arg(long, value_name = "B")]
        boundary: Option<usize>,
        /// Rule for rates of 0 or 1 in an animal's counts: log-linear, half-n or none.
        #[arg(long, value_name = "RULE", default_value = "log-linear")]
        rate_correction: String,
        /// Seed of the bootstrap over animals (the correlation's interval).
        #[arg(long, value_name = "N", default_value_t = 1)]
        seed: u64,
    },
    /// The ideal observer (Green & Swets 1966): the criterion that maximises the expected
    /// payoff per trial, its rates, and how the false-alarm-to-miss ratio moves with the stakes.
    Ideal {
        /// Sensitivity d′ (> 0).
        #[arg(long, value_name = "D", allow_negative_numbers = true)]
        d_prime: f64,
        /// Share of trials with the stimulus present, strictly between 0 and 1.
        #[arg(long, value_name = "P", allow_negative_numbers = true)]
        presence: f64,
        /// Value of a hit, cost of a miss, value of a correct rejection, cost of a false alarm.
        #[arg(long, value_name = "V_H,C_M,V_CR,C_FA", allow_hyphen_values = true,
              value_parser = vigil::commands::ideal::parse_payoffs)]
        payoffs: [f64; 4],
        /// Also show the criterion f·c_opt, a fraction f in [0, 1] of the way from 0 to c_opt.
        #[arg(long, value_name = "F", allow_negative_numbers = true)]
        fraction: Option<f64>,
        /// Scan the payoff ratio (V_CR + C_FA)/(V_H + C_M), log-spaced, e.g. 0.1:10:9.
        #[arg(long, value_name = "LOW:HIGH:POINTS", allow_hyphen_values = true,
              value_parser = vigil::commands::ideal::parse_scan)]
        scan: Option<(f64, f64, usize)>,
        /// Also write the figures as JSON.
        #[arg(long, value_name = "FILE")]
        json: Option<PathBuf>,
    },
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    vigil::report::layout::set_layout(cli.layout());
    if let Err(e) = vigil::output::cleanup_on_signals() {
        eprintln!("warning: no signal handler ({e}); an interrupt may leave temporary files");
    }
    let result = match cli.command {
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            let mut bytes = Vec::new();
            clap_complete::generate(shell, &mut cmd, "vigil", &mut bytes);
            Ok(String::from_utf8_lossy(&bytes).into_owned())
        }
        Command::Manual => {
            let mut bytes = Vec::new();
            clap_mangen::Man::new(<Cli as clap::CommandFactory>::command())
                .render(&mut bytes)
                .map_err(|e| AppError::Internal(format!("cannot render the manual page: {e}")))
                .map(|()| String::from_utf8_lossy(&bytes).into_owned())
        }
        Command::Ideal {
            d_prime,
            presence,
            payoffs,
            fraction,
            scan,
            json,
        } => vigil::commands::ideal::ideal(&vigil::commands::ideal::IdealRequest {
            d_prime,
            presence,
            payoffs,
            fraction,
            scan,
            json,
        }),
        Command::Explore {
            plan,
            from,
            to,
            points,
            json,
        } => vigil::commands::explore::explore(&vigil::commands::explore::ExploreRequest {
            plan,
            from,
            to,
            points,
            json,
        }),
        Command::Check { plan } => app::check(&plan),
        Command::Report {
            plan,
            out,
            experiments,
            progress,
        } => report(
            app::report::ReportRequest {
                plan,
                out,
                experiments,
            },
            progress,
        ),
        Command::Pilot {
            csv,
            plan_out,
            categories,
            boundary,
            rate_correction,
            seed,
        } => vigil::commands::pilot::pilot(&vigil::commands::pilot::PilotRequest {
            csv,
            plan_out,
            categories,
            boundary,
            rate_correction,
            seed,
        }),
        Command::Run {
            plan,
            csv,
            json,
            tables,
            exact,
            experiments,
            part,
            part_file,
            checkpoint,
            resume,
            progress,
            allow_long_run,
        } => run(
            RunRequest {
                plan,
                csv,
                json,
                tables,
                exact,
                experiments,
                allow_long_run,
                part,
                part_file,
                checkpoint,
                resume,
            },
            progress,
        ),
        Command::Merge {
            plan,
            parts,
            csv,
            json,
            tables,
            progress,
        } => merge(
            app::merge::MergeRequest {
                plan,
                parts,
                csv,
                json,
                tables,
            },
            progress,
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

fn run(req: RunRequest, progress: ProgressArgs) -> Result<String, AppError> {
    let prepared = app::prepare(&req)?;
    if let Some(note) = prepared.note() {
        eprintln!("{note}");
    }
    if req.checkpoint.is_some() {
        // The first SIGINT/SIGTERM asks the run to save its checkpoint and stop.
        vigil::output::stop_gracefully_with(&vigil::shard::checkpoint::INTERRUPTED);
    }
    let shown = Renderer::new(prepared.total_replicates(), progress.show());
    let text = app::execute(prepared, &|e| shown.event(e));
    shown.finish();
    text
}

fn report(req: app::report::ReportRequest, progress: ProgressArgs) -> Result<String, AppError> {
    let prepared = app::report::prepare(&req)?;
    let shown = Renderer::new(prepared.total_replicates(), progress.show());
    let text = app::report::execute(prepared, &|e| shown.event(e));
    shown.finish();
    text
}

fn merge(req: app::merge::MergeRequest, progress: ProgressArgs) -> Result<String, AppError> {
    let prepared = app::merge::prepare_merge(&req)?;
    let shown = Renderer::new(prepared.total_replicates(), progress.show());
    let text = app::merge::execute_merge(prepared, &|e| shown.event(e));
    shown.finish();
    text
}
