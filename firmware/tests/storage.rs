//! The storage trait's datasets in MemStorage: put, get, rename, delete, free space and
//! the errors as values; station sets round-trip through their fixed layout.
use leeward_core::network::{Network, Station, MAX_STATIONS};
use leeward_firmware::storage::*;

fn names(st: &mut MemStorage) -> Vec<(DataKind, String, u16)> {
    st.list()
        .iter()
        .map(|d| (d.kind, d.name.to_string(), d.bytes))
        .collect()
}

#[test]
fn datasets_put_get_rename_delete() {
    let mut st = MemStorage::new();
    assert_eq!(st.free_bytes(), MEM_CAPACITY);
    st.put(DataKind::Stations, "ALPS", &[1, 2, 3]).unwrap();
    st.put(DataKind::Sounding, "T_0600", &[9; 100]).unwrap();
    assert_eq!(st.free_bytes(), MEM_CAPACITY - 2 * RECORD_HEADER - 103);
    assert_eq!(
        names(&mut st),
        vec![
            (DataKind::Stations, "ALPS".into(), 3),
            (DataKind::Sounding, "T_0600".into(), 100)
        ]
    );
    let mut buf = [0u8; 128];
    assert_eq!(st.get("ALPS", &mut buf), Ok((DataKind::Stations, 3)));
    assert_eq!(&buf[..3], &[1, 2, 3]);
    assert_eq!(
        st.get("T_0600", &mut buf[..10]),
        Err(StoreError::TooBig {
            bytes: 100,
            max: 10
        })
    );
    assert_eq!(
        st.put(DataKind::Stations, "ALPS", &[]),
        Err(StoreError::NameTaken)
    );
    assert_eq!(
        st.put(DataKind::Stations, "alps", &[]),
        Err(StoreError::BadName)
    );
    assert_eq!(
        st.put(DataKind::Stations, "", &[]),
        Err(StoreError::BadName)
    );
    assert_eq!(st.rename("ALPS", "T_0600"), Err(StoreError::NameTaken));
    assert_eq!(st.rename("NONE", "X"), Err(StoreError::NotFound));
    st.rename("ALPS", "ALPS2").unwrap();
    assert_eq!(st.get("ALPS", &mut buf), Err(StoreError::NotFound));
    assert_eq!(st.get("ALPS2", &mut buf), Ok((DataKind::Stations, 3)));
    st.delete("ALPS2").unwrap();
    assert_eq!(st.delete("ALPS2"), Err(StoreError::NotFound));
    // The later dataset moved down whole.
    assert_eq!(st.get("T_0600", &mut buf), Ok((DataKind::Sounding, 100)));
    assert_eq!(&buf[..100], &[9; 100][..]);
    assert_eq!(st.free_bytes(), MEM_CAPACITY - RECORD_HEADER - 100);
    st.delete("T_0600").unwrap();
    assert_eq!(st.free_bytes(), MEM_CAPACITY);
    assert!(st.list().is_empty());
}

#[test]
fn a_full_store_says_so_and_keeps_what_it_has() {
    let mut st = MemStorage::new();
    let big = [7u8; 1000];
    for name in ["A", "B", "C", "D"] {
        st.put(DataKind::Sounding, name, &big).unwrap();
    }
    let free = st.free_bytes();
    assert_eq!(free, MEM_CAPACITY - 4 * (RECORD_HEADER + 1000));
    assert_eq!(
        st.put(DataKind::Sounding, "E", &big),
        Err(StoreError::Full {
            need: RECORD_HEADER + 1000,
            free
        })
    );
    assert_eq!(st.list().len(), 4);
    for i in 0..4 {
        st.delete(["A", "B", "C", "D"][i]).unwrap();
    }
    for i in 0..MAX_DATASETS {
        let name = format!("N{i}");
        st.put(DataKind::Stations, &name, &[]).unwrap();
    }
    assert_eq!(
        st.put(DataKind::Stations, "ONEMORE", &[]),
        Err(StoreError::TooMany { max: MAX_DATASETS })
    );
}

