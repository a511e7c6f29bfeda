//! The device side of the link: bytes in, replies out, datasets through the
//! [`Storage`] trait.
//!
//! A dataset being sent goes to the store as it arrives, a piece of the store's size
//! ([`Storage::part_bytes`]) at a time, through a buffer the caller lends (one such
//! piece; it also holds a piece being read). The store makes the dataset visible only
//! when all of it has arrived and what it holds has the CRC-32 announced: a damaged or
//! missing piece, or a session that ends half way, leaves the store as it was.

use super::frame::{self, FrameError, Splitter, Splitting, MAX_WIRE, REPLY, REQUEST};
use super::protocol::{LinkError, Reply, Request, MAX_CHUNK, PROTOCOL_VERSION};
use crate::storage::{DataKind, DataName, Storage, StoreError};

/// Bytes of the staging buffer [`LinkServer::new`] wants: one part of the flash store
/// ([`crate::flash::CHUNK_BYTES`]), which is more than a link piece ([`MAX_CHUNK`]).
pub const STAGING_BYTES: usize = crate::flash::CHUNK_BYTES;
const _: () = assert!(STAGING_BYTES >= MAX_CHUNK);

/// A dataset being received.
#[derive(Debug, Clone)]
struct Put {
    total: u32,
    crc: u32,
    next: u32,
    /// Bytes after the last part handed to the store, waiting in the staging buffer.
    held: usize,
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
    /// A server with `staging` for a piece of a dataset: at least the store's
    /// [`Storage::part_bytes`] (for a dataset being sent) and [`MAX_CHUNK`] (for one
    /// being read).
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
    /// dataset half sent is dropped from `store`.
    pub fn reset<S: Storage>(&mut self, store: &mut S) {
        self.splitter.reset();
        self.drop_put(store);
        self.hello = false;
    }

    /// Drop the dataset being sent, if any, here and in the store.
    fn drop_put<S: Storage>(&mut self, store: &mut S) {
        if self.put.take().is_some() {
            store.put_cancel();
        }
    }

    /// Take bytes from the serial port; each complete frame is answered through `send`
    /// (a whole reply frame, its zero included).
    // Not inlined, so that the board's loop does not carry the link's stack in its frame.
    #[inline(never)]
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
                let r = Reply::Chunk {
                    total,
                    crc,
                    kind,
                    offset,
                    bytes: self.staging.get(..len).unwrap_or(&[]),
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
            self.drop_put(store);
            return Ok(Answer::Plain(Reply::Hello {
                version: PROTOCOL_VERSION,
                max_dataset: len_u32(store.max_dataset_bytes()),
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
                // The piece is read into the staging buffer (and a put in progress is
                // dropped: the host does one thing at a time).
                self.drop_put(store);
                let room = self.staging.len().min(MAX_CHUNK);
                let (head, n) = store.read_at(name, offset as usize, &mut self.staging[..room])?;
                if offset as usize > head.len {
                    return Err(LinkError::OutOfOrder { next: 0 });
                }
                Ok(Answer::Chunk {
                    total: len_u32(head.len),
                    crc: head.crc,
                    kind: head.kind.to_byte(),
                    offset,
                    len: n,
                })
            }
            Request::PutBegin {
                name,
                kind,
                total,
                crc,
            } => {
                self.drop_put(store);
                let kind = DataKind::from_byte(kind).ok_or(LinkError::BadKind)?;
                if unit(store, self.staging) == 0 {
                    // A wiring mistake: the staging buffer lent is too small for the store.
                    return Err(LinkError::StoreFailed);
                }
                store.put_begin(kind, name, total as usize)?;
                self.put = Some(Put {
                    total,
                    crc,
                    next: 0,
                    held: 0,
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
                let next = len_u32(end);
                let last = next == put.total;
                if let Err(e) = hand_over(put, bytes, last, self.staging, store) {
                    self.put = None;
                    store.put_cancel();
                    return Err(e.into());
                }
                put.next = next;
                Ok(Answer::Plain(Reply::Ready { next }))
            }
            Request::PutCommit => {
                let put = self.put.take().ok_or(LinkError::NoPut)?;
                if put.next != put.total {
                    let (got, total) = (put.next, put.total);
                    // Still open: the host may send the missing pieces.
                    self.put = Some(put);
                    return Err(LinkError::Incomplete { got, total });
                }
                // `put_end` reads back what the store holds and commits it only if it has
                // the announced CRC, so the reply reports the stored dataset, not what
                // arrived.
                match store.put_end(put.crc) {
                    Ok(()) => Ok(Answer::Plain(Reply::Stored {
                        bytes: put.total,
                        crc: put.crc,
                    })),
                    Err(StoreError::Damaged) => Err(LinkError::CrcMismatch),
                    Err(e) => Err(e.into()),
                }
            }
            Request::Delete { name } => {
                self.drop_put(store);
                store.delete(name)?;
                Ok(Answer::Plain(Reply::Done))
            }
            Request::Log { index } => {
                self.drop_put(store);
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

/// Bytes handed to the store at a time: the most whole store parts that `staging`
/// holds (0 when not one does).
fn unit<S: Storage>(store: &S, staging: &[u8]) -> usize {
    let part = store.part_bytes().max(1);
    staging.len() / part * part
}

/// Copy `bytes` after the held ones in `staging` and hand each [`unit`] to `store`; with
/// `last`, the remainder too.
fn hand_over<S: Storage>(
    put: &mut Put,
    bytes: &[u8],
    last: bool,
    staging: &mut [u8],
    store: &mut S,
) -> Result<(), StoreError> {
    let part = unit(store, staging);
    if part == 0 {
        return Err(StoreError::PartSize {
            bytes: staging.len(),
            part: store.part_bytes(),
        });
    }
    let mut rest = bytes;
    while !rest.is_empty() {
        let take = (part - put.held).min(rest.len());
        staging[put.held..put.held + take].copy_from_slice(&rest[..take]);
        put.held += take;
        rest = &rest[take..];
        if put.held == part {
            store.put_part(&staging[..part])?;
            put.held = 0;
        }
    }
    if last && put.held > 0 {
        store.put_part(&staging[..put.held])?;
        put.held = 0;
    }
    Ok(())
}

fn len_u32(n: usize) -> u32 {
    u32::try_from(n).unwrap_or(u32::MAX)
}
