//! The host side of the data link: one request, one reply, over a Unix socket (the
//! simulated device) or a serial port (the handheld).

use crate::CliError;
use leeward_firmware::link::frame::{self, MAX_WIRE, REPLY, REQUEST};
use leeward_firmware::link::protocol::MAX_CHUNK;
use leeward_firmware::link::{crc32, LinkError, Reply, Request, PROTOCOL_VERSION};
use leeward_firmware::storage::DataKind;
use std::io::{ErrorKind, Read, Write};
use std::time::Duration;

/// How long to wait for a reply before giving up.
pub const REPLY_TIMEOUT: Duration = Duration::from_secs(5);
/// How many times a request is sent again when the device says it arrived damaged.
const RESENDS: usize = 3;

/// A byte stream to the device.
pub trait Port: Read + Write {}
impl<T: Read + Write> Port for T {}

/// One dataset of the device's list.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Entry {
    /// Name.
    pub name: String,
    /// Kind (`None` for a code this program does not know).
    pub kind: Option<DataKind>,
    /// Size, bytes.
    pub bytes: u32,
}

/// A session with the device.
pub struct Client {
    port: Box<dyn Port>,
    seq: u16,
    /// Bytes received after the last reply's zero (the start of the next frame, if any).
    pending: Vec<u8>,
    /// The largest dataset the device takes, from its Hello.
    pub max_dataset: u32,
    /// The device's firmware version, from its Hello.
    pub firmware: String,
}

fn lost(what: &str, e: std::io::Error) -> CliError {
    CliError::input(format!("link to the device lost while {what}: {e}"))
}

fn refused(e: LinkError) -> CliError {
    CliError::input(format!("the device refused: {e}"))
}

impl Client {
    /// Open a session on `port`: the Hello exchange, which checks the protocol version.
    pub fn open(port: Box<dyn Port>) -> Result<Client, CliError> {
        let mut c = Client {
            port,
            seq: 0,
            pending: vec![],
            max_dataset: 0,
            firmware: String::new(),
        };
        let (max, fw) = c.call(
            &Request::Hello {
                version: PROTOCOL_VERSION,
            },
            |r| match r {
                Reply::Hello {
                    max_dataset,
                    firmware,
                    ..
                } => Ok((max_dataset, firmware.to_string())),
                other => Err(other.into()),
            },
        )?;
        c.max_dataset = max;
        c.firmware = fw;
        Ok(c)
    }

    /// Send `req` and hand its reply to `f`. A reply of the wrong sequence number (a late
    /// answer to an earlier request) is skipped; a request the device says arrived
    /// damaged is sent again, a few times.
    fn call<T>(
        &mut self,
        req: &Request<'_>,
        mut f: impl FnMut(Reply<'_>) -> Result<T, Unexpected>,
    ) -> Result<T, CliError> {
        for _ in 0..=RESENDS {
            self.seq = self.seq.wrapping_add(1) % leeward_firmware::link::server::UNKNOWN_SEQ;
            let seq = self.seq;
            let mut buf = [0u8; MAX_WIRE];
            let w = frame::encode(REQUEST, seq, req, &mut buf)
                .map_err(|e| CliError::input(format!("cannot send the request: {e}")))?;
            self.port.write_all(w).map_err(|e| lost("sending", e))?;
            self.port.flush().map_err(|e| lost("sending", e))?;
            loop {
                let mut raw = self.read_frame()?;
                let (ty, rseq, reply) = match frame::decode::<Reply<'_>>(&mut raw) {
                    Ok(m) => m,
                    // A damaged reply: ask again (every request may be repeated: a
                    // repeated piece or delete is answered, not applied twice).
                    Err(_) => break,
                };
                if ty != REPLY {
                    continue;
                }
                if let Reply::Error {
                    error: LinkError::Damaged,
                } = reply
                {
                    break;
                }
                if rseq != seq {
                    continue;
                }
                return match f(reply) {
                    Ok(t) => Ok(t),
                    Err(Unexpected::Refused(e)) => Err(refused(e)),
                    Err(Unexpected::Other(what)) => Err(CliError::input(format!(
                        "protocol mismatch: the device answered {what}"
                    ))),
                };
            }
        }
        Err(CliError::input(
            "the link is too noisy: the request was damaged on every try",
        ))
    }

    fn read_frame(&mut self) -> Result<Vec<u8>, CliError> {
        loop {
            if let Some(i) = self.pending.iter().position(|&b| b == 0) {
                let mut f: Vec<u8> = self.pending.drain(..=i).collect();
                f.pop();
                if f.is_empty() {
                    continue;
                }
                return Ok(f);
            }
            if self.pending.len() > 4 * MAX_WIRE {
                self.pending.clear();
            }
            let mut buf = [0u8; 512];
            match self.port.read(&mut buf) {
                Ok(0) => {
                    return Err(CliError::input(
                        "the device closed the link (was it restarted?)",
                    ))
                }
                Ok(n) => self.pending.extend_from_slice(&buf[..n]),
                Err(e) if e.kind() == ErrorKind::Interrupted => {}
                Err(e) if matches!(e.kind(), ErrorKind::WouldBlock | ErrorKind::TimedOut) => {
                    return Err(CliError::input(format!(
                        "no reply from the device within {} s",
                        REPLY_TIMEOUT.as_secs()
                    )))
                }
                Err(e) => return Err(lost("waiting for a reply", e)),
            }
        }
    }

