//! `leeward device` (the simulated handheld's link side, on a Unix socket) and
//! `leeward link` (the laptop's side: list, push, pull, delete, log, clock).

use crate::link_client::{Client, Port};
use crate::CliError;
use clap::{Args, Subcommand};
use leeward_firmware::link::LinkServer;
use leeward_firmware::storage::Storage;
use std::io::{Read, Write};
use std::os::unix::net::{UnixListener, UnixStream};
use std::path::{Path, PathBuf};

/// Arguments of `leeward device`.
#[derive(Args, Debug)]
pub struct DeviceArgs {
    /// Flash image file of the simulated device (created when absent).
    #[arg(long, value_name = "FILE")]
    pub flash: PathBuf,
    /// Unix socket to serve the link on (created; an old socket file is replaced).
    #[arg(long, value_name = "PATH")]
    pub socket: PathBuf,
}

/// Where `leeward link` finds the device.
#[derive(Args, Debug)]
#[group(required = true, multiple = false)]
pub struct Target {
    /// Unix socket of a simulated device (`leeward device --socket PATH`).
    #[arg(long, value_name = "PATH")]
    pub socket: Option<PathBuf>,
    /// Serial port of the handheld (USB serial, e.g. /dev/ttyACM0).
    #[arg(long, value_name = "DEVICE")]
    pub port: Option<PathBuf>,
}

/// Arguments of `leeward link`.
#[derive(Args, Debug)]
pub struct LinkArgs {
    #[command(flatten)]
    pub target: Target,
    #[command(subcommand)]
    pub action: LinkAction,
}

/// What `leeward link` does.
#[derive(Subcommand, Debug)]
pub enum LinkAction {
    /// The datasets on the device, their kinds and sizes, and its free space.
    List,
    /// Store a file on the device.
    Push(crate::datasets::PushArgs),
    /// Fetch a dataset into a file, in the format it was pushed in (a TEMP report as its
    /// text; a dataset stored without the text, as CSV).
    Pull {
        /// Dataset name on the device.
        name: String,
        /// File to write (refused if it exists, unless --force).
        #[arg(long, value_name = "FILE")]
        out: PathBuf,
        /// Overwrite OUT if it exists.
        #[arg(long)]
        force: bool,
    },
    /// Delete a dataset on the device.
    Delete {
        /// Dataset name on the device.
        name: String,
    },
    /// Fetch the results log: CSV or JSON, chosen by the extension of OUT.
    Log {
        /// File to write: .csv or .json.
        #[arg(long, value_name = "FILE")]
        out: PathBuf,
    },
    /// Set the device clock from this computer's clock (UTC).
    Clock,
}

/// Serve the link of a simulated device on a Unix socket until stopped: one host at a
/// time; when a host goes away the session ends and the next may connect.
pub fn device(a: &DeviceArgs) -> Result<String, CliError> {
    let mut store = crate::datasets::open_flash(&a.flash)?;
    serve(&a.socket, &mut store)
}

fn serve<S: Storage>(socket: &Path, store: &mut S) -> Result<String, CliError> {
    if socket.exists() {
        std::fs::remove_file(socket).map_err(|e| {
            CliError::input(format!(
                "cannot replace the socket {}: {e}",
                socket.display()
            ))
        })?;
    }
    let listener = UnixListener::bind(socket)
        .map_err(|e| CliError::input(format!("cannot listen on {}: {e}", socket.display())))?;
    eprintln!("leeward device: serving the link on {}", socket.display());
    let mut staging = [0u8; leeward_firmware::link::STAGING_BYTES];
    let mut server = LinkServer::new(&mut staging);
    for conn in listener.incoming() {
        let mut stream = match conn {
            Ok(s) => s,
            Err(e) => {
                eprintln!("leeward device: a connection failed: {e}");
                continue;
            }
        };
        server.reset(store);
        let mut buf = [0u8; 1024];
        loop {
            let n = match stream.read(&mut buf) {
                Ok(0) => break,
                Ok(n) => n,
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
                Err(_) => break,
            };
            let mut out = Vec::new();
            server.feed(&buf[..n], store, &mut |w: &[u8]| out.extend_from_slice(w));
            if !out.is_empty() && stream.write_all(&out).is_err() {
                break;
            }
        }
    }
    Ok(String::new())
}

