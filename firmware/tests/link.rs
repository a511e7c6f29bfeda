//! The data link end to end inside one process: a host side written here drives the
//! device side ([`LinkServer`]) over bytes, against a [`MemStorage`]; then hundreds of
//! thousands of damaged frames and streams, none of which may be taken as good.
use leeward_firmware::link::frame::{self, MAX_WIRE, REPLY, REQUEST};
use leeward_firmware::link::protocol::MAX_CHUNK;
use leeward_firmware::link::server::UNKNOWN_SEQ;
use leeward_firmware::link::{crc32, LinkError, LinkServer, Reply, Request, PROTOCOL_VERSION};
use leeward_firmware::storage::{DataKind, MemStorage, Storage, StoreError};

/// splitmix64 (Steele, Lea and Flood 2014): a small seeded generator for the trials.
struct Rng(u64);
impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
}

fn wire(seq: u16, r: &Request<'_>) -> Vec<u8> {
    let mut buf = [0u8; MAX_WIRE];
    frame::encode(REQUEST, seq, r, &mut buf).unwrap().to_vec()
}

/// Send raw bytes; every reply frame that came back, decoded to owned form for the test.
fn exchange<S: Storage>(dev: &mut LinkServer<'_>, st: &mut S, bytes: &[u8]) -> Vec<(u16, String)> {
    let mut out: Vec<Vec<u8>> = vec![];
    dev.feed(bytes, st, &mut |w: &[u8]| out.push(w.to_vec()));
    out.into_iter()
        .map(|mut w| {
            let (ty, seq, r): (u8, u16, Reply<'_>) = frame::decode(&mut w).unwrap();
            assert_eq!(ty, REPLY);
            (seq, format!("{r:?}"))
        })
        .collect()
}

/// One request, its one reply (as Debug text, with the sequence number checked).
fn ask<S: Storage>(dev: &mut LinkServer<'_>, st: &mut S, seq: u16, r: &Request<'_>) -> String {
    let replies = exchange(dev, st, &wire(seq, r));
    assert_eq!(replies.len(), 1, "{r:?}: {replies:?}");
    assert_eq!(replies[0].0, seq);
    replies[0].1.clone()
}

/// Open the session with a Hello of this protocol; its reply.
fn open_session<S: Storage>(dev: &mut LinkServer<'_>, st: &mut S, seq: u16) -> String {
    ask(
        dev,
        st,
        seq,
        &Request::Hello {
            version: PROTOCOL_VERSION,
        },
    )
}

fn err(e: LinkError) -> String {
    format!("{:?}", Reply::Error { error: e })
}

fn dataset(len: usize, seed: u64) -> Vec<u8> {
    let mut r = Rng(seed);
    (0..len).map(|_| r.next() as u8).collect()
}

/// Send `data` as dataset `name` in MAX_CHUNK pieces; the final reply.
fn push<S: Storage>(dev: &mut LinkServer<'_>, st: &mut S, name: &str, data: &[u8]) -> String {
    let begin = Request::PutBegin {
        name,
        kind: DataKind::Sounding.to_byte(),
        total: data.len() as u32,
        crc: crc32(data),
    };
    assert_eq!(ask(dev, st, 10, &begin), "Ready { next: 0 }");
    for (i, piece) in data.chunks(MAX_CHUNK).enumerate() {
        let offset = (i * MAX_CHUNK) as u32;
        let r = ask(
            dev,
            st,
            11 + i as u16,
            &Request::PutData {
                offset,
                bytes: piece,
            },
        );
        assert_eq!(
            r,
            format!("Ready {{ next: {} }}", offset as usize + piece.len())
        );
    }
    ask(dev, st, 9, &Request::PutCommit)
}

#[test]
fn a_session_lists_puts_gets_and_deletes() {
    let mut st = MemStorage::new();
    st.put(DataKind::Stations, "DEMO", &[1, 2, 3]).unwrap();
    let mut staging = [0u8; 2048];
    let mut dev = LinkServer::new(&mut staging);
    // Nothing before the Hello; a Hello of another version is refused with ours.
    assert_eq!(
        ask(&mut dev, &mut st, 1, &Request::Entry { index: 0 }),
        err(LinkError::NeedHello)
    );
    assert_eq!(
        ask(
            &mut dev,
            &mut st,
            2,
            &Request::Hello {
                version: PROTOCOL_VERSION + 1
            }
        ),
        err(LinkError::Version {
            device: PROTOCOL_VERSION
        })
    );
    let hello = open_session(&mut dev, &mut st, 3);
    assert!(
        hello.starts_with(&format!(
            "Hello {{ version: {PROTOCOL_VERSION}, max_dataset: {}",
            st.max_dataset_bytes()
        )),
        "{hello}"
    );

    assert_eq!(
        ask(&mut dev, &mut st, 4, &Request::Status),
        format!(
            "Status {{ count: 1, free: {}, clock_unix_s: None }}",
            st.free_bytes()
        )
    );
    let entry = ask(&mut dev, &mut st, 4, &Request::Entry { index: 0 });
    assert_eq!(
        entry,
        format!(
            "Entry {{ count: 1, name: \"DEMO\", kind: {}, bytes: 3, free: {} }}",
            DataKind::Stations.to_byte(),
            st.free_bytes()
        )
    );
    assert_eq!(
        ask(&mut dev, &mut st, 5, &Request::Entry { index: 1 }),
        err(LinkError::NotFound)
    );

    // A put of 1000 bytes in four pieces; the reply is the stored dataset's CRC.
    let data = dataset(1000, 1);
    let stored = push(&mut dev, &mut st, "T_1200", &data);
    assert_eq!(
        stored,
        format!("Stored {{ bytes: 1000, crc: {} }}", crc32(&data))
    );
    let mut back = [0u8; 1000];
    assert_eq!(st.get("T_1200", &mut back), Ok((DataKind::Sounding, 1000)));
    assert_eq!(&back[..], &data[..]);

    // Get it back piece by piece.
    let mut got = vec![];
    while got.len() < data.len() {
        let mut buf = [0u8; MAX_WIRE];
        let w = frame::encode(
            REQUEST,
            20,
            &Request::Get {
                name: "T_1200",
                offset: got.len() as u32,
            },
            &mut buf,
        )
        .unwrap()
        .to_vec();
        let mut out = vec![];
        dev.feed(&w, &mut st, &mut |w: &[u8]| out.push(w.to_vec()));
        let (_, _, r): (u8, u16, Reply<'_>) = frame::decode(&mut out[0]).unwrap();
        match r {
            Reply::Chunk {
                total,
                crc,
                kind,
                offset,
                bytes,
            } => {
                assert_eq!(
                    (total, crc, kind, offset as usize),
                    (1000, crc32(&data), DataKind::Sounding.to_byte(), got.len())
                );
                assert!(!bytes.is_empty() && bytes.len() <= MAX_CHUNK);
                got.extend_from_slice(bytes);
            }
            other => panic!("{other:?}"),
        }
    }
    assert_eq!(got, data);

    // The same name again is refused; delete, then it is gone.
    let begin = Request::PutBegin {
        name: "T_1200",
        kind: 2,
        total: 1,
        crc: 0,
    };
    assert_eq!(
        ask(&mut dev, &mut st, 30, &begin),
        err(LinkError::NameTaken)
    );
    assert_eq!(
        ask(&mut dev, &mut st, 31, &Request::Delete { name: "T_1200" }),
        "Done"
    );
    assert_eq!(
        ask(&mut dev, &mut st, 32, &Request::Delete { name: "T_1200" }),
        err(LinkError::NotFound)
    );
    assert_eq!(st.list().len(), 1);
    assert_eq!(
        ask(
            &mut dev,
            &mut st,
            33,
            &Request::SetClock {
                unix_s: 1_796_212_800
            }
        ),
        "Done"
    );
    assert_eq!(dev.clock_unix_s(), Some(1_796_212_800));
}

#[test]
fn refused_puts_store_nothing() {
    let mut st = MemStorage::new();
    let mut staging = [0u8; 600];
    let mut dev = LinkServer::new(&mut staging);
    open_session(&mut dev, &mut st, 1);
    let data = dataset(500, 2);
    let begin = |name, kind, total, crc| Request::PutBegin {
        name,
        kind,
        total,
        crc,
    };
    // Bad name, unknown kind, too big for the device.
    assert_eq!(
        ask(&mut dev, &mut st, 2, &begin("lower", 2, 10, 0)),
        err(LinkError::BadName)
    );
    assert_eq!(
        ask(&mut dev, &mut st, 3, &begin("K", 99, 10, 0)),
        err(LinkError::BadKind)
    );
    let max = st.max_dataset_bytes() as u32;
    assert_eq!(
        ask(&mut dev, &mut st, 4, &begin("K", 2, max + 1, 0)),
        err(LinkError::TooBig { max })
    );
    // Data without a put, commit without a put.
    assert_eq!(
        ask(
            &mut dev,
            &mut st,
            5,
            &Request::PutData {
                offset: 0,
                bytes: &[1]
            }
        ),
        err(LinkError::NoPut)
    );
    assert_eq!(
        ask(&mut dev, &mut st, 6, &Request::PutCommit),
        err(LinkError::NoPut)
    );
    // The announced CRC is not the data's: everything arrives, nothing is stored.
    assert_eq!(
        ask(&mut dev, &mut st, 7, &begin("K", 2, 500, crc32(&data) ^ 1)),
        "Ready { next: 0 }"
    );
    for (i, piece) in data.chunks(MAX_CHUNK).enumerate() {
        ask(
            &mut dev,
            &mut st,
            8,
            &Request::PutData {
                offset: (i * MAX_CHUNK) as u32,
                bytes: piece,
            },
        );
    }
    assert_eq!(
        ask(&mut dev, &mut st, 9, &Request::PutCommit),
        err(LinkError::CrcMismatch)
    );
    assert!(st.list().is_empty());
    // A piece skipped: out of order names the offset wanted; commit says what is missing
    // and the put stays open, so the missing piece can still come.
    assert_eq!(
        ask(&mut dev, &mut st, 10, &begin("K", 2, 500, crc32(&data))),
        "Ready { next: 0 }"
    );
    ask(
        &mut dev,
        &mut st,
        11,
        &Request::PutData {
            offset: 0,
            bytes: &data[..256],
        },
    );
    assert_eq!(
        ask(
            &mut dev,
            &mut st,
            12,
            &Request::PutData {
                offset: 300,
                bytes: &data[300..]
            }
        ),
        err(LinkError::OutOfOrder { next: 256 })
    );
    assert_eq!(
        ask(&mut dev, &mut st, 13, &Request::PutCommit),
        err(LinkError::Incomplete {
            got: 256,
            total: 500
        })
    );
    // The same piece twice (its Ready lost) is answered again and taken once.
    assert_eq!(
        ask(
            &mut dev,
            &mut st,
            14,
            &Request::PutData {
                offset: 0,
                bytes: &data[..256]
            }
        ),
        "Ready { next: 256 }"
    );
    ask(
        &mut dev,
        &mut st,
        15,
        &Request::PutData {
            offset: 256,
            bytes: &data[256..],
        },
    );
    assert_eq!(
        ask(&mut dev, &mut st, 16, &Request::PutCommit),
        format!("Stored {{ bytes: 500, crc: {} }}", crc32(&data))
    );
    // A store that is full says so in the link's words, at the PutBegin: nothing is
    // sent in vain.
    let mut full = MemStorage::new();
    full.put(DataKind::Sounding, "BIG", &[0u8; 4000]).unwrap();
    let mut staging = [0u8; 600];
    let mut dev = LinkServer::new(&mut staging);
    open_session(&mut dev, &mut full, 1);
    let r = ask(&mut dev, &mut full, 2, &begin("K", 2, 500, crc32(&data)));
    let free = full.free_bytes();
    let need = match full.put(DataKind::Sounding, "K", &data) {
        Err(StoreError::Full { need, .. }) => need,
        other => panic!("{other:?}"),
    };
    assert_eq!(
        r,
        err(LinkError::Full {
            need: need as u32,
            free: free as u32
        })
    );
}

#[test]
fn damaged_and_foreign_frames_get_an_error_reply() {
    let mut st = MemStorage::new();
    let mut staging = [0u8; 64];
    let mut dev = LinkServer::new(&mut staging);
    // Garbage, an overlong run, a reply-type frame, and then a good Hello: the link
    // resynchronises at each zero.
    let mut bytes = vec![1, 2, 3, 0];
    bytes.extend(std::iter::repeat_n(9u8, MAX_WIRE + 5));
    bytes.push(0);
    let mut buf = [0u8; MAX_WIRE];
    bytes.extend_from_slice(frame::encode(REPLY, 4, &Request::PutCommit, &mut buf).unwrap());
    bytes.extend(wire(
        5,
        &Request::Hello {
            version: PROTOCOL_VERSION,
        },
    ));
    let replies = exchange(&mut dev, &mut st, &bytes);
    assert_eq!(replies.len(), 4, "{replies:?}");
    assert_eq!(replies[0], (UNKNOWN_SEQ, err(LinkError::Damaged)));
    assert_eq!(replies[1], (UNKNOWN_SEQ, err(LinkError::Damaged)));
    assert_eq!(replies[2], (4, err(LinkError::NotUnderstood)));
    assert_eq!(replies[3].0, 5);
    assert!(replies[3].1.starts_with("Hello"));
    // A frame whose CRC is right but whose payload is no request.
    let mut buf = [0u8; MAX_WIRE];
    let odd = frame::encode(REQUEST, 6, &(200u8, 1u8), &mut buf)
        .unwrap()
        .to_vec();
    assert_eq!(
        exchange(&mut dev, &mut st, &odd),
        vec![(UNKNOWN_SEQ, err(LinkError::NotUnderstood))]
    );
}

/// One random damage to the frame bytes before the zero: bit flips, a dropped or inserted
/// byte, a truncation, a repeated run.
fn damage(rng: &mut Rng, f: &[u8]) -> Vec<u8> {
    let mut g = f.to_vec();
    match rng.below(5) {
        0 => {
            for _ in 0..1 + rng.below(3) {
                let i = rng.below(g.len());
                g[i] ^= 1 << rng.below(8);
            }
        }
        1 => {
            g.remove(rng.below(g.len()));
        }
        2 => {
            let at = rng.below(g.len() + 1);
            g.insert(at, rng.next() as u8);
        }
        3 => g.truncate(rng.below(g.len())),
        _ => {
            let a = rng.below(g.len());
            let b = (a + 1 + rng.below(8)).min(g.len());
            let run = g[a..b].to_vec();
            let at = rng.below(g.len() + 1);
            g.splice(at..at, run);
        }
    }
    g
}

#[test]
fn no_damaged_frame_is_accepted_in_100000_trials() {
    let data = dataset(MAX_CHUNK, 3);
    let requests = [
        Request::Hello {
            version: PROTOCOL_VERSION,
        },
        Request::Status,
        Request::Entry { index: 3 },
        Request::Get {
            name: "T_1200",
            offset: 512,
        },
        Request::PutBegin {
            name: "SONDE",
            kind: 2,
            total: 9000,
            crc: 0xDEAD_BEEF,
        },
        Request::PutData {
            offset: 768,
            bytes: &data,
        },
        Request::PutCommit,
        Request::Delete { name: "DEMO" },
        Request::SetClock {
            unix_s: 1_796_212_800,
        },
    ];
    let frames: Vec<Vec<u8>> = requests
        .iter()
        .enumerate()
        .map(|(i, r)| {
            let mut w = wire(i as u16, r);
            w.pop(); // the zero
            w
        })
        .collect();
    let mut rng = Rng(20_261_202);
    let (mut trials, mut refused, mut unchanged) = (0u32, 0u32, 0u32);
    while trials < 100_000 {
        let k = rng.below(frames.len());
        let mut g = damage(&mut rng, &frames[k]);
        trials += 1;
        if g == frames[k] {
            unchanged += 1; // a flip that flipped back, say: not damage
            continue;
        }
        // A zero inside damaged bytes splits them; each piece is a frame of its own. A
        // zero inserted at either end leaves the whole frame intact beside it: no damage.
        for piece in g.split_mut(|&b| b == 0) {
            if piece.is_empty() || *piece == frames[k][..] {
                continue;
            }
            let before = piece.to_vec();
            match frame::decode::<Request<'_>>(piece) {
                Err(_) => refused += 1,
                Ok(m) => panic!(
                    "damaged frame {before:?} of {:?} taken as {m:?}",
                    requests[k]
                ),
            }
        }
    }
    assert!(refused as f64 >= 0.99 * (trials - unchanged) as f64);
    println!("{trials} trials, {unchanged} left the frame intact, {refused} damaged frames refused, 0 taken");
}

#[test]
fn a_put_with_one_damaged_frame_stores_the_data_whole_or_not_at_all() {
    // 20,000 sessions: one frame of a four-piece put is damaged and the host carries on
    // regardless. The device must store the dataset exactly, or not at all.
    let data = dataset(900, 4);
    let mut stream: Vec<Vec<u8>> = vec![wire(
        0,
        &Request::Hello {
            version: PROTOCOL_VERSION,
        },
    )];
    stream.push(wire(
        1,
        &Request::PutBegin {
            name: "P",
            kind: 2,
            total: 900,
            crc: crc32(&data),
        },
    ));
    for (i, piece) in data.chunks(MAX_CHUNK).enumerate() {
        stream.push(wire(
            2 + i as u16,
            &Request::PutData {
                offset: (i * MAX_CHUNK) as u32,
                bytes: piece,
            },
        ));
    }
    stream.push(wire(9, &Request::PutCommit));
    let mut rng = Rng(7);
    let (mut whole, mut none) = (0, 0);
    for _ in 0..20_000 {
        let mut st = MemStorage::new();
        let mut staging = [0u8; 1024];
        let mut dev = LinkServer::new(&mut staging);
        let hit = rng.below(stream.len());
        for (i, f) in stream.iter().enumerate() {
            let bytes = if i == hit {
                let mut g = damage(&mut rng, &f[..f.len() - 1]);
                g.push(0);
                g
            } else {
                f.clone()
            };
            dev.feed(&bytes, &mut st, &mut |_| {});
        }
        let mut back = [0u8; 1024];
        match st.get("P", &mut back) {
            Ok((_, n)) => {
                assert_eq!(&back[..n], &data[..], "a different dataset was stored");
                whole += 1;
            }
            Err(StoreError::NotFound) => none += 1,
            Err(e) => panic!("{e:?}"),
        }
    }
    // Damage that a good frame survives (an inserted zero before the frame, say) lets the
    // put complete; most damage stops it.
    assert!(none > 10_000, "whole {whole}, none {none}");
}

#[test]
fn frames_built_from_the_documentation_alone_are_understood() {
    // fuzz/make_link_seeds.py builds frames from docs/link.md with Python's own COBS
    // and zlib's CRC-32, not from this code: a Hello, then a whole put of 40 bytes.
    let seeds = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../fuzz/seeds/link_frame");
    let mut hello = std::fs::read(seeds.join("hello")).unwrap();
    let (ty, seq, r): (u8, u16, Request<'_>) = frame::decode(&mut hello).unwrap();
    assert_eq!(
        (ty, seq, r),
        (
            REQUEST,
            1,
            Request::Hello {
                version: PROTOCOL_VERSION
            }
        )
    );
    let put = std::fs::read(seeds.join("put")).unwrap();
    let mut st = MemStorage::new();
    let mut staging = [0u8; 64];
    let mut dev = LinkServer::new(&mut staging);
    let replies = exchange(&mut dev, &mut st, &put);
    let data: Vec<u8> = (1..=40).collect();
    assert_eq!(replies.len(), 4, "{replies:?}");
    assert_eq!(
        replies[3],
        (6, format!("Stored {{ bytes: 40, crc: {} }}", crc32(&data)))
    );
    let mut back = [0u8; 40];
    assert_eq!(st.get("T_1200", &mut back), Ok((DataKind::Sounding, 40)));
    assert_eq!(&back[..], &data[..]);
}

#[test]
fn a_long_dataset_streams_to_flash_through_one_store_part_of_staging() {
    use leeward_firmware::flash::{sim::SimFlash, FlashStore};
    use leeward_firmware::link::STAGING_BYTES;
    // The board's map geometry: three 16 KiB pages (and one for the log).
    const PAGE: u32 = 16 * 1024;
    let open = |f| FlashStore::open(f, 0..3 * PAGE, 3 * PAGE..4 * PAGE).unwrap();
    let mut st = open(SimFlash::<Vec<u8>, 4, { 16 * 1024 }>::new(
        vec![0xFF; 4 * PAGE as usize],
        3,
    ));
    let mut staging = [0u8; STAGING_BYTES];
    let mut dev = LinkServer::new(&mut staging);
    let hello = open_session(&mut dev, &mut st, 1);
    let max = format!(
        "max_dataset: {}",
        leeward_firmware::flash::MAX_DATASET_BYTES
    );
    assert!(hello.contains(&max), "{hello}");
    // Ten times the staging buffer, in the link's pieces.
    let data = dataset(10 * STAGING_BYTES + 77, 11);
    assert_eq!(
        push(&mut dev, &mut st, "LONG", &data),
        format!("Stored {{ bytes: {}, crc: {} }}", data.len(), crc32(&data))
    );
    // Read back over the link, piece by piece.
    let mut back = Vec::new();
    while back.len() < data.len() {
        let r = ask(
            &mut dev,
            &mut st,
            40,
            &Request::Get {
                name: "LONG",
                offset: back.len() as u32,
            },
        );
        let want = format!("crc: {}", crc32(&data));
        assert!(r.contains(&want), "{r}");
        let start = r.find("bytes: [").unwrap() + 8;
        let end = r[start..].find(']').unwrap() + start;
        let piece: Vec<u8> = r[start..end]
            .split(", ")
            .map(|b| b.parse().unwrap())
            .collect();
        assert!(!piece.is_empty() && piece.len() <= MAX_CHUNK);
        back.extend(piece);
    }
    assert_eq!(back, data);
    // A session that ends half way through a put leaves nothing, and the store's room
    // is as before; the same put then goes through.
    let free = st.free_bytes();
    let begin = Request::PutBegin {
        name: "HALF",
        kind: DataKind::Sounding.to_byte(),
        total: data.len() as u32,
        crc: crc32(&data),
    };
    assert_eq!(ask(&mut dev, &mut st, 50, &begin), "Ready { next: 0 }");
    for (i, piece) in data.chunks(MAX_CHUNK).take(9).enumerate() {
        ask(
            &mut dev,
            &mut st,
            51,
            &Request::PutData {
                offset: (i * MAX_CHUNK) as u32,
                bytes: piece,
            },
        );
    }
    dev.reset(&mut st);
    assert_eq!(st.list().len(), 1);
    assert_eq!(st.free_bytes(), free);
    open_session(&mut dev, &mut st, 60);
    assert!(push(&mut dev, &mut st, "HALF", &data[..5000]).starts_with("Stored"));
    // What was stored survives a reboot.
    let mut again = open(st.into_flash());
    let mut buf = vec![0u8; data.len()];
    assert_eq!(
        again.get("LONG", &mut buf),
        Ok((DataKind::Sounding, data.len()))
    );
    assert_eq!(buf, data);
    assert_eq!(again.get("HALF", &mut buf), Ok((DataKind::Sounding, 5000)));
    assert_eq!(&buf[..5000], &data[..5000]);
}

#[test]
fn a_change_made_on_the_device_during_a_put_ends_it_cleanly() {
    let mut st = MemStorage::new();
    let mut staging = [0u8; 256];
    let mut dev = LinkServer::new(&mut staging);
    open_session(&mut dev, &mut st, 1);
    let data = dataset(600, 4);
    let begin = Request::PutBegin {
        name: "K",
        kind: DataKind::Sounding.to_byte(),
        total: data.len() as u32,
        crc: crc32(&data),
    };
    assert_eq!(ask(&mut dev, &mut st, 2, &begin), "Ready { next: 0 }");
    ask(
        &mut dev,
        &mut st,
        3,
        &Request::PutData {
            offset: 0,
            bytes: &data[..256],
        },
    );
    // The user saves a station set on the keypad meanwhile.
    st.put(DataKind::Stations, "SET", &[1, 2, 3]).unwrap();
    assert_eq!(
        ask(
            &mut dev,
            &mut st,
            4,
            &Request::PutData {
                offset: 256,
                bytes: &data[256..512],
            },
        ),
        err(LinkError::NoPut)
    );
    assert_eq!(st.list().len(), 1);
    // The host starts again, and the whole dataset arrives.
    assert!(push(&mut dev, &mut st, "K", &data).starts_with("Stored"));
    assert_eq!(st.list().len(), 2);
}
