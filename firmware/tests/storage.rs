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