#[test]
fn station_sets_round_trip() {
    let net = leeward_core::demo::network().unwrap();
    let mut buf = [0u8; MAX_STATION_SET_BYTES];
    let n = encode_stations(&net, &mut buf).unwrap();
    assert!(n <= 3 + net.len() * STATION_BYTES, "{n}");
    assert_eq!(decode_stations(&buf[..n]), Ok(net.clone()));
    // Through the store as well.
    let mut st = MemStorage::new();
    st.put(DataKind::Stations, "DEMO", &buf[..n]).unwrap();
    let mut back = [0u8; MAX_STATION_SET_BYTES];
    let (kind, len) = st.get("DEMO", &mut back).unwrap();
    assert_eq!(kind, DataKind::Stations);
    assert_eq!(decode_stations(&back[..len]), Ok(net.clone()));
    // A missing height error stays missing.
    let mut one = Network::new();
    one.push(Station::new("X_1", -45.0, 170.0, 5500.0, None).unwrap())
        .unwrap();
    let n = encode_stations(&one, &mut buf).unwrap();
    assert_eq!(decode_stations(&buf[..n]), Ok(one));
    // Damage is an error, not a network.
    assert_eq!(decode_stations(&[]), Err(StoreError::Damaged));
    assert_eq!(decode_stations(&buf[..n - 1]), Err(StoreError::Damaged));
    // A latitude of 95° written into the record (its first f64, after the tag, version,
    // count and the identifier's length and bytes) is refused as typed data would be.
    let mut bad = buf;
    let at = 2 + 1 + 1 + "X_1".len();
    bad[at..at + 8].copy_from_slice(&95.0f64.to_le_bytes());
    assert_eq!(decode_stations(&bad[..n]), Err(StoreError::Damaged));
    // The largest set (32 stations, 8-character names, every height error given) fits
    // its buffer exactly.
    let mut full = Network::new();
    for i in 0..MAX_STATIONS {
        full.push(Station::new(&format!("STN{i:05}"), 40.0, i as f64, 5000.0, Some(8.0)).unwrap())
            .unwrap();
    }
    assert_eq!(encode_stations(&full, &mut buf), Ok(MAX_STATION_SET_BYTES));
    assert_eq!(decode_stations(&buf), Ok(full));
}

type Flash = leeward_firmware::flash::sim::SimFlash<Vec<u8>, 4, { 16 * 1024 }>;

/// A flash store of four 16 KiB pages (the board's map page), three for the map.
fn flash_store() -> leeward_firmware::flash::FlashStore<Flash> {
    const PAGE: u32 = 16 * 1024;
    let flash = Flash::new(vec![0xFF; 4 * PAGE as usize], 7);
    leeward_firmware::flash::FlashStore::open(flash, 0..3 * PAGE, 3 * PAGE..4 * PAGE).unwrap()
}

fn bytes(len: usize, seed: u8) -> Vec<u8> {
    (0..len)
        .map(|i| (i as u8).wrapping_mul(31).wrapping_add(seed))
        .collect()
}

#[test]
fn a_streamed_dataset_is_seen_only_once_ended_and_reads_back_in_pieces() {
    streamed_and_read_back(&mut MemStorage::new());
    streamed_and_read_back(&mut flash_store());
}

