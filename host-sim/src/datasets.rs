//! Files on the laptop ⇄ datasets on the device: which kind a file is, its record bytes,
//! and the file a dataset is written back as.
//!
//! | file | kind | written back as |
//! |---|---|---|
//! | station CSV (`id,lat,lon,height_m[,sigma_m]`) | stations | a station CSV of the same values |
//! | sounding CSV (`pressure_hpa,…`) | sounding | leeward's sounding CSV of the same values |
//! | TEMP text | sounding | the same text, byte for byte (kept in a source-text record after the sounding) |
//! | ridge profile CSV (`distance_km,height_m` with `# lat=`, `# lon=`, `# axis_deg=`) | ridge | a ridge profile CSV of the same values |
//!
//! A sounding dataset without the source-text record (pushed from a CSV, or by a `leeward`
//! before that record) is written back as leeward's sounding CSV.

use crate::CliError;
use clap::{Args, ValueEnum};
use leeward_core::crossing::{Profile as RidgeProfile, Ridge};
use leeward_core::geo::LatLon;
use leeward_core::network::Network;
use leeward_firmware::records::{LogEntry, Record, SourceFormat, SourceText};
use leeward_firmware::storage::{valid_name, DataKind};
use std::path::{Path, PathBuf};

/// What a pushed file holds.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum PushKind {
    /// A station set (CSV).
    Stations,
    /// A sounding (leeward CSV or TEMP text).
    Sounding,
    /// A ridge cross-profile (CSV).
    Ridge,
}

/// Arguments of `leeward link push`.
#[derive(Args, Debug)]
pub struct PushArgs {
    /// The file: a station CSV, a sounding CSV or TEMP report, or a ridge profile CSV.
    pub file: PathBuf,
    /// What the file holds (default: told from its contents).
    #[arg(long, value_enum)]
    pub kind: Option<PushKind>,
    /// Name on the device (default: the file's stem in capitals).
    #[arg(long, value_name = "NAME")]
    pub name: Option<String>,
    /// Station elevation, m, for a TEMP report (the code does not carry it).
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    pub elevation: Option<f64>,
}

/// Largest record, bytes (a 256-level sounding is under 14 kB).
const RECORD_BUF: usize = 16 * 1024;

fn name_for(p: &PushArgs) -> Result<String, CliError> {
    if let Some(n) = &p.name {
        return if valid_name(n) {
            Ok(n.clone())
        } else {
            Err(CliError::input(format!(
                "--name {n}: a name needs 1 to 8 of A-Z, 0-9, - and _"
            )))
        };
    }
    let stem = p
        .file
        .file_stem()
        .map(|s| s.to_string_lossy().to_ascii_uppercase())
        .unwrap_or_default();
    if valid_name(&stem) {
        Ok(stem)
    } else {
        Err(CliError::input(format!(
            "the file's stem {stem:?} is not a dataset name (1 to 8 of A-Z, 0-9, - and _): give --name"
        )))
    }
}

/// Tell the kind from the first line that is not a comment.
fn sniff(path: &Path, text: &str) -> Result<PushKind, CliError> {
    if crate::sounding_cmd::looks_like_temp(text) {
        return Ok(PushKind::Sounding);
    }
    let header = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    let cols: Vec<String> = header
        .split(',')
        .map(|c| c.trim().to_ascii_lowercase())
        .collect();
    let has = |c: &str| cols.iter().any(|x| x == c);
    if has("pressure_hpa") {
        Ok(PushKind::Sounding)
    } else if has("distance_km") {
        Ok(PushKind::Ridge)
    } else if has("id") && has("lat") {
        Ok(PushKind::Stations)
    } else {
        Err(CliError::input(format!(
            "{}: cannot tell what it holds (a station CSV, a sounding CSV or TEMP report, \
             or a ridge profile CSV); give --kind",
            path.display()
        )))
    }
}

