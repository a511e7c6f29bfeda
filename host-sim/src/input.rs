//! Reading the command line's input files: station networks and ridge profiles.
//!
//! Both are CSV with a header row whose column names carry their units; `#` starts a
//! comment line; blank lines are skipped. Errors name the file, the row and the column.

use crate::CliError;
use leeward_core::crossing::{Profile, ProfilePoint, MAX_PROFILE_POINTS};
use leeward_core::network::{Network, Station, MAX_STATIONS};
use std::path::Path;

fn reader(path: &Path) -> Result<csv::Reader<std::fs::File>, CliError> {
    let file = std::fs::File::open(path)
        .map_err(|e| CliError::input(format!("cannot read {}: {}", path.display(), e)))?;
    Ok(csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .flexible(false)
        .from_reader(file))
}

/// Column positions of a header, checked against the required and optional names.
fn columns<const N: usize>(
    path: &Path,
    headers: &csv::StringRecord,
    required: [&str; N],
    optional: &[&str],
) -> Result<(Vec<usize>, Vec<Option<usize>>), CliError> {
    let find = |name: &str| headers.iter().position(|h| h.eq_ignore_ascii_case(name));
    for h in headers.iter() {
        let known = required
            .iter()
            .chain(optional)
            .any(|n| n.eq_ignore_ascii_case(h));
        if !known {
            return Err(CliError::input(format!(
                "{}: unknown column '{h}' (expected {}{}{})",
                path.display(),
                required.join(","),
                if optional.is_empty() {
                    ""
                } else {
                    ", optional "
                },
                optional.join(",")
            )));
        }
    }
    let mut req = Vec::new();
    for name in required {
        req.push(find(name).ok_or_else(|| {
            CliError::input(format!(
                "{}: header must name the column '{name}' (header is '{}')",
                path.display(),
                headers.iter().collect::<Vec<_>>().join(",")
            ))
        })?);
    }
    Ok((req, optional.iter().map(|n| find(n)).collect()))
}

fn number(path: &Path, line: u64, column: &str, text: &str) -> Result<f64, CliError> {
    text.parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
        .ok_or_else(|| {
            CliError::input(format!(
                "{} line {line}: {column} '{text}' is not a number",
                path.display()
            ))
        })
}

fn record_line(r: &csv::StringRecord) -> u64 {
    r.position().map_or(0, |p| p.line())
}

fn csv_error(path: &Path, e: csv::Error) -> CliError {
    let line = e.position().map(|p| p.line());
    let msg = match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => {
            format!("row has {len} fields, the header has {expected_len}")
        }
        csv::ErrorKind::Utf8 { .. } => "not UTF-8 text".to_string(),
        _ => e.to_string(),
    };
    match line {
        Some(l) => CliError::input(format!("{} line {l}: {msg}", path.display())),
        None => CliError::input(format!("{}: {msg}", path.display())),
    }
}

/// Read a station network: header `id,lat,lon,height_m` and optional `sigma_m`.
pub fn read_network(path: &Path) -> Result<Network, CliError> {
    let mut rdr = reader(path)?;
    let headers = rdr.headers().map_err(|e| csv_error(path, e))?.clone();
    let (req, opt) = columns(
        path,
        &headers,
        ["id", "lat", "lon", "height_m"],
        &["sigma_m"],
    )?;
    let mut net = Network::new();
    for rec in rdr.records() {
        let rec = rec.map_err(|e| csv_error(path, e))?;
        let line = record_line(&rec);
        let field = |i: usize| rec.get(i).unwrap_or("");
        let id = field(req[0]);
        let lat = number(path, line, "lat", field(req[1]))?;
        let lon = number(path, line, "lon", field(req[2]))?;
        let z = number(path, line, "height_m", field(req[3]))?;
        let sigma = match opt[0].map(field) {
            Some(s) if !s.is_empty() => Some(number(path, line, "sigma_m", s)?),
            _ => None,
        };
        let st = Station::new(id, lat, lon, z, sigma).map_err(|e| {
            CliError::input(format!(
                "{} line {line} (station '{id}'): {e}",
                path.display()
            ))
        })?;
        net.push(st).map_err(|_| {
            CliError::input(format!(
                "{} line {line}: a network holds at most {MAX_STATIONS} stations",
                path.display()
            ))
        })?;
    }
    Ok(net)
}

/// Read a ridge cross-profile: header `distance_km,height_m`, distance signed from the
/// axis, positive to the right of the axis azimuth (east of a north–south ridge).
pub fn read_profile(path: &Path) -> Result<Profile, CliError> {
    let mut rdr = reader(path)?;
    let headers = rdr.headers().map_err(|e| csv_error(path, e))?.clone();
    let (req, _) = columns(path, &headers, ["distance_km", "height_m"], &[])?;
    let mut pts = heapless::Vec::<ProfilePoint, MAX_PROFILE_POINTS>::new();
    for rec in rdr.records() {
        let rec = rec.map_err(|e| csv_error(path, e))?;
        let line = record_line(&rec);
        let d = number(path, line, "distance_km", rec.get(req[0]).unwrap_or(""))?;
        let h = number(path, line, "height_m", rec.get(req[1]).unwrap_or(""))?;
        pts.push(ProfilePoint {
            distance_m: d * 1000.0,
            height_m: h,
        })
        .map_err(|_| {
            CliError::input(format!(
                "{} line {line}: a profile holds at most {MAX_PROFILE_POINTS} points",
                path.display()
            ))
        })?;
    }
    if pts.len() < 2 {
        return Err(CliError::input(format!(
            "{}: a profile needs at least 2 points, found {}",
            path.display(),
            pts.len()
        )));
    }
    Ok(Profile::Table(pts))
}
