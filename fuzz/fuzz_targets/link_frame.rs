//! Any bytes on the serial line give error replies or answers, never a panic or a hang:
//! the frame decoder on its own, then the device side of the link fed the bytes (as a
//! stream, after a Hello so that every request is reachable) against an in-memory store.
//! Every reply the device sends must itself be a well-formed reply frame.
#![no_main]

use leeward_firmware::link::frame::{self, MAX_WIRE, REPLY, REQUEST};
use leeward_firmware::link::{LinkServer, Reply, Request, PROTOCOL_VERSION};
use leeward_firmware::storage::MemStorage;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut copy = data.to_vec();
    let _ = frame::decode::<Request<'_>>(&mut copy);

    let mut store = MemStorage::new();
    let mut staging = [0u8; 2048];
    let mut dev = LinkServer::new(&mut staging);
    let mut hello = [0u8; MAX_WIRE];
    let hello = frame::encode(
        REQUEST,
        1,
        &Request::Hello {
            version: PROTOCOL_VERSION,
        },
        &mut hello,
    )
    .expect("a Hello fits a frame")
    .to_vec();
    let mut replies: Vec<Vec<u8>> = vec![];
    dev.feed(&hello, &mut store, &mut |w: &[u8]| replies.push(w.to_vec()));
    dev.feed(data, &mut store, &mut |w: &[u8]| replies.push(w.to_vec()));
    for mut r in replies {
        let (ty, _, _) = frame::decode::<Reply<'_>>(&mut r).expect("the device sends good frames");
        assert_eq!(ty, REPLY);
    }
});
