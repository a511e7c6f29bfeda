//! Golden bytes of every stored record type, in the manner of postcard's loopback table:
//! value, expected bytes, round trip. The expected bytes are written out from postcard's
//! wire format specification (postcard 1.x: unsigned integers as LEB128-style varints,
//! `f64` as 8 little-endian IEEE 754 bytes, `Option` as a 0/1 byte then the value,
//! strings and sequences as a varint length then the items, enum variants as a varint
//! index), after our 2-byte prefix (record tag, schema version 1). A firmware that
//! changes any of these bytes can no longer read what the older one wrote: bump the
//! schema version and keep the old decoder instead.
use leeward_core::crossing::{Profile as RidgeProfile, Ridge};
use leeward_core::geo::LatLon;
use leeward_core::network::{Network, Station};
use leeward_core::sounding::{Level, LevelKind, ObsTime, Profile, StationInfo, Wind};
use leeward_firmware::records::*;
use leeward_firmware::settings::{HeightUnit, LatEntry, PressureUnit, Settings, WindUnit};

fn f(x: f64) -> Vec<u8> {
    x.to_le_bytes().to_vec()
}
fn s(t: &str) -> Vec<u8> {
    let mut v = vec![t.len() as u8];
    v.extend_from_slice(t.as_bytes());
    v
}
fn cat(parts: &[&[u8]]) -> Vec<u8> {
    parts.concat()
}

/// Encode, compare with the expected bytes, decode, compare with the value.
fn loopback<R: Record + PartialEq + std::fmt::Debug>(value: &R, expected: &[u8]) {
    let mut buf = [0u8; 20_000];
    let n = value.encode(&mut buf).unwrap();
    assert_eq!(&buf[..n], expected, "bytes of {value:?}");
    assert_eq!(&R::decode(expected).unwrap(), value);
    assert_eq!(check_any(expected), Ok(R::TAG));
    // Cut short anywhere: an error, never a panic or a value.
    for k in 0..expected.len() {
        assert!(R::decode(&expected[..k]).is_err(), "decoded from {k} bytes");
    }
}

#[test]
fn settings_bytes() {
    let v = Settings {
        height: HeightUnit::Foot,
        wind: WindUnit::KmPerHour,
        pressure: PressureUnit::Hectopascal,
        lat_entry: LatEntry::DegMin,
    };
    // tag 5, version 1, then the variant indexes 1, 2, 0, 1.
    loopback(&v, &[5, 1, 1, 2, 0, 1]);
    loopback(&Settings::default(), &[5, 1, 0, 0, 0, 0]);
}

#[test]
fn site_bytes() {
    let v = SiteRecord {
        name: "TESSEL".try_into().unwrap(),
        pos: LatLon::new(45.5, -140.0).unwrap(),
        elevation_m: 1850.0,
    };
    let want = cat(&[&[1, 1], &s("TESSEL"), &f(45.5), &f(-140.0), &f(1850.0)]);
    loopback(&v, &want);
}

#[test]
fn station_set_bytes() {
    let mut v = Network::new();
    v.push(Station::new("TS01", 47.0, -142.5, 5640.0, Some(12.0)).unwrap())
        .unwrap();
    v.push(Station::new("TS02", 44.0, -137.5, 5702.0, None).unwrap())
        .unwrap();
    let want = cat(&[
        &[2, 1, 2], // tag, version, 2 stations
        &s("TS01"),
        &f(47.0),
        &f(-142.5),
        &f(5640.0),
        &[1],
        &f(12.0),
        &s("TS02"),
        &f(44.0),
        &f(-137.5),
        &f(5702.0),
        &[0],
    ]);
    loopback(&v, &want);
}

/// A two-level sounding and its bytes as every firmware so far writes them.
fn small_sounding() -> (Profile, Vec<u8>) {
    let info = StationInfo {
        id: "TSL".try_into().unwrap(),
        lat_deg: Some(45.5),
        lon_deg: None,
        elevation_m: Some(1850.0),
        time: Some(ObsTime {
            day: 2,
            hour: 12,
            minute: 0,
        }),
    };
    let mut v = Profile::new(info);
    v.push(Level {
        pressure_pa: 81_000.0,
        height_m: Some(1850.0),
        temperature_k: Some(280.15),
        dewpoint_k: Some(275.0),
        wind: Some(Wind {
            dir_from_deg: 270.0,
            speed_ms: 12.5,
        }),
        kind: LevelKind::SURFACE,
    })
    .unwrap();
    v.push(Level::at_pressure(50_000.0)).unwrap();
    let want = cat(&[
        &[3, 1],
        &s("TSL"),
        &[1],
        &f(45.5),
        &[0],
        &[1],
        &f(1850.0),
        &[1, 2, 12, 0],
        &[2], // two levels
        &f(81_000.0),
        &[1],
        &f(1850.0),
        &[1],
        &f(280.15),
        &[1],
        &f(275.0),
        &[1],
        &f(270.0),
        &f(12.5),
        &[1],
        &f(50_000.0),
        &[0, 0, 0, 0, 0],
    ]);
    (v, want)
}

