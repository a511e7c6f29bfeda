//! `leeward`: every leeward calculation from the command line, with human-readable output
//! (units shown) or one JSON object in SI units (`--json`).

mod commands;
mod datasets;
mod flash_file;
mod input;
mod link_client;
mod link_cmd;
mod serial;
mod sim;
mod sounding_cmd;
mod text;

use clap::{Args, Parser, Subcommand};
use std::path::PathBuf;
use std::process::ExitCode;

/// The cautions every user sees (MISSION.md).
pub const CAUTIONS: &str = "\
CAUTION: mountain weather can injure and kill. leeward gives idealised estimates \
(barotropic, geostrophic, frictionless) for trained users; it is not a forecast or a \
warning service. Decisions about people's safety, flights or operations follow the \
official forecasts and warnings of the national meteorological service, local \
regulations and licensed practice.";

#[derive(Parser, Debug)]
#[command(
    name = "leeward",
    version,
    about = "Field calculations for flow over a mountain ridge: Coriolis and beta, \
             geostrophic wind and vorticity from station heights, column stretching, \
             the lee trough and the downstream wave train.",
    after_help = CAUTIONS,
    after_long_help = CAUTIONS
)]
struct Cli {
    /// Print one JSON object in SI units instead of the readable report.
    #[arg(long, global = true)]
    json: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Coriolis parameter f, beta and the inertial period at a latitude.
    Coriolis {
        /// Latitude, degrees (north positive, south negative).
        #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
        lat: f64,
    },
    /// Geostrophic wind and vorticity from a file of station heights.
    #[command(
        after_help = "FILE is CSV with the header id,lat,lon,height_m and an optional \
        sigma_m column (1-sigma height error, m; 10 m when absent). Lines starting with # \
        are comments."
    )]
    Geostrophic(GeostrophicArgs),
    /// Vorticity after a column is stretched or squashed, conserving (zeta + f)/H.
    Stretch(StretchArgs),
    /// Depth of a column from the ground to a lid, and its potential vorticity.
    Column(ColumnArgs),
    /// Track of a column over a ridge: lee trough, wave train, Froude check.
    Ridge(RidgeArgs),
    /// Rossby-wave figures: stationary wavelength and phase speed.
    Rossby {
        /// Latitude, degrees.
        #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
        lat: f64,
        /// Zonal wind, m/s (westerly positive).
        #[arg(long, value_name = "MS", allow_negative_numbers = true)]
        wind: f64,
        /// Wavelength for the phase speed, km.
        #[arg(long, value_name = "KM")]
        wavelength_km: Option<f64>,
    },
    /// A radiosonde sounding checked for the column argument: heights, stability,
    /// tropopause and lid, Froude check, barotropy, layer PV.
    #[command(after_help = SOUNDING_HELP)]
    Sounding(SoundingArgs),
    /// A coded TEMP report (Parts A and B) decoded level by level, to check against the text.
    Temp {
        /// Report file (plain text).
        file: PathBuf,
        /// Station elevation, m (the code does not carry it; gives the surface height).
        #[arg(long, value_name = "M", allow_negative_numbers = true)]
        elevation: Option<f64>,
    },
    /// The whole workflow on the built-in (invented) Tessel Range scenario.
    Demo,
    /// Run the simulated handheld headless, its data link on a Unix socket.
    Device(link_cmd::DeviceArgs),
    /// Talk to the handheld (serial port) or a simulated one (socket): list, push, pull,
    /// delete, log, clock.
    Link(link_cmd::LinkArgs),
    /// The device's screens on this computer: in a window, or in the terminal.
    #[command(after_help = sim_help())]
    Sim(SimArgs),
    /// Run a key script on the simulated device, headless, and write PNG screenshots.
    #[command(after_help = shots_help())]
    Shots {
        /// The key script (plain text; syntax below).
        #[arg(long, value_name = "SCRIPT")]
        keys: PathBuf,
        /// Folder for the screenshots (made if missing; files of the same name are replaced).
        #[arg(long, value_name = "DIR")]
        out: PathBuf,
    },
}

/// The after-help of `leeward sim`: the key map, how to get the window, the store.
fn sim_help() -> String {
    format!(
        "Keys: 0-9 digits, '.' point, '-' sign, Backspace delete, arrows move, Enter OK, \
         Escape BACK, Tab or M MENU, Q quit. The window needs a leeward built with the window \
         feature (apt-get install libsdl2-dev, then cargo run --release --features window -- \
         sim); --terminal works in any build and over a remote shell. {}",
        sim::store::STORAGE_NOTE
    )
}

