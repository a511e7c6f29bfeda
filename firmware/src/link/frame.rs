//! One frame: COBS(type, sequence number, postcard payload, CRC-32 little-endian), ended by
//! a zero byte. The CRC-32 (the ISO-HDLC polynomial used by Ethernet and zip, check value
//! 0xCBF43926) covers the type, the sequence number and the payload as encoded.
//!
//! Encoding goes through postcard's CRC and COBS flavors; decoding undoes the COBS in
//! place, checks the CRC over every byte, and accepts the payload only if postcard reads
//! it to the last byte.

use postcard::ser_flavors::{crc::CrcModifier, Cobs, Slice};
use serde::{Deserialize, Serialize};

/// The CRC-32 of the link and of stored datasets.
pub const CRC: crc::Crc<u32> = crc::Crc::<u32>::new(&crc::CRC_32_ISO_HDLC);

/// CRC-32 (ISO-HDLC) of `bytes`.
pub fn crc32(bytes: &[u8]) -> u32 {
    CRC.checksum(bytes)
}

/// Frame type of a request (host to device).
pub const REQUEST: u8 = 0x51;
/// Frame type of a reply (device to host).
pub const REPLY: u8 = 0x52;

/// Largest frame before COBS: type, sequence number, payload and CRC.
pub const MAX_FRAME: usize = 320;
/// Largest frame on the wire: COBS adds one byte in 254, plus the zero at the end.
pub const MAX_WIRE: usize = cobs::max_encoding_length(MAX_FRAME) + 1;

/// Why bytes between two zeros are not a frame.
#[non_exhaustive]
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FrameError {
    /// The COBS encoding is broken.
    Cobs,
    /// Too short to hold a type, a sequence number and a CRC.
    Short,
    /// The CRC does not match: the frame was damaged on the way.
    Crc,
    /// The CRC matches but the payload is not a message of this protocol.
    Payload,
    /// Longer than [`MAX_WIRE`] before its zero byte.
    TooLong,
    /// The message does not fit the buffer it is encoded into.
    NoRoom,
}

impl core::fmt::Display for FrameError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        f.write_str(match self {
            FrameError::Cobs => "damaged frame (bad COBS encoding)",
            FrameError::Short => "damaged frame (too short)",
            FrameError::Crc => "damaged frame (CRC mismatch)",
            FrameError::Payload => "frame not understood (unknown message)",
            FrameError::TooLong => "frame too long",
            FrameError::NoRoom => "message too large for a frame",
        })
    }
}

impl core::error::Error for FrameError {}

/// Encode `msg` as a frame of type `ty` with sequence number `seq` into `buf`, zero byte
/// included; returns the bytes to send.
pub fn encode<'b, T: Serialize>(
    ty: u8,
    seq: u16,
    msg: &T,
    buf: &'b mut [u8],
) -> Result<&'b mut [u8], FrameError> {
    let cobs = Cobs::try_new(Slice::new(buf)).map_err(|_| FrameError::NoRoom)?;
    let flavor = CrcModifier::new(cobs, CRC.digest());
    postcard::serialize_with_flavor(&(ty, seq, msg), flavor).map_err(|_| FrameError::NoRoom)
}

/// Decode one frame (the bytes before its zero, which may be absent) in place: its type,
/// sequence number and message.
pub fn decode<'b, T: Deserialize<'b>>(wire: &'b mut [u8]) -> Result<(u8, u16, T), FrameError> {
    let wire = match wire.split_last() {
        Some((0, rest)) => {
            let n = rest.len();
            &mut wire[..n]
        }
        _ => wire,
    };
    if wire.len() > MAX_WIRE {
        return Err(FrameError::TooLong);
    }
    let n = cobs::decode_in_place(wire).map_err(|_| FrameError::Cobs)?;
    let raw = &wire[..n];
    if raw.len() < 1 + 1 + 4 {
        return Err(FrameError::Short);
    }
    let (body, tail) = raw.split_at(raw.len() - 4);
    let mut want = [0u8; 4];
    want.copy_from_slice(tail);
    if crc32(body) != u32::from_le_bytes(want) {
        return Err(FrameError::Crc);
    }
    match postcard::take_from_bytes::<(u8, u16, T)>(body) {
        Ok((m, [])) => Ok(m),
        _ => Err(FrameError::Payload),
    }
}