#[test]
fn sounding_bytes() {
    let (v, want) = small_sounding();
    loopback(&v, &want);
    // A damaged level (pressure rising upward) is refused on reading.
    let mut bad = want.clone();
    let at = bad.len() - 5 - 8;
    bad[at..at + 8].copy_from_slice(&90_000.0f64.to_le_bytes());
    assert_eq!(Profile::decode(&bad), Err(RecordError::Invalid));
}

/// Encode, compare with the expected bytes, decode, compare; cut short: an error.
fn source_loopback(value: &SourceText<'_>, expected: &[u8]) {
    let mut buf = [0u8; 20_000];
    let n = value.encode(&mut buf).unwrap();
    assert_eq!(&buf[..n], expected, "bytes of {value:?}");
    assert_eq!(&SourceText::decode(expected).unwrap(), value);
    assert_eq!(check_any(expected), Ok(SourceText::TAG));
    for k in 0..expected.len() {
        assert!(
            SourceText::decode(&expected[..k]).is_err(),
            "decoded from {k} bytes"
        );
    }
}

#[test]
fn source_text_bytes() {
    // tag 7, version 1, SourceFormat::Temp (variant 0), the text as a varint length
    // then its UTF-8 bytes.
    let v = SourceText {
        format: SourceFormat::Temp,
        text: "TTAA 64121 08888=\n",
    };
    let want = cat(&[&[7, 1, 0], &s("TTAA 64121 08888=\n")]);
    source_loopback(&v, &want);
    // 200 bytes of text: the length 200 is the varint 0xC8 0x01.
    let long = "TTBB 6412/ 08888 00799 09030 ".repeat(7)[..200].to_string();
    let v = SourceText {
        format: SourceFormat::Temp,
        text: &long,
    };
    let want = cat(&[&[7, 1, 0, 0xC8, 0x01], long.as_bytes()]);
    source_loopback(&v, &want);
    // Not UTF-8, an unknown format, a newer version: errors.
    assert_eq!(
        SourceText::decode(&[7, 1, 0, 1, 0xFF]),
        Err(RecordError::Malformed)
    );
    assert_eq!(
        SourceText::decode(&[7, 1, 9, 1, b'T']),
        Err(RecordError::Malformed)
    );
    assert_eq!(
        SourceText::decode(&[7, 2, 0, 1, b'T']),
        Err(RecordError::NewerVersion { found: 2, known: 1 })
    );
}

#[test]
fn sounding_with_its_source_text() {
    let (p, profile_bytes) = small_sounding();
    let src = SourceText {
        format: SourceFormat::Temp,
        text: "TTAA 02121 08888 99810=",
    };
    // The sounding record unchanged, then the source-text record.
    let want = cat(&[&profile_bytes, &[7, 1, 0], &s("TTAA 02121 08888 99810=")]);
    let mut buf = [0u8; 1024];
    let n = encode_sounding(&p, Some(&src), &mut buf).unwrap();
    assert_eq!(&buf[..n], &want[..]);
    assert_eq!(decode_sounding(&want).unwrap(), (p.clone(), Some(src)));
    assert_eq!(check_any(&want), Ok(Profile::TAG));
    // The device reads only the leading sounding record and ignores the trailer.
    assert_eq!(Profile::decode(&want).unwrap(), p);
    // Cut short anywhere: an error, except just after the sounding record, where what
    // is left is a whole sounding without a trailer.
    for k in 0..want.len() {
        let r = decode_sounding(&want[..k]);
        if k == profile_bytes.len() {
            assert_eq!(r.unwrap(), (p.clone(), None));
        } else {
            assert!(r.is_err(), "decoded from {k} bytes");
        }
    }
    // A buffer too small for the trailer is refused, not cut.
    assert_eq!(
        encode_sounding(&p, Some(&src), &mut buf[..profile_bytes.len() + 3]),
        Err(RecordError::BufferTooSmall)
    );
    // Without a source, the dataset is the sounding record alone.
    let n = encode_sounding(&p, None, &mut buf).unwrap();
    assert_eq!(&buf[..n], &profile_bytes[..]);
}

#[test]
fn an_old_sounding_dataset_still_decodes() {
    // The bytes today's and every earlier firmware store for a sounding: the sounding
    // record alone. They read as the sounding with no source text (so the laptop writes
    // it back as CSV), by the whole-dataset reader and by the device's.
    let (p, old) = small_sounding();
    assert_eq!(decode_sounding(&old).unwrap(), (p.clone(), None));
    assert_eq!(Profile::decode(&old).unwrap(), p);
    assert_eq!(check_any(&old), Ok(Profile::TAG));
}