    /// Every dataset on the device, its free space in bytes and its clock.
    pub fn list(&mut self) -> Result<(Vec<Entry>, u32, Option<u64>), CliError> {
        let (count, free, clock) = self.call(&Request::Status, |r| match r {
            Reply::Status {
                count,
                free,
                clock_unix_s,
            } => Ok((count, free, clock_unix_s)),
            other => Err(other.into()),
        })?;
        let mut out = vec![];
        for index in 0..count {
            let e = self.call(&Request::Entry { index }, |r| match r {
                Reply::Entry {
                    name, kind, bytes, ..
                } => Ok(Some(Entry {
                    name: name.to_string(),
                    kind: DataKind::from_byte(kind),
                    bytes,
                })),
                // Deleted since the count was taken (by the user on the device).
                Reply::Error {
                    error: LinkError::NotFound,
                } => Ok(None),
                other => Err(other.into()),
            })?;
            out.extend(e);
        }
        Ok((out, free, clock))
    }

    /// Dataset `name`: its kind and bytes, checked against the device's CRC-32.
    pub fn get(&mut self, name: &str) -> Result<(Option<DataKind>, Vec<u8>), CliError> {
        let mut data = vec![];
        let (mut total, mut want_crc, mut kind) = (u32::MAX, 0, 0);
        while (data.len() as u64) < u64::from(total) {
            let offset = data.len() as u32;
            let piece = self.call(&Request::Get { name, offset }, |r| match r {
                Reply::Chunk {
                    total,
                    crc,
                    kind,
                    offset: o,
                    bytes,
                } if o == offset => Ok((total, crc, kind, bytes.to_vec())),
                other => Err(other.into()),
            })?;
            if total != u32::MAX && (piece.0, piece.1) != (total, want_crc) {
                return Err(CliError::input(format!(
                    "dataset {name} changed on the device while it was read; read it again"
                )));
            }
            (total, want_crc, kind) = (piece.0, piece.1, piece.2);
            if piece.3.is_empty() && (data.len() as u64) < u64::from(total) {
                return Err(CliError::input("the device sent an empty piece"));
            }
            data.extend_from_slice(&piece.3);
        }
        if crc32(&data) != want_crc {
            return Err(CliError::input(format!(
                "dataset {name} arrived damaged (CRC mismatch); read it again"
            )));
        }
        Ok((DataKind::from_byte(kind), data))
    }

    /// Store `bytes` as dataset `name`; the stored dataset's CRC-32 is compared with ours.
    pub fn put(&mut self, name: &str, kind: DataKind, bytes: &[u8]) -> Result<(), CliError> {
        let crc = crc32(bytes);
        let total =
            u32::try_from(bytes.len()).map_err(|_| CliError::input("dataset larger than 4 GB"))?;
        self.call(
            &Request::PutBegin {
                name,
                kind: kind.to_byte(),
                total,
                crc,
            },
            |r| match r {
                Reply::Ready { next: 0 } => Ok(()),
                other => Err(other.into()),
            },
        )?;
        for (i, piece) in bytes.chunks(MAX_CHUNK).enumerate() {
            let offset = (i * MAX_CHUNK) as u32;
            let want = offset + piece.len() as u32;
            self.call(
                &Request::PutData {
                    offset,
                    bytes: piece,
                },
                |r| match r {
                    Reply::Ready { next } if next == want => Ok(()),
                    other => Err(other.into()),
                },
            )?;
        }
        let (n, stored) = self.call(&Request::PutCommit, |r| match r {
            Reply::Stored { bytes, crc } => Ok((bytes, crc)),
            other => Err(other.into()),
        })?;
        if n != total || stored != crc {
            return Err(CliError::input(format!(
                "the device stored {n} bytes with CRC {stored:08x}, not {total} bytes with {crc:08x}: \
                 its storage may be failing"
            )));
        }
        Ok(())
    }

    /// Delete dataset `name`.
    pub fn delete(&mut self, name: &str) -> Result<(), CliError> {
        self.call(&Request::Delete { name }, |r| match r {
            Reply::Done => Ok(()),
            other => Err(other.into()),
        })
    }

    /// Every results-log entry, oldest first, as stored bytes.
    pub fn log(&mut self) -> Result<Vec<Vec<u8>>, CliError> {
        let mut out = vec![];
        let mut index = 0u32;
        loop {
            let got = self.call(&Request::Log { index }, |r| match r {
                Reply::LogEntry { count, bytes } => Ok(Some((count, bytes.to_vec()))),
                Reply::Error {
                    error: LinkError::NotFound,
                } => Ok(None),
                other => Err(other.into()),
            })?;
            match got {
                Some((count, e)) => {
                    out.push(e);
                    index += 1;
                    if index >= count {
                        break;
                    }
                }
                None => break,
            }
        }
        Ok(out)
    }

    /// Set the device clock to `unix_s`.
    pub fn set_clock(&mut self, unix_s: u64) -> Result<(), CliError> {
        self.call(&Request::SetClock { unix_s }, |r| match r {
            Reply::Done => Ok(()),
            other => Err(other.into()),
        })
    }
}

/// A reply other than the one asked for.
pub enum Unexpected {
    /// The device refused.
    Refused(LinkError),
    /// Some other reply (named).
    Other(String),
}

impl From<Reply<'_>> for Unexpected {
    fn from(r: Reply<'_>) -> Self {
        match r {
            Reply::Error { error } => Unexpected::Refused(error),
            other => {
                let s = format!("{other:?}");
                let name = s.split([' ', '{', '(']).next().unwrap_or("?").to_string();
                Unexpected::Other(format!("{name} out of turn"))
            }
        }
    }
}