fn streamed_and_read_back<S: Storage>(st: &mut S) {
    {
        let data = bytes(3000, 5);
        let part = st.part_bytes();
        st.put_begin(DataKind::Sounding, "LONG", data.len())
            .unwrap();
        let whole = data.len() / part * part;
        let (head, tail) = data.split_at(whole.min(part));
        st.put_part(head).unwrap();
        // Not listed, not readable, until the end.
        assert!(st.list().is_empty());
        assert_eq!(
            st.read_at("LONG", 0, &mut [0; 8]),
            Err(StoreError::NotFound)
        );
        st.put_part(tail).unwrap();
        assert!(st.list().is_empty());
        st.put_end(leeward_firmware::flash::crc32(&data)).unwrap();
        assert_eq!(st.list().len(), 1);
        // Read back in odd pieces, across chunk boundaries.
        let mut back = Vec::new();
        let mut piece = [0u8; 333];
        loop {
            let (h, n) = st.read_at("LONG", back.len(), &mut piece).unwrap();
            assert_eq!(h.len, data.len());
            assert_eq!(h.crc, leeward_firmware::flash::crc32(&data));
            assert_eq!(h.kind, DataKind::Sounding);
            back.extend_from_slice(&piece[..n]);
            if n == 0 {
                break;
            }
        }
        assert_eq!(back, data);
        // Past the end: nothing, no error.
        assert_eq!(st.read_at("LONG", 5000, &mut piece).map(|(_, n)| n), Ok(0));
    }
}

#[test]
fn a_streamed_write_with_the_wrong_crc_or_interrupted_stores_nothing() {
    refused_streams(&mut MemStorage::new());
    refused_streams(&mut flash_store());
}

fn refused_streams<S: Storage>(st: &mut S) {
    {
        let data = bytes(1500, 9);
        // The announced CRC is not the bytes': refused, nothing kept, the room back.
        st.put_begin(DataKind::Ridge, "R", data.len()).unwrap();
        st.put_part(&data).unwrap();
        assert_eq!(st.put_end(0xDEAD_BEEF), Err(StoreError::Damaged));
        assert!(st.list().is_empty());
        assert_eq!(st.put_part(&data), Err(StoreError::Interrupted));
        // Another change to the store ends an open write.
        st.put(DataKind::Site, "SITE", &[1, 2, 3]).unwrap();
        st.put_begin(DataKind::Ridge, "R", data.len()).unwrap();
        st.delete("SITE").unwrap();
        assert_eq!(st.put_part(&data), Err(StoreError::Interrupted));
        assert_eq!(st.put_end(0), Err(StoreError::Interrupted));
        // Ended short: nothing kept.
        st.put_begin(DataKind::Ridge, "R", data.len()).unwrap();
        assert_eq!(
            st.put_end(leeward_firmware::flash::crc32(&data)),
            Err(StoreError::Interrupted)
        );
        // More than announced.
        st.put_begin(DataKind::Ridge, "R", 10).unwrap();
        assert!(matches!(st.put_part(&data), Err(StoreError::TooBig { .. })));
        // Cancelled half way: the room comes back.
        let free = st.free_bytes();
        st.put_begin(DataKind::Ridge, "R", data.len()).unwrap();
        st.put_part(&data[..st.part_bytes().min(data.len())])
            .unwrap();
        st.put_cancel();
        assert!(st.list().is_empty());
        assert_eq!(st.free_bytes(), free);
        // And the store still takes the dataset whole.
        st.put(DataKind::Ridge, "R", &data).unwrap();
        let mut back = vec![0u8; data.len()];
        assert_eq!(st.get("R", &mut back), Ok((DataKind::Ridge, data.len())));
        assert_eq!(back, data);
    }
}

#[test]
fn the_flash_store_takes_whole_chunks_but_the_last() {
    let mut st = flash_store();
    let part = st.part_bytes();
    assert_eq!(part, leeward_firmware::flash::CHUNK_BYTES);
    let data = bytes(3 * part + 10, 1);
    st.put_begin(DataKind::Sounding, "S", data.len()).unwrap();
    assert_eq!(
        st.put_part(&data[..part - 1]),
        Err(StoreError::PartSize {
            bytes: part - 1,
            part
        })
    );
    // The write is over after a refused part.
    assert_eq!(st.put_part(&data[..part]), Err(StoreError::Interrupted));
    st.put_begin(DataKind::Sounding, "S", data.len()).unwrap();
    st.put_part(&data[..2 * part]).unwrap();
    st.put_part(&data[2 * part..]).unwrap();
    st.put_end(leeward_firmware::flash::crc32(&data)).unwrap();
    let mut back = vec![0u8; data.len()];
    assert_eq!(st.get("S", &mut back), Ok((DataKind::Sounding, data.len())));
    assert_eq!(back, data);
    // The dataset survives a reboot: it was committed like any other.
    let flash = st.into_flash();
    let mut again =
        leeward_firmware::flash::FlashStore::open(flash, 0..3 * 16384, 3 * 16384..4 * 16384)
            .unwrap();
    let mut back2 = vec![0u8; data.len()];
    assert_eq!(
        again.get("S", &mut back2),
        Ok((DataKind::Sounding, data.len()))
    );
    assert_eq!(back2, data);
}