fn record<T: Record>(v: &T) -> Result<Vec<u8>, CliError> {
    let mut buf = vec![0u8; RECORD_BUF];
    let n = v
        .encode(&mut buf)
        .map_err(|e| CliError::input(format!("cannot make the dataset: {e}")))?;
    buf.truncate(n);
    Ok(buf)
}

/// The `# key=value` comment of a file, if present.
fn comment_value(text: &str, key: &str) -> Option<String> {
    text.lines().find_map(|l| {
        let body = l.trim().strip_prefix('#')?.trim();
        let (k, v) = body.split_once('=')?;
        (k.trim() == key).then(|| v.trim().to_string())
    })
}

fn read_ridge(path: &Path, text: &str) -> Result<Ridge, CliError> {
    let profile = crate::input::read_profile(path)?;
    let num = |key: &str| -> Result<f64, CliError> {
        let v = comment_value(text, key).ok_or_else(|| {
            CliError::input(format!(
                "{}: a ridge profile for the device needs a '# {key}=' line \
                 (the ridge's lat, lon and axis_deg)",
                path.display()
            ))
        })?;
        v.parse::<f64>().map_err(|_| {
            CliError::input(format!("{}: '# {key}={v}' is not a number", path.display()))
        })
    };
    let anchor = LatLon::new(num("lat")?, num("lon")?)
        .map_err(|e| CliError::core(&path.display().to_string(), e))?;
    let axis_deg = num("axis_deg")?;
    if !(0.0..360.0).contains(&axis_deg) {
        return Err(CliError::input(format!(
            "{}: axis_deg {axis_deg} is out of range (0 to 360)",
            path.display()
        )));
    }
    Ok(Ridge {
        profile,
        axis_deg,
        anchor,
    })
}

/// A file made ready to store.
#[derive(Debug)]
pub struct Encoded {
    /// Name on the device.
    pub name: String,
    /// Its kind.
    pub kind: DataKind,
    /// The dataset's bytes (its records).
    pub bytes: Vec<u8>,
    /// A line for the user about how it was stored, when that differs from the usual.
    pub note: Option<String>,
}

/// A sounding dataset: the sounding record and, for a TEMP report, the report's text
/// after it, if both fit in `max` bytes. The note says when the text was left out.
fn sounding_bytes(
    path: &Path,
    loaded: &crate::sounding_cmd::Loaded,
    text: &str,
    max: usize,
) -> Result<(Vec<u8>, Option<String>), CliError> {
    let plain = record(&loaded.profile)?;
    if loaded.format != crate::sounding_cmd::Format::Temp {
        return Ok((plain, None));
    }
    let src = SourceText {
        format: SourceFormat::Temp,
        text,
    };
    let mut buf = vec![0u8; max];
    match leeward_firmware::records::encode_sounding(&loaded.profile, Some(&src), &mut buf) {
        Ok(n) => {
            buf.truncate(n);
            Ok((buf, None))
        }
        Err(_) => Ok((
            plain,
            Some(format!(
                "{}: the TEMP text does not fit on the device beside its decoded sounding                  (at most {max} bytes together), so only the decoded sounding is stored                  and it pulls back as CSV",
                path.display()
            )),
        )),
    }
}

/// Read `p.file` into the name, kind and record bytes to store, in at most `max` bytes
/// where there is a choice (the TEMP text kept beside a sounding).
pub fn encode_file(p: &PushArgs, max: usize) -> Result<Encoded, CliError> {
    let name = name_for(p)?;
    let path = &p.file;
    let text = std::fs::read_to_string(path)
        .map_err(|e| CliError::input(format!("cannot read {}: {e}", path.display())))?;
    let kind = match p.kind {
        Some(k) => k,
        None => sniff(path, &text)?,
    };
    let (kind, bytes, note) = match kind {
        PushKind::Stations => {
            let net: Network = crate::input::read_network(path)?;
            (DataKind::Stations, record(&net)?, None)
        }
        PushKind::Sounding => {
            let loaded =
                crate::sounding_cmd::load(path, crate::sounding_cmd::Format::Auto, p.elevation)?;
            let (bytes, note) = sounding_bytes(path, &loaded, &text, max)?;
            (DataKind::Sounding, bytes, note)
        }
        PushKind::Ridge => (DataKind::Ridge, record(&read_ridge(path, &text)?)?, None),
    };
    Ok(Encoded {
        name,
        kind,
        bytes,
        note,
    })
}

