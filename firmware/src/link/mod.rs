//! The data link to a laptop: a framed request/response protocol over a serial port.
//!
//! | module | what it holds |
//! |---|---|
//! | [`frame`] | one frame on the wire: COBS(type, sequence number, postcard payload, CRC-32), then a zero byte; the byte-stream splitter that resynchronises at the next zero |
//! | [`protocol`] | the requests, the replies and the error codes |
//! | [`server`] | the device side: answers requests against a [`crate::storage::Storage`] |
//!
//! The host sends one request and waits for its reply; every request carries a sequence
//! number that the reply repeats. A damaged, truncated, oversized or unknown frame gets an
//! error reply and changes nothing. A dataset is sent in chunks, which go to the store as
//! they arrive; it is stored only when all of it has arrived and what the store reads
//! back has the CRC-32 announced; the device reports the stored dataset's size and CRC-32
//! for the host to compare.

pub mod frame;
pub mod protocol;
pub mod server;

pub use frame::{crc32, decode, encode, FrameError, Splitter, Splitting};
pub use protocol::{LinkError, Reply, Request, PROTOCOL_VERSION};
pub use server::{LinkServer, STAGING_BYTES};