/// The after-help of `leeward shots`: the script syntax and the store.
fn shots_help() -> String {
    format!("{}\n\n{}", sim::shots::SHOTS_HELP, sim::store::STORAGE_NOTE)
}

#[derive(Args, Debug)]
struct SimArgs {
    /// Zoom of the window: each device pixel becomes N×N screen pixels (1 to 8).
    #[arg(long, value_name = "N", default_value_t = 2)]
    zoom: u32,
    /// Draw the screen in this terminal with Unicode block characters instead of a window.
    #[arg(long)]
    terminal: bool,
    /// Terminal cells: half (1×2 pixels, 400 columns), quad (2×2 pixels, 200 columns) or
    /// auto (half when the terminal is wide enough).
    #[arg(long, value_enum, default_value = "auto", requires = "terminal")]
    blocks: sim::terminal::Blocks,
    /// Flash image file of the simulated device (default: $LEEWARD_FLASH, else
    /// ~/.local/share/leeward/flash.img); created erased when absent.
    #[arg(long, value_name = "FILE")]
    flash: Option<PathBuf>,
}

const SOUNDING_HELP: &str = "\
FILE is leeward's sounding CSV or a WMO FM 35 TEMP report (Parts A and/or B), told apart \
by its contents unless --format is given. The CSV has a header row naming its columns \
with their units: pressure_hpa and temperature_c (or temperature_k) are required; \
height_m, dewpoint_c (or dewpoint_k), wind_dir_deg with wind_speed_kt (or wind_speed_ms) \
and kind are optional; an empty cell is a missing value. Rows run from the ground up. \
Comment lines '# station=ID', '# lat=DEG', '# lon=DEG', '# elevation_m=M' and \
'# time=DD HH:MM' (UTC) describe the station.";

#[derive(Args, Debug)]
pub struct SoundingArgs {
    /// Sounding file: leeward CSV or TEMP text.
    pub file: PathBuf,
    /// How FILE is written.
    #[arg(long, value_enum, default_value = "auto")]
    pub format: sounding_cmd::Format,
    /// Column lid: tropopause, stable:N (top of the N-th stable layer from the ground) or a height in m.
    #[arg(long, value_name = "LID", default_value = "tropopause")]
    pub lid: String,
    /// Crest height of the ridge, m above sea level, for the Froude check.
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    pub ridge_height: Option<f64>,
    /// Ground height upstream of the ridge, m (default: the sounding's lowest level).
    #[arg(
        long,
        value_name = "M",
        allow_negative_numbers = true,
        requires = "ridge_height"
    )]
    pub ground: Option<f64>,
    /// Azimuth of the ridge axis, degrees (default: the whole wind counts as crossing).
    #[arg(long, value_name = "DEG", requires = "ridge_height")]
    pub ridge_axis: Option<f64>,
    /// Relative vorticity, 1/s, for the isentropic layer PV (e.g. the network's zeta_g).
    #[arg(long, value_name = "PER_S", allow_hyphen_values = true)]
    pub zeta: Option<f64>,
    /// Potential temperatures bounding the PV layer, K, as LOW,HIGH (default: the lowest level to the lid).
    #[arg(long, value_name = "K,K", value_parser = sounding_cmd::parse_pair, requires = "zeta")]
    pub theta_layer: Option<(f64, f64)>,
    /// Layer of the barotropy check, m, as BASE,TOP (default: lowest wind to the lid).
    #[arg(long, value_name = "M,M", value_parser = sounding_cmd::parse_pair)]
    pub layer: Option<(f64, f64)>,
    /// Latitude, degrees, where the file does not give it.
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    pub lat: Option<f64>,
    /// Station elevation, m (for a TEMP report, which does not carry it).
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    pub elevation: Option<f64>,
    /// Tolerance of the height check, m.
    #[arg(long, value_name = "M", default_value_t = 20.0)]
    pub tolerance: f64,
    /// Also save the profile as leeward CSV to this file (e.g. a decoded TEMP report).
    #[arg(long, value_name = "OUT")]
    pub write_csv: Option<PathBuf>,
}

#[derive(Args, Debug)]
struct GeostrophicArgs {
    /// Station file (CSV).
    file: PathBuf,
    /// Height-field model: auto, plane, curvature or quadratic.
    #[arg(long, default_value = "auto", value_name = "MODEL")]
    model: String,
    /// Reference latitude, degrees (default: the stations' centroid).
    #[arg(
        long,
        value_name = "DEG",
        allow_negative_numbers = true,
        requires = "ref_lon"
    )]
    ref_lat: Option<f64>,
    /// Reference longitude, degrees.
    #[arg(
        long,
        value_name = "DEG",
        allow_negative_numbers = true,
        requires = "ref_lat"
    )]
    ref_lon: Option<f64>,
}