fn connect(t: &Target) -> Result<Client, CliError> {
    let port: Box<dyn Port> = if let Some(path) = &t.socket {
        let s = UnixStream::connect(path).map_err(|e| {
            CliError::input(format!(
                "no device at {}: {e} (is `leeward device --socket {}` running?)",
                path.display(),
                path.display()
            ))
        })?;
        s.set_read_timeout(Some(crate::link_client::REPLY_TIMEOUT))
            .map_err(|e| CliError::input(format!("cannot set up the socket: {e}")))?;
        Box::new(s)
    } else if let Some(dev) = &t.port {
        crate::serial::open(dev)?
    } else {
        return Err(CliError::input("give --socket PATH or --port DEVICE"));
    };
    Client::open(port)
}

/// `leeward link`.
pub fn link(a: &LinkArgs, json: bool) -> Result<String, CliError> {
    let mut c = connect(&a.target)?;
    match &a.action {
        LinkAction::List => {
            let (entries, free, clock) = c.list()?;
            if json {
                let list: Vec<_> = entries
                    .iter()
                    .map(|e| {
                        serde_json::json!({
                            "name": e.name,
                            "kind": e.kind.map(|k| k.word()),
                            "bytes": e.bytes,
                        })
                    })
                    .collect();
                let v = serde_json::json!({
                    "firmware": c.firmware,
                    "datasets": list,
                    "free_bytes": free,
                    "clock_unix_s": clock,
                });
                return Ok(format!("{v}\n"));
            }
            let mut s = format!("Device (firmware {})\n", c.firmware);
            if entries.is_empty() {
                s.push_str("  no datasets\n");
            }
            for e in &entries {
                let kind = e.kind.map_or("unknown", |k| k.word());
                s.push_str(&format!("  {:<8}  {:<9} {:>6} B\n", e.name, kind, e.bytes));
            }
            s.push_str(&format!("  free      {free} B\n"));
            Ok(s)
        }
        LinkAction::Push(p) => {
            let max = usize::try_from(c.max_dataset).unwrap_or(usize::MAX);
            let crate::datasets::Encoded {
                name,
                kind,
                bytes,
                note,
            } = crate::datasets::encode_file(p, max)?;
            if bytes.len() as u64 > u64::from(c.max_dataset) {
                return Err(CliError::input(format!(
                    "{} is {} bytes as a dataset; the device takes at most {}",
                    p.file.display(),
                    bytes.len(),
                    c.max_dataset
                )));
            }
            c.put(&name, kind, &bytes)?;
            if let Some(n) = &note {
                eprintln!("leeward: {n}");
            }
            Ok(if json {
                format!(
                    "{}\n",
                    serde_json::json!({"stored": name, "kind": kind.word(), "bytes": bytes.len(),
                        "crc32": leeward_firmware::link::crc32(&bytes), "note": note})
                )
            } else {
                format!(
                    "stored {name} ({}, {} B); the device's copy matches (CRC-32 {:08x})\n",
                    kind.word(),
                    bytes.len(),
                    leeward_firmware::link::crc32(&bytes)
                )
            })
        }
        LinkAction::Pull { name, out, force } => {
            if out.exists() && !force {
                return Err(CliError::input(format!(
                    "{} exists; give --force to overwrite it",
                    out.display()
                )));
            }
            let (kind, bytes) = c.get(name)?;
            let kind = kind.ok_or_else(|| {
                CliError::input(format!(
                    "dataset {name} is of a kind this program does not know"
                ))
            })?;
            let (text, format) = crate::datasets::decode_dataset(name, kind, &bytes)?;
            std::fs::write(out, text)
                .map_err(|e| CliError::input(format!("cannot write {}: {e}", out.display())))?;
            Ok(format!(
                "wrote {name} ({}, {format}) to {}\n",
                kind.word(),
                out.display()
            ))
        }
        LinkAction::Delete { name } => {
            c.delete(name)?;
            Ok(format!("deleted {name}\n"))
        }
        LinkAction::Log { out } => {
            let entries = c.log()?;
            let text = crate::datasets::log_text(&entries, out)?;
            std::fs::write(out, text)
                .map_err(|e| CliError::input(format!("cannot write {}: {e}", out.display())))?;
            Ok(format!(
                "wrote {} log entries to {}\n",
                entries.len(),
                out.display()
            ))
        }
        LinkAction::Clock => {
            let now = std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_err(|_| CliError::input("this computer's clock is before 1970"))?
                .as_secs();
            c.set_clock(now)?;
            Ok(format!("device clock set to {now} s since 1970 UTC\n"))
        }
    }
}