/// A store that reports a CRC its bytes do not have: the reader must notice.
struct WrongCrc(MemStorage);

impl Storage for WrongCrc {
    type Error = core::convert::Infallible;
    fn load_settings(&mut self) -> Option<leeward_firmware::settings::Settings> {
        None
    }
    fn save_settings(
        &mut self,
        _: &leeward_firmware::settings::Settings,
    ) -> Result<(), Self::Error> {
        Ok(())
    }
    fn list(&mut self) -> Catalog {
        self.0.list()
    }
    fn read_at(
        &mut self,
        name: &str,
        at: usize,
        buf: &mut [u8],
    ) -> Result<(DataHead, usize), StoreError> {
        self.0.read_at(name, at, buf).map(|(h, n)| {
            (
                DataHead {
                    crc: h.crc ^ 1,
                    ..h
                },
                n,
            )
        })
    }
    fn max_dataset_bytes(&self) -> usize {
        self.0.max_dataset_bytes()
    }
    fn part_bytes(&self) -> usize {
        self.0.part_bytes()
    }
    fn put_begin(&mut self, kind: DataKind, name: &str, len: usize) -> Result<(), StoreError> {
        self.0.put_begin(kind, name, len)
    }
    fn put_part(&mut self, bytes: &[u8]) -> Result<(), StoreError> {
        self.0.put_part(bytes)
    }
    fn put_end(&mut self, crc: u32) -> Result<(), StoreError> {
        self.0.put_end(crc)
    }
    fn put_cancel(&mut self) {
        self.0.put_cancel()
    }
    fn rename(&mut self, from: &str, to: &str) -> Result<(), StoreError> {
        self.0.rename(from, to)
    }
    fn delete(&mut self, name: &str) -> Result<(), StoreError> {
        self.0.delete(name)
    }
    fn free_bytes(&mut self) -> usize {
        self.0.free_bytes()
    }
}

#[test]
fn a_reader_checks_the_crc_of_the_whole_dataset() {
    let data = bytes(2000, 3);
    let mut good = MemStorage::new();
    good.put(DataKind::Sounding, "D", &data).unwrap();
    let mut window = [0u8; 64];
    let mut r = DataReader::open(&mut good, "D", &mut window).unwrap();
    let mut seen = Vec::new();
    loop {
        let got = r.peek(&mut good, "D", 64).unwrap().to_vec();
        if got.is_empty() {
            break;
        }
        seen.extend_from_slice(&got);
        r.consume(got.len());
    }
    assert_eq!(seen, data);
    assert_eq!(r.finish(&mut good, "D"), Ok(()));
    // Read part way, then finished: the rest is read and checked too.
    let mut r = DataReader::open(&mut good, "D", &mut window).unwrap();
    r.consume(10);
    assert_eq!(r.finish(&mut good, "D"), Ok(()));
    let mut bad = WrongCrc(good);
    let r = DataReader::open(&mut bad, "D", &mut window).unwrap();
    assert_eq!(r.finish(&mut bad, "D"), Err(StoreError::Damaged));
    // A whole get checks it too.
    let mut buf = vec![0u8; 2000];
    assert_eq!(bad.get("D", &mut buf), Err(StoreError::Damaged));
}