#[derive(Args, Debug)]
struct StretchArgs {
    /// Start latitude, degrees.
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    lat1: f64,
    /// Start relative vorticity, 1/s.
    #[arg(long, value_name = "PER_S", allow_hyphen_values = true)]
    zeta1: f64,
    /// Start column depth, m.
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    depth1: f64,
    /// End latitude, degrees.
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    lat2: f64,
    /// End column depth, m (gives the end vorticity).
    #[arg(
        long,
        value_name = "M",
        allow_negative_numbers = true,
        required_unless_present = "zeta2",
        conflicts_with = "zeta2"
    )]
    depth2: Option<f64>,
    /// End vorticity, 1/s (gives the depth that produces it: the inverse solve).
    #[arg(long, value_name = "PER_S", allow_hyphen_values = true)]
    zeta2: Option<f64>,
}

#[derive(Args, Debug)]
struct ColumnArgs {
    /// Ground height, m above sea level.
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    ground: f64,
    /// Lid height (tropopause or top of a stable layer), m above sea level.
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    lid: f64,
    /// Latitude, degrees (with --zeta, gives the potential vorticity).
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    lat: Option<f64>,
    /// Relative vorticity, 1/s (default 0).
    #[arg(
        long,
        value_name = "PER_S",
        allow_negative_numbers = true,
        default_value_t = 0.0
    )]
    zeta: f64,
}

#[derive(Args, Debug)]
#[command(
    after_help = "The ridge axis passes through (--lat, --lon) at azimuth --axis-deg. \
    The column starts --upwind-km upwind of that point along the wind direction, with \
    the potential vorticity it has there, and keeps it. A --profile file is CSV with \
    the header distance_km,height_m; distance is signed from the axis, positive to the \
    right of the axis azimuth (east of a north-south ridge)."
)]
struct RidgeArgs {
    /// Latitude where the undisturbed flow meets the ridge axis, degrees.
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    lat: f64,
    /// Longitude of that point, degrees east.
    #[arg(
        long,
        value_name = "DEG",
        allow_negative_numbers = true,
        default_value_t = 0.0
    )]
    lon: f64,
    /// Wind speed, m/s (constant along the track; default with --sounding: its
    /// height-mean wind from the lowest level to the lid).
    #[arg(long, value_name = "MS", required_unless_present = "sounding")]
    wind: Option<f64>,
    /// Upstream wind direction (where it blows from), degrees (default with --sounding:
    /// that of its mean wind).
    #[arg(long, value_name = "DEG", required_unless_present = "sounding")]
    dir: Option<f64>,
    /// Lid: a height in m above sea level; with --sounding also tropopause or stable:N
    /// (the default there is tropopause).
    #[arg(long, value_name = "LID", required_unless_present = "sounding")]
    lid: Option<String>,
    /// Take the lid, the wind and N from this sounding (leeward CSV or TEMP text).
    #[arg(long, value_name = "FILE")]
    sounding: Option<PathBuf>,
    /// Station elevation for a TEMP --sounding, m.
    #[arg(
        long,
        value_name = "M",
        allow_negative_numbers = true,
        requires = "sounding"
    )]
    elevation: Option<f64>,
    /// Crest height, m above sea level (bell-shaped ridge).
    #[arg(long, value_name = "M", required_unless_present = "profile")]
    crest_height: Option<f64>,
    /// Half-width of the bell, km: where it stands at half its height above the base.
    #[arg(long, value_name = "KM", required_unless_present = "profile")]
    half_width_km: Option<f64>,
    /// Height of the plain on either side, m.
    #[arg(
        long,
        value_name = "M",
        default_value_t = 0.0,
        allow_negative_numbers = true
    )]
    base_height: f64,
    /// Azimuth of the ridge axis, degrees (0 = north-south).
    #[arg(
        long,
        value_name = "DEG",
        default_value_t = 0.0,
        allow_negative_numbers = true
    )]
    axis_deg: f64,
    /// Upstream relative vorticity, 1/s (default: that of a uniform wind, u tan(lat)/a).
    #[arg(long, value_name = "PER_S", allow_hyphen_values = true)]
    zeta: Option<f64>,
    /// Tabulated cross-profile instead of the bell (CSV distance_km,height_m).
    #[arg(long, value_name = "FILE", conflicts_with_all = ["crest_height", "half_width_km"])]
    profile: Option<PathBuf>,
    /// Distance of the start upwind of the axis, km.
    #[arg(long, value_name = "KM", default_value_t = 1000.0)]
    upwind_km: f64,
    /// Longest track, km.
    #[arg(long, value_name = "KM", default_value_t = 16000.0)]
    length_km: f64,
    /// Integration step, km (at most 5).
    #[arg(long, value_name = "KM", default_value_t = 5.0)]
    step_km: f64,
    /// Brunt-Vaisala frequency below the crest, 1/s, for the Froude check (default with
    /// --sounding: its bulk N from the plain, or its lowest level, to the crest).
    #[arg(long, value_name = "PER_S")]
    brunt_vaisala: Option<f64>,
    /// Keep integrating to --length-km instead of stopping after the second trough.
    #[arg(long)]
    full_length: bool,
    /// Spacing of the track points in the output, km.
    #[arg(long, value_name = "KM", default_value_t = 50.0)]
    track_every_km: f64,
}

