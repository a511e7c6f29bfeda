//! The link's bytes between a serial port that must never block (the board's USB CDC
//! port) and [`LinkServer`], as host-sim's `leeward device` does over a socket, but
//! without waiting on the host.
//!
//! Bytes are fed to the server one at a time, and only while the outbox has room for a
//! whole reply ([`MAX_WIRE`]): one byte completes at most one frame and so produces at most
//! one reply, and a reply is therefore never dropped. When the host stops reading, the
//! outbox fills, the pump stops taking bytes, and the port's own buffer and then USB's
//! flow control (NAK) hold the host back. Each call handles a bounded number of bytes so
//! that the main loop returns to the keypad in between.

use leeward_firmware::link::frame::MAX_WIRE;
use leeward_firmware::link::LinkServer;
use leeward_firmware::settings::Settings;
use leeward_firmware::storage::{Catalog, DataHead, DataKind, Storage, StoreError};

/// Bytes of replies waiting to go out: room for two whole replies.
pub const OUTBOX: usize = 2 * MAX_WIRE;
/// Bytes read from the port at a time (one USB full-speed bulk packet).
pub const READ_CHUNK: usize = 64;

/// Replies waiting for the port, in order.
#[derive(Debug, Clone)]
pub struct Outbox {
    buf: [u8; OUTBOX],
    len: usize,
}

impl Default for Outbox {
    fn default() -> Self {
        Self::new()
    }
}

impl Outbox {
    /// Empty.
    pub const fn new() -> Self {
        Outbox {
            buf: [0; OUTBOX],
            len: 0,
        }
    }
    /// Bytes free.
    pub fn room(&self) -> usize {
        OUTBOX - self.len
    }
    /// Bytes waiting.
    pub fn pending(&self) -> &[u8] {
        &self.buf[..self.len]
    }
    /// Append `bytes` whole, or nothing (false) if they do not fit.
    pub fn push(&mut self, bytes: &[u8]) -> bool {
        match self.buf.get_mut(self.len..self.len + bytes.len()) {
            Some(dst) => {
                dst.copy_from_slice(bytes);
                self.len += bytes.len();
                true
            }
            None => false,
        }
    }
    /// The first `n` bytes were sent.
    pub fn consume(&mut self, n: usize) {
        let n = n.min(self.len);
        self.buf.copy_within(n..self.len, 0);
        self.len -= n;
    }
    /// Forget everything waiting.
    pub fn clear(&mut self) {
        self.len = 0;
    }
}

/// The link's byte pump.
#[derive(Debug, Clone)]
pub struct Pump {
    rx: [u8; READ_CHUNK],
    rx_pos: usize,
    rx_len: usize,
    out: Outbox,
    /// Replies that did not fit the outbox (0 unless this module is wrong).
    lost: u32,
}

impl Default for Pump {
    fn default() -> Self {
        Self::new()
    }
}

impl Pump {
    /// Idle.
    pub const fn new() -> Self {
        Pump {
            rx: [0; READ_CHUNK],
            rx_pos: 0,
            rx_len: 0,
            out: Outbox::new(),
            lost: 0,
        }
    }

    /// Feed the server at most `budget` bytes: those already read first, then more from
    /// `read` (which fills a buffer and returns how many bytes it put there, 0 when none
    /// are waiting). Stops early when the outbox lacks room for a whole reply. Bytes fed.
    pub fn serve<S: Storage>(
        &mut self,
        server: &mut LinkServer<'_>,
        store: &mut S,
        mut read: impl FnMut(&mut [u8]) -> usize,
        budget: usize,
    ) -> usize {
        let mut fed = 0;
        while fed < budget && self.out.room() >= MAX_WIRE {
            if self.rx_pos == self.rx_len {
                let n = read(&mut self.rx).min(READ_CHUNK);
                self.rx_pos = 0;
                self.rx_len = n;
                if n == 0 {
                    break;
                }
            }
            let b = self.rx[self.rx_pos];
            self.rx_pos += 1;
            fed += 1;
            let (out, lost) = (&mut self.out, &mut self.lost);
            server.feed(&[b], store, &mut |w: &[u8]| {
                if !out.push(w) {
                    *lost += 1;
                }
            });
        }
        fed
    }

    /// Hand waiting replies to `write` (which takes what it can and returns how many
    /// bytes it took, 0 when the port is busy).
    pub fn flush(&mut self, mut write: impl FnMut(&[u8]) -> usize) {
        while !self.out.pending().is_empty() {
            let n = write(self.out.pending()).min(self.out.pending().len());
            if n == 0 {
                break;
            }
            self.out.consume(n);
        }
    }

    /// Whether bytes are waiting in either direction (the loop then comes back soon
    /// rather than sleeping until the next interrupt).
    pub fn busy(&self) -> bool {
        self.rx_pos < self.rx_len || !self.out.pending().is_empty()
    }

