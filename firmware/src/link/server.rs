//! The device side of the link: bytes in, replies out, datasets through the
//! [`Storage`] trait.
//!
//! A dataset being sent is assembled in a buffer the caller lends (its length is the
//! largest dataset the device takes) and handed to the store only when all of it has
//! arrived and its CRC-32 matches the one announced; a damaged or missing piece leaves
//! the store untouched.

use super::frame::{self, crc32, FrameError, Splitter, Splitting, MAX_WIRE, REPLY, REQUEST};
use super::protocol::{LinkError, Reply, Request, MAX_CHUNK, PROTOCOL_VERSION};
use crate::storage::{valid_name, DataKind, DataName, Storage};

/// A dataset being received.
#[derive(Debug, Clone)]
struct Put {
    name: DataName,
    kind: DataKind,
    total: u32,
    crc: u32,
    next: u32,
}

/// The link's device side.
pub struct LinkServer<'b> {
    splitter: Splitter,
    staging: &'b mut [u8],
    put: Option<Put>,
    hello: bool,
    clock_unix_s: Option<u64>,
    tx: [u8; MAX_WIRE],
}

/// Sequence number of an error reply to a frame too damaged to read its own.
pub const UNKNOWN_SEQ: u16 = u16::MAX;

impl<'b> LinkServer<'b> {
    /// A server assembling datasets in `staging` (its length is the largest dataset taken).
    pub fn new(staging: &'b mut [u8]) -> Self {
        LinkServer {
            splitter: Splitter::new(),
            staging,
            put: None,
            hello: false,
            clock_unix_s: None,
            tx: [0; MAX_WIRE],
        }
    }

    /// The clock the host last set, seconds since 1970 UTC.
    pub fn clock_unix_s(&self) -> Option<u64> {
        self.clock_unix_s
    }

    /// Forget the session (the host went away): the next request must be a Hello, and a
    /// dataset half sent is dropped.
    pub fn reset(&mut self) {
        self.splitter.reset();
        self.put = None;
        self.hello = false;
    }

    /// Take bytes from the serial port; each complete frame is answered through `send`
    /// (a whole reply frame, its zero included).
    pub fn feed<S: Storage>(&mut self, bytes: &[u8], store: &mut S, send: &mut impl FnMut(&[u8])) {
        // A frame is copied out of the splitter before it is answered, so the answer may
        // use the rest of `self`; one buffer for the whole call, not one per byte.
        let mut frame = [0u8; MAX_WIRE];
        for &b in bytes {
            let n = match self.splitter.push(b) {
                Splitting::More | Splitting::Empty => continue,
                Splitting::Overflow => {
                    self.reply(
                        UNKNOWN_SEQ,
                        &Reply::Error {
                            error: LinkError::Damaged,
                        },
                        send,
                    );
                    continue;
                }
                Splitting::Frame(f) => {
                    let n = f.len();
                    frame[..n].copy_from_slice(f);
                    n
                }
            };
            self.answer(&mut frame[..n], store, send);
        }
    }