#[test]
fn bytes_after_a_sounding_that_are_no_source_text() {
    let (p, old) = small_sounding();
    // A settings record or stray bytes after it: damage to the whole-dataset reader...
    for tail in [
        &[5u8, 1, 0, 0, 0, 0][..],
        &[0xFF][..],
        &[7, 1, 0, 5, b'T'][..],
    ] {
        let bad = cat(&[&old, tail]);
        assert!(decode_sounding(&bad).is_err(), "{tail:?}");
        assert!(check_any(&bad).is_err(), "{tail:?}");
        // ...while the device's reader of the leading record still has its sounding.
        assert_eq!(Profile::decode(&bad).unwrap(), p);
    }
}

#[test]
fn largest_sounding_fits_its_bound() {
    let mut v = Profile::new(StationInfo {
        id: "ABCDEFGH".try_into().unwrap(),
        lat_deg: Some(45.5),
        lon_deg: Some(-140.0),
        elevation_m: Some(1850.0),
        time: Some(ObsTime {
            day: 31,
            hour: 23,
            minute: 59,
        }),
    });
    for i in 0..leeward_core::sounding::MAX_LEVELS {
        v.push(Level {
            pressure_pa: 100_000.0 - i as f64 * 300.0,
            height_m: Some(100.0 + i as f64 * 100.0),
            temperature_k: Some(250.0),
            dewpoint_k: Some(240.0),
            wind: Some(Wind {
                dir_from_deg: 359.0,
                speed_ms: 149.0,
            }),
            kind: LevelKind(0xFF),
        })
        .unwrap();
    }
    let mut buf = vec![0u8; MAX_SOUNDING_BYTES];
    let n = v.encode(&mut buf).unwrap();
    assert!(n <= MAX_SOUNDING_BYTES);
    const { assert!(MAX_SOUNDING_BYTES <= leeward_firmware::flash::MAX_DATASET_BYTES) };
    assert_eq!(Profile::decode(&buf[..n]).unwrap(), v);
}

#[test]
fn ridge_bytes() {
    let v = Ridge {
        profile: RidgeProfile::Bell {
            base_m: 300.0,
            crest_m: 2600.0,
            half_width_m: 60_000.0,
        },
        axis_deg: 0.0,
        anchor: LatLon::new(45.5, -140.0).unwrap(),
    };
    let want = cat(&[
        &[4, 1, 0],
        &f(300.0),
        &f(2600.0),
        &f(60_000.0),
        &f(0.0),
        &f(45.5),
        &f(-140.0),
    ]);
    loopback(&v, &want);
    let v = Ridge {
        profile: RidgeProfile::Flat { height_m: 500.0 },
        axis_deg: 10.0,
        anchor: LatLon::new(45.5, -140.0).unwrap(),
    };
    let want = cat(&[&[4, 1, 2], &f(500.0), &f(10.0), &f(45.5), &f(-140.0)]);
    loopback(&v, &want);
}

#[test]
fn log_entry_bytes() {
    let v = LogEntry {
        seq: 300,
        utc_s: Some(1),
        uptime_s: 127,
        task: LogTask::Crossing,
        inputs: heapless::Vec::from_slice(&["TESSEL".try_into().unwrap()]).unwrap(),
        values: heapless::Vec::from_slice(&[1.0e-4]).unwrap(),
    };
    // 300 as a varint is 0xAC 0x02; Crossing is variant 3.
    let want = cat(&[
        &[6, 1, 0xAC, 0x02, 1, 1, 127, 3, 1],
        &s("TESSEL"),
        &[1],
        &f(1.0e-4),
    ]);
    loopback(&v, &want);
}

#[test]
fn log_entry_with_a_value_not_a_number_is_refused() {
    // Found by the records fuzz target: a log entry holding NaN decoded as a result.
    let bad = cat(&[&[6, 1, 2, 0, 1, 0, 0], &[1], &f(f64::NAN)]);
    assert_eq!(LogEntry::decode(&bad), Err(RecordError::Invalid));
}

#[test]
fn newer_and_foreign_records_are_errors() {
    assert_eq!(
        Settings::decode(&[5, 2, 0, 0, 0, 0]),
        Err(RecordError::NewerVersion { found: 2, known: 1 })
    );
    assert_eq!(
        Settings::decode(&[6, 1, 0, 0, 0, 0]),
        Err(RecordError::WrongType {
            expected: 5,
            found: 6
        })
    );
    assert_eq!(
        Settings::decode(&[5, 1, 0, 0, 0, 9]),
        Err(RecordError::Malformed)
    );
    assert_eq!(
        Settings::decode(&[5, 1, 0, 0, 0, 0, 0]),
        Err(RecordError::Malformed)
    );
    assert_eq!(
        check_any(&[8, 1]),
        Err(RecordError::WrongType {
            expected: 0,
            found: 8
        })
    );
    assert_eq!(check_any(&[]), Err(RecordError::Truncated));
}

#[test]
fn crc32_check_value() {
    // The CRC-32 (ISO-HDLC) check value of "123456789" is 0xCBF43926 (the catalogue of
    // parametrised CRC algorithms, Greg Cook; common practice).
    assert_eq!(leeward_firmware::flash::crc32(b"123456789"), 0xCBF4_3926);
}