fn damaged(name: &str, e: impl std::fmt::Display) -> CliError {
    CliError::input(format!("dataset {name} on the device cannot be read: {e}"))
}

/// The file text of dataset `name`, and the word for its format ("CSV", "TEMP").
pub fn decode_dataset(
    name: &str,
    kind: DataKind,
    bytes: &[u8],
) -> Result<(String, &'static str), CliError> {
    match kind {
        DataKind::Stations => {
            let net = Network::decode(bytes).map_err(|e| damaged(name, e))?;
            let mut s = String::from("id,lat,lon,height_m,sigma_m\n");
            for st in &net.stations {
                s.push_str(&format!(
                    "{},{},{},{},{}\n",
                    st.id,
                    st.pos.lat_deg,
                    st.pos.lon_deg,
                    st.height_m,
                    st.sigma()
                ));
            }
            Ok((s, "CSV"))
        }
        DataKind::Sounding => {
            let (p, source) =
                leeward_firmware::records::decode_sounding(bytes).map_err(|e| damaged(name, e))?;
            match source {
                Some(SourceText {
                    format: SourceFormat::Temp,
                    text,
                }) => Ok((text.to_string(), "TEMP")),
                // Pushed as CSV, or stored before the source text was kept.
                _ => {
                    let mut s = String::new();
                    leeward_core::sounding::csv::write(&p, &mut s)
                        .map_err(|_| damaged(name, "it does not fit the CSV writer"))?;
                    Ok((s, "CSV"))
                }
            }
        }
        DataKind::Ridge => {
            let r = Ridge::decode(bytes).map_err(|e| damaged(name, e))?;
            let mut s = format!(
                "# lat={}\n# lon={}\n# axis_deg={}\ndistance_km,height_m\n",
                r.anchor.lat_deg, r.anchor.lon_deg, r.axis_deg
            );
            match &r.profile {
                RidgeProfile::Table(pts) => {
                    for q in pts {
                        s.push_str(&format!("{},{}\n", q.distance_m / 1000.0, q.height_m));
                    }
                }
                RidgeProfile::Bell { .. } | RidgeProfile::Flat { .. } => {
                    return Err(CliError::input(format!(
                        "dataset {name} is a formula ridge (bell or flat), not a table, \
                         so it has no profile file to write"
                    )));
                }
            }
            Ok((s, "CSV"))
        }
        other => Err(CliError::input(format!(
            "dataset {name} is a {} dataset, which has no file format yet",
            other.word()
        ))),
    }
}