    fn answer<S: Storage>(&mut self, wire: &mut [u8], store: &mut S, send: &mut impl FnMut(&[u8])) {
        let (ty, seq, req) = match frame::decode::<Request<'_>>(wire) {
            Ok(m) => m,
            Err(e) => {
                let error = match e {
                    FrameError::Payload => LinkError::NotUnderstood,
                    _ => LinkError::Damaged,
                };
                self.reply(UNKNOWN_SEQ, &Reply::Error { error }, send);
                return;
            }
        };
        if ty != REQUEST {
            self.reply(
                seq,
                &Reply::Error {
                    error: LinkError::NotUnderstood,
                },
                send,
            );
            return;
        }
        // The reply borrows the staging buffer for Get; anything else is built here.
        match self.handle(req, store) {
            Ok(Answer::Plain(r)) => self.reply(seq, &r, send),
            Ok(Answer::Chunk {
                total,
                crc,
                kind,
                offset,
                len,
            }) => {
                let start = offset as usize;
                let r = Reply::Chunk {
                    total,
                    crc,
                    kind,
                    offset,
                    bytes: self.staging.get(start..start + len).unwrap_or(&[]),
                };
                send_reply(&mut self.tx, seq, &r, send);
            }
            Ok(Answer::Log { count, len }) => {
                let r = Reply::LogEntry {
                    count,
                    bytes: self.staging.get(..len).unwrap_or(&[]),
                };
                send_reply(&mut self.tx, seq, &r, send);
            }
            Ok(Answer::Entry {
                count,
                name,
                kind,
                bytes,
                free,
            }) => {
                let r = Reply::Entry {
                    count,
                    name: name.as_str(),
                    kind,
                    bytes,
                    free,
                };
                self.reply(seq, &r, send)
            }
            Err(error) => self.reply(seq, &Reply::Error { error }, send),
        }
    }

    fn reply(&mut self, seq: u16, r: &Reply<'_>, send: &mut impl FnMut(&[u8])) {
        send_reply(&mut self.tx, seq, r, send);
    }

    fn handle<S: Storage>(&mut self, req: Request<'_>, store: &mut S) -> Result<Answer, LinkError> {
        if let Request::Hello { version } = req {
            if version != PROTOCOL_VERSION {
                self.hello = false;
                return Err(LinkError::Version {
                    device: PROTOCOL_VERSION,
                });
            }
            self.hello = true;
            self.put = None;
            return Ok(Answer::Plain(Reply::Hello {
                version: PROTOCOL_VERSION,
                max_dataset: len_u32(self.staging.len()),
                firmware: env!("CARGO_PKG_VERSION"),
            }));
        }
        if !self.hello {
            return Err(LinkError::NeedHello);
        }
        match req {
            Request::Hello { .. } => Err(LinkError::NotUnderstood),
            Request::Status => Ok(Answer::Plain(Reply::Status {
                count: u16::try_from(store.list().len()).unwrap_or(u16::MAX),
                free: len_u32(store.free_bytes()),
                clock_unix_s: self.clock_unix_s,
            })),
            Request::Entry { index } => {
                let list = store.list();
                let count = u16::try_from(list.len()).unwrap_or(u16::MAX);
                let d = list.get(index as usize).ok_or(LinkError::NotFound)?;
                Ok(Answer::Entry {
                    count,
                    name: d.name.clone(),
                    kind: d.kind.to_byte(),
                    bytes: u32::from(d.bytes),
                    free: len_u32(store.free_bytes()),
                })
            }
            Request::Get { name, offset } => {
                // The dataset is read whole into the staging buffer (and a put in
                // progress is dropped: the host does one thing at a time).
                self.put = None;
                let (kind, n) = store.get(name, self.staging)?;
                let crc = crc32(&self.staging[..n]);
                let total = len_u32(n);
                if offset > total {
                    return Err(LinkError::OutOfOrder { next: 0 });
                }
                let len = (n - offset as usize).min(MAX_CHUNK);
                Ok(Answer::Chunk {
                    total,
                    crc,
                    kind: kind.to_byte(),
                    offset,
                    len,
                })
            }
            Request::PutBegin {
                name,
                kind,
                total,
                crc,
            } => {
                self.put = None;
                if !valid_name(name) {
                    return Err(LinkError::BadName);
                }
                let kind = DataKind::from_byte(kind).ok_or(LinkError::BadKind)?;
                if total as usize > self.staging.len() {
                    return Err(LinkError::TooBig {
                        max: len_u32(self.staging.len()),
                    });
                }
                if store.list().iter().any(|d| d.name.as_str() == name) {
                    return Err(LinkError::NameTaken);
                }
                let mut n = DataName::new();
                let _ = n.push_str(name);
                self.put = Some(Put {
                    name: n,
                    kind,
                    total,
                    crc,
                    next: 0,
                });
                Ok(Answer::Plain(Reply::Ready { next: 0 }))
            }
            Request::PutData { offset, bytes } => {
                let put = self.put.as_mut().ok_or(LinkError::NoPut)?;
                let end = offset as usize + bytes.len();
                // A piece sent again after its Ready was lost: already here, same answer.
                if end == put.next as usize && offset < put.next {
                    return Ok(Answer::Plain(Reply::Ready { next: put.next }));
                }
                if offset != put.next {
                    return Err(LinkError::OutOfOrder { next: put.next });
                }
                if end > put.total as usize || bytes.len() > MAX_CHUNK {
                    return Err(LinkError::TooBig { max: put.total });
                }
                self.staging[offset as usize..end].copy_from_slice(bytes);
                put.next = len_u32(end);
                Ok(Answer::Plain(Reply::Ready { next: put.next }))
            }
            Request::PutCommit => {
                let put = self.put.take().ok_or(LinkError::NoPut)?;
                if put.next != put.total {
                    let (got, total) = (put.next, put.total);
                    // Still open: the host may send the missing pieces.
                    self.put = Some(put);
                    return Err(LinkError::Incomplete { got, total });
                }
                let data = &self.staging[..put.total as usize];
                if crc32(data) != put.crc {
                    return Err(LinkError::CrcMismatch);
                }
                store.put(put.kind, &put.name, data)?;
                // Read it back: the host compares what the store holds, not what arrived.
                let (_, n) = store.get(&put.name, self.staging)?;
                Ok(Answer::Plain(Reply::Stored {
                    bytes: len_u32(n),
                    crc: crc32(&self.staging[..n]),
                }))
            }
            Request::Delete { name } => {
                self.put = None;
                store.delete(name)?;
                Ok(Answer::Plain(Reply::Done))
            }
            Request::Log { index } => {
                self.put = None;
                let count = store.log_len();
                let n = store.log_entry(index, self.staging)?;
                Ok(Answer::Log { count, len: n })
            }
            Request::SetClock { unix_s } => {
                self.clock_unix_s = Some(unix_s);
                Ok(Answer::Plain(Reply::Done))
            }
        }
    }
}

/// What a request is answered with; the parts that borrow the server are filled in
/// when the reply is encoded.
enum Answer {
    Plain(Reply<'static>),
    Chunk {
        total: u32,
        crc: u32,
        kind: u8,
        offset: u32,
        len: usize,
    },
    Log {
        count: u32,
        len: usize,
    },
    Entry {
        count: u16,
        name: DataName,
        kind: u8,
        bytes: u32,
        free: u32,
    },
}

/// Encode reply `r` into `tx` and send it. Every reply is far smaller than a frame; a
/// failure here would be a bug, and the host then times out and asks again. (A free
/// function, so that a reply borrowing the staging buffer can still be sent.)
fn send_reply(tx: &mut [u8], seq: u16, r: &Reply<'_>, send: &mut impl FnMut(&[u8])) {
    if let Ok(w) = frame::encode(REPLY, seq, r, tx) {
        send(w);
    }
}

fn len_u32(n: usize) -> u32 {
    u32::try_from(n).unwrap_or(u32::MAX)
}