    /// The host went away (port closed or bus reset): drop what is waiting.
    pub fn reset(&mut self) {
        self.rx_pos = 0;
        self.rx_len = 0;
        self.out.clear();
    }

    /// Replies lost for want of outbox room (always 0: see the module documentation).
    pub fn lost(&self) -> u32 {
        self.lost
    }
}

/// A store that notes whether the link changed it (a put or a delete succeeded), so the
/// device can re-read its list for the screen.
pub struct Watched<'s, S> {
    inner: &'s mut S,
    changed: bool,
}

impl<'s, S: Storage> Watched<'s, S> {
    /// Watch `inner`.
    pub fn new(inner: &'s mut S) -> Self {
        Watched {
            inner,
            changed: false,
        }
    }
    /// Whether a change went through.
    pub fn changed(&self) -> bool {
        self.changed
    }
    fn note<T, E>(&mut self, r: Result<T, E>) -> Result<T, E> {
        self.changed |= r.is_ok();
        r
    }
}

impl<S: Storage> Storage for Watched<'_, S> {
    type Error = S::Error;
    fn load_settings(&mut self) -> Option<Settings> {
        self.inner.load_settings()
    }
    fn save_settings(&mut self, settings: &Settings) -> Result<(), S::Error> {
        let r = self.inner.save_settings(settings);
        self.note(r)
    }
    fn list(&mut self) -> Catalog {
        self.inner.list()
    }
    fn read_at(
        &mut self,
        name: &str,
        offset: usize,
        buf: &mut [u8],
    ) -> Result<(DataHead, usize), StoreError> {
        self.inner.read_at(name, offset, buf)
    }
    fn max_dataset_bytes(&self) -> usize {
        self.inner.max_dataset_bytes()
    }
    fn part_bytes(&self) -> usize {
        self.inner.part_bytes()
    }
    fn put_begin(&mut self, kind: DataKind, name: &str, len: usize) -> Result<(), StoreError> {
        self.inner.put_begin(kind, name, len)
    }
    fn put_part(&mut self, bytes: &[u8]) -> Result<(), StoreError> {
        self.inner.put_part(bytes)
    }
    fn put_end(&mut self, crc: u32) -> Result<(), StoreError> {
        let r = self.inner.put_end(crc);
        self.note(r)
    }
    fn put_cancel(&mut self) {
        self.inner.put_cancel()
    }
    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError> {
        let r = self.inner.rename(from, to);
        self.note(r)
    }
    fn delete(&mut self, name: &str) -> Result<(), StoreError> {
        let r = self.inner.delete(name);
        self.note(r)
    }
    fn free_bytes(&mut self) -> usize {
        self.inner.free_bytes()
    }
    fn log_len(&mut self) -> u32 {
        self.inner.log_len()
    }
    fn log_entry(&mut self, index: u32, buf: &mut [u8]) -> Result<usize, StoreError> {
        self.inner.log_entry(index, buf)
    }
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::*;
    use leeward_firmware::link::frame::{decode, encode, REPLY, REQUEST};
    use leeward_firmware::link::{Reply, Request, PROTOCOL_VERSION};
    use leeward_firmware::storage::MemStorage;
    use std::vec::Vec;

    fn request(seq: u16, r: &Request<'_>) -> Vec<u8> {
        let mut buf = [0u8; MAX_WIRE];
        encode(REQUEST, seq, r, &mut buf).unwrap().to_vec()
    }

    /// The sequence numbers of the reply frames in `wire`, and whether each decoded.
    fn replies(wire: &[u8]) -> Vec<(u16, bool)> {
        let mut out = Vec::new();
        for f in wire.split_inclusive(|&b| b == 0) {
            let mut f = f.to_vec();
            match decode::<Reply<'_>>(&mut f) {
                Ok((ty, seq, r)) => {
                    out.push((seq, ty == REPLY && !matches!(r, Reply::Error { .. })))
                }
                Err(_) => out.push((u16::MAX, false)),
            }
        }
        out
    }

    /// A port: bytes from the host in, replies out, `per_write` bytes taken per write.
    struct Port {
        input: Vec<u8>,
        at: usize,
        output: Vec<u8>,
    }
    impl Port {
        fn read(&mut self, b: &mut [u8]) -> usize {
            let n = b.len().min(self.input.len() - self.at).min(READ_CHUNK);
            b[..n].copy_from_slice(&self.input[self.at..self.at + n]);
            self.at += n;
            n
        }
    }

    #[test]
    fn requests_get_their_replies_through_a_slow_port() {
        let mut staging = [0u8; 2048];
        let mut server = LinkServer::new(&mut staging);
        let mut store = MemStorage::new();
        let mut input = request(
            1,
            &Request::Hello {
                version: PROTOCOL_VERSION,
            },
        );
        for seq in 2..40 {
            input.extend(request(seq, &Request::Status));
        }
        let mut port = Port {
            input,
            at: 0,
            output: Vec::new(),
        };
        let mut pump = Pump::new();
        // The port takes 7 bytes per write, and the loop gives 16 bytes per pass.
        for _ in 0..10_000 {
            pump.serve(&mut server, &mut store, |b| port.read(b), 16);
            pump.flush(|w| {
                let n = w.len().min(7);
                port.output.extend_from_slice(&w[..n]);
                n
            });
            if port.at == port.input.len() && !pump.busy() {
                break;
            }
        }
        let got = replies(&port.output);
        let want: Vec<(u16, bool)> = (1..40).map(|s| (s, true)).collect();
        assert_eq!(got, want);
        assert_eq!(pump.lost(), 0);
    }

    #[test]
    fn a_host_that_stops_reading_holds_the_input_back_and_loses_nothing() {
        let mut staging = [0u8; 2048];
        let mut server = LinkServer::new(&mut staging);
        let mut store = MemStorage::new();
        // Junk that makes an error reply every two bytes, then a real request.
        let mut input: Vec<u8> = (0..3000)
            .map(|i| if i % 2 == 0 { 0x55 } else { 0 })
            .collect();
        input.extend(request(
            9,
            &Request::Hello {
                version: PROTOCOL_VERSION,
            },
        ));
        let mut port = Port {
            input,
            at: 0,
            output: Vec::new(),
        };
        let mut pump = Pump::new();
        // The host reads nothing: the pump must stop taking bytes, not drop replies.
        for _ in 0..100 {
            pump.serve(&mut server, &mut store, |b| port.read(b), 64);
            pump.flush(|_| 0);
        }
        assert!(
            port.at < 600,
            "took {} bytes with nowhere to put replies",
            port.at
        );
        assert_eq!(pump.lost(), 0);
        // The host reads again: every reply arrives, the real one last.
        for _ in 0..100_000 {
            pump.serve(&mut server, &mut store, |b| port.read(b), 64);
            pump.flush(|w| {
                port.output.extend_from_slice(w);
                w.len()
            });
            if port.at == port.input.len() && !pump.busy() {
                break;
            }
        }
        let got = replies(&port.output);
        assert_eq!(got.len(), 1501, "one reply per junk frame, and the Hello's");
        assert_eq!(got.last(), Some(&(9, true)));
        assert_eq!(pump.lost(), 0);
    }

    #[test]
    fn a_put_over_the_link_marks_the_store_changed_a_status_does_not() {
        use leeward_firmware::link::crc32;
        let mut staging = [0u8; 2048];
        let mut server = LinkServer::new(&mut staging);
        let mut store = MemStorage::new();
        let data = [7u8; 100];
        let run = |server: &mut LinkServer<'_>, store: &mut MemStorage, reqs: &[Request<'_>]| {
            let mut w = Watched::new(store);
            let mut pump = Pump::new();
            let input: Vec<u8> = reqs
                .iter()
                .enumerate()
                .flat_map(|(i, r)| request(i as u16 + 1, r))
                .collect();
            let mut port = Port {
                input,
                at: 0,
                output: Vec::new(),
            };
            for _ in 0..1000 {
                pump.serve(server, &mut w, |b| port.read(b), 64);
                pump.flush(|b| {
                    port.output.extend_from_slice(b);
                    b.len()
                });
            }
            (w.changed(), replies(&port.output))
        };
        let hello = Request::Hello {
            version: PROTOCOL_VERSION,
        };
        let (changed, r) = run(&mut server, &mut store, &[hello.clone(), Request::Status]);
        assert!(!changed);
        assert_eq!(r, [(1, true), (2, true)]);
        let put = [
            hello,
            Request::PutBegin {
                name: "RIDGE1",
                kind: DataKind::Ridge.to_byte(),
                total: 100,
                crc: crc32(&data),
            },
            Request::PutData {
                offset: 0,
                bytes: &data,
            },
            Request::PutCommit,
        ];
        let (changed, r) = run(&mut server, &mut store, &put);
        assert!(changed, "{r:?}");
        assert_eq!(r, [(1, true), (2, true), (3, true), (4, true)]);
        assert_eq!(store.list().len(), 1);
    }

    #[test]
    fn outbox_takes_whole_replies_only() {
        let mut o = Outbox::new();
        assert!(o.push(&[1; OUTBOX - 3]));
        assert!(!o.push(&[2; 4]));
        assert_eq!(o.room(), 3);
        o.consume(OUTBOX - 5);
        assert_eq!(o.pending(), &[1, 1]);
        assert!(o.push(&[2; 4]));
        assert_eq!(o.pending(), &[1, 1, 2, 2, 2, 2]);
    }
}