/// The results log as CSV or JSON, chosen by the extension of `out`.
pub fn log_text(entries: &[Vec<u8>], out: &Path) -> Result<String, CliError> {
    let mut rows = vec![];
    for (i, b) in entries.iter().enumerate() {
        rows.push(
            LogEntry::decode(b)
                .map_err(|e| CliError::input(format!("log entry {} cannot be read: {e}", i + 1)))?,
        );
    }
    // utc_s counts from 2000-01-01T00:00Z.
    const Y2000_UNIX_S: u64 = 946_684_800;
    let ext = out
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    match ext.as_str() {
        "json" => {
            let v: Vec<_> = rows
                .iter()
                .map(|r| {
                    serde_json::json!({
                        "seq": r.seq,
                        "utc_unix_s": r.utc_s.map(|s| u64::from(s) + Y2000_UNIX_S),
                        "uptime_s": r.uptime_s,
                        "task": format!("{:?}", r.task).to_lowercase(),
                        "inputs": r.inputs.iter().map(|n| n.as_str()).collect::<Vec<_>>(),
                        "values_si": r.values.iter().collect::<Vec<_>>(),
                    })
                })
                .collect();
            Ok(format!("{}\n", serde_json::Value::Array(v)))
        }
        "csv" => {
            let mut s = String::from("seq,utc_unix_s,uptime_s,task,inputs,values_si\n");
            for r in &rows {
                let inputs: Vec<&str> = r.inputs.iter().map(|n| n.as_str()).collect();
                let values: Vec<String> = r.values.iter().map(|v| v.to_string()).collect();
                s.push_str(&format!(
                    "{},{},{},{},{},{}\n",
                    r.seq,
                    r.utc_s
                        .map_or(String::new(), |t| (u64::from(t) + Y2000_UNIX_S).to_string()),
                    r.uptime_s,
                    format!("{:?}", r.task).to_lowercase(),
                    inputs.join(" "),
                    values.join(" ")
                ));
            }
            Ok(s)
        }
        _ => Err(CliError::input(format!(
            "{}: give a .csv or .json file for the log",
            out.display()
        ))),
    }
}

/// The simulated device's store on the flash image `path` (created erased when absent).
pub fn open_flash(
    path: &Path,
) -> Result<leeward_firmware::flash::FlashStore<crate::flash_file::FileFlash>, CliError> {
    let store = crate::flash_file::open_store(path).map_err(CliError::input)?;
    let h = store.health();
    eprintln!("leeward: flash image {}: {h:?}", path.display());
    Ok(store)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn demo(name: &str) -> PathBuf {
        [env!("CARGO_MANIFEST_DIR"), "..", "demo", name]
            .iter()
            .collect()
    }

    fn push_args(file: PathBuf) -> PushArgs {
        PushArgs {
            file,
            kind: None,
            name: Some("T".into()),
            elevation: Some(1850.0),
        }
    }

    #[test]
    fn a_sounding_stored_without_its_text_pulls_as_csv() {
        // What a `leeward` before the source-text record stored for a TEMP report: the
        // decoded sounding record alone. It comes back as leeward's sounding CSV.
        let path = demo("tessel-col.temp");
        let loaded =
            crate::sounding_cmd::load(&path, crate::sounding_cmd::Format::Auto, Some(1850.0))
                .unwrap();
        let old = record(&loaded.profile).unwrap();
        let (text, format) = decode_dataset("T", DataKind::Sounding, &old).unwrap();
        assert_eq!(format, "CSV");
        let back = leeward_core::sounding::csv::parse(&text).unwrap();
        assert_eq!(back, loaded.profile);
        // Today's push keeps the text after that same record.
        let new = encode_file(&push_args(path.clone()), 16 * 1024).unwrap();
        assert_eq!(new.note, None);
        assert_eq!(&new.bytes[..old.len()], &old[..]);
        let (text, format) = decode_dataset("T", DataKind::Sounding, &new.bytes).unwrap();
        assert_eq!(format, "TEMP");
        assert_eq!(text, std::fs::read_to_string(&path).unwrap());
    }

    #[test]
    fn a_temp_text_that_does_not_fit_is_left_out_and_said_so() {
        let path = demo("tessel-col.temp");
        let full = encode_file(&push_args(path.clone()), 16 * 1024).unwrap();
        // One byte short of the sounding and its text together.
        let e = encode_file(&push_args(path), full.bytes.len() - 1).unwrap();
        let note = e.note.expect("a note");
        assert!(note.contains("pulls back as CSV"), "{note}");
        let (_, format) = decode_dataset("T", DataKind::Sounding, &e.bytes).unwrap();
        assert_eq!(format, "CSV");
        assert!(e.bytes.len() < full.bytes.len());
    }
}