/// What [`Splitter::push`] found.
#[derive(Debug, PartialEq, Eq)]
pub enum Splitting<'a> {
    /// The byte was kept; no frame is complete yet.
    More,
    /// A complete frame's bytes (without its zero), to hand to [`decode`].
    Frame(&'a mut [u8]),
    /// Bytes were thrown away up to this zero: the frame was longer than [`MAX_WIRE`].
    Overflow,
    /// A lone zero (an empty frame): nothing to do.
    Empty,
}

/// Splits a byte stream into frames at each zero byte. After an overlong frame it drops
/// bytes up to the next zero, so the link resynchronises at the next delimiter.
pub struct Splitter {
    buf: [u8; MAX_WIRE],
    len: usize,
    overflow: bool,
}

impl Default for Splitter {
    fn default() -> Self {
        Self::new()
    }
}

impl Splitter {
    /// An empty splitter.
    pub const fn new() -> Self {
        Splitter {
            buf: [0; MAX_WIRE],
            len: 0,
            overflow: false,
        }
    }

    /// Take one byte.
    pub fn push(&mut self, b: u8) -> Splitting<'_> {
        if b == 0 {
            let (len, overflow) = (self.len, self.overflow);
            self.len = 0;
            self.overflow = false;
            return if overflow {
                Splitting::Overflow
            } else if len == 0 {
                Splitting::Empty
            } else {
                Splitting::Frame(&mut self.buf[..len])
            };
        }
        if self.overflow {
            return Splitting::More;
        }
        match self.buf.get_mut(self.len) {
            Some(slot) => {
                *slot = b;
                self.len += 1;
            }
            None => {
                self.overflow = true;
                self.len = 0;
            }
        }
        Splitting::More
    }

    /// Forget a partial frame (after the other side was restarted, say).
    pub fn reset(&mut self) {
        self.len = 0;
        self.overflow = false;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn crc32_check_value() {
        // The catalogue check value of CRC-32/ISO-HDLC: the CRC of "123456789"
        // (Williams, "A painless guide to CRC error detection algorithms"; reveng catalogue).
        assert_eq!(crc32(b"123456789"), 0xCBF4_3926);
    }

    #[test]
    fn a_frame_round_trips_and_ends_in_its_only_zero() {
        let mut buf = [0u8; MAX_WIRE];
        let msg: (u32, &str) = (0x0001_0000, "TESSEL");
        let wire = encode(REQUEST, 513, &msg, &mut buf).unwrap();
        let n = wire.len();
        assert_eq!(wire[n - 1], 0);
        assert!(wire[..n - 1].iter().all(|&b| b != 0));
        let mut copy = [0u8; MAX_WIRE];
        copy[..n].copy_from_slice(wire);
        let (ty, seq, back): (u8, u16, (u32, &str)) = decode(&mut copy[..n]).unwrap();
        assert_eq!((ty, seq, back), (REQUEST, 513, msg));
    }

    #[test]
    fn a_flipped_bit_is_refused() {
        let mut buf = [0u8; MAX_WIRE];
        let n = encode(REPLY, 7, &(1u8, 2u16), &mut buf).unwrap().len();
        for byte in 0..n - 1 {
            for bit in 0..8 {
                let mut w = buf;
                w[byte] ^= 1 << bit;
                let r = decode::<(u8, u16)>(&mut w[..n]);
                assert!(r.is_err(), "flip at {byte}.{bit} accepted: {r:?}");
            }
        }
    }

    #[test]
    fn the_splitter_resynchronises_after_an_overlong_frame() {
        let mut s = Splitter::new();
        for _ in 0..MAX_WIRE + 10 {
            assert_eq!(s.push(7), Splitting::More);
        }
        assert_eq!(s.push(0), Splitting::Overflow);
        assert_eq!(s.push(0), Splitting::Empty);
        s.push(3);
        s.push(4);
        match s.push(0) {
            Splitting::Frame(f) => assert_eq!(f, &[3, 4]),
            other => panic!("{other:?}"),
        }
    }
}