/// A failure the user can act on: one line, exit status 2.
#[derive(Debug)]
pub struct CliError {
    message: String,
}

impl CliError {
    /// Bad input: a file, a row, a flag or a value.
    pub fn input(message: impl Into<String>) -> Self {
        CliError {
            message: message.into(),
        }
    }
    /// A core error reported against the flag or file it came from.
    pub fn core(context: &str, e: leeward_core::Error) -> Self {
        CliError {
            message: format!("{context}: {e}"),
        }
    }
}

fn sim_command(a: &SimArgs) -> Result<String, CliError> {
    let flash = || match &a.flash {
        Some(f) => Ok(f.clone()),
        None => sim::store::default_path(),
    };
    if a.terminal {
        return sim::terminal::run(a.blocks, &flash()?);
    }
    #[cfg(feature = "window")]
    {
        let flash = flash()?;
        eprintln!("leeward sim: flash image {}", flash.display());
        sim::window::run(a.zoom, &flash)
    }
    #[cfg(not(feature = "window"))]
    {
        let _ = (a.zoom, flash);
        Err(CliError::input(
            "sim: this leeward was built without the window; build it with \
             `cargo run --release --features window -- sim` (needs apt-get install libsdl2-dev), \
             or use `leeward sim --terminal`",
        ))
    }
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
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
            // One line: clap's message up to its usage block names the flag and the problem.
            let rendered = e.render().to_string();
            let message: Vec<&str> = rendered
                .lines()
                .take_while(|l| !l.starts_with("Usage:"))
                .map(str::trim)
                .filter(|l| !l.is_empty())
                .collect();
            let line = message.join(" ");
            let line = if line.is_empty() {
                "bad arguments".to_string()
            } else {
                line
            };
            eprintln!(
                "leeward: {} (see leeward --help)",
                line.trim_start_matches("error: ")
            );
            return ExitCode::from(2);
        }
    };
    let result = match cli.command {
        Command::Coriolis { lat } => commands::coriolis(lat, cli.json),
        Command::Geostrophic(a) => commands::geostrophic(&a, cli.json),
        Command::Stretch(a) => commands::stretch(&a, cli.json),
        Command::Column(a) => commands::column(&a, cli.json),
        Command::Ridge(a) => commands::ridge(&a, cli.json),
        Command::Rossby {
            lat,
            wind,
            wavelength_km,
        } => commands::rossby(lat, wind, wavelength_km, cli.json),
        Command::Sounding(a) => sounding_cmd::sounding(&a, cli.json),
        Command::Temp { file, elevation } => sounding_cmd::temp(&file, elevation, cli.json),
        Command::Demo => commands::demo(cli.json),
        Command::Device(a) => link_cmd::device(&a),
        Command::Link(a) => link_cmd::link(&a, cli.json),
        Command::Sim(_) if cli.json => Err(CliError::input(
            "sim: --json does not apply to the interactive simulator",
        )),
        Command::Sim(a) => sim_command(&a),
        Command::Shots { keys, out } => sim::shots::run(&keys, &out, cli.json),
    };
    match result {
        Ok(out) => {
            // A closed pipe (`leeward demo | head`) is not an error worth a panic.
            use std::io::Write;
            let mut stdout = std::io::stdout().lock();
            match stdout
                .write_all(out.as_bytes())
                .and_then(|_| stdout.flush())
            {
                Ok(()) => ExitCode::SUCCESS,
                Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
                Err(e) => {
                    eprintln!("leeward: cannot write the output: {e}");
                    ExitCode::FAILURE
                }
            }
        }
        Err(e) => {
            eprintln!("leeward: {}", e.message);
            ExitCode::from(2)
        }
    }
}
