//! Any bytes given to the stored-record decoder give a record or an error, never a panic
//! or a hang; a record that decodes writes back to bytes that decode and write back to
//! the same bytes.
#![no_main]

use leeward_core::crossing::Ridge;
use leeward_core::network::Network;
use leeward_core::sounding::Profile;
use leeward_firmware::records::{
    check_any, decode_sounding, encode_sounding, LogEntry, Record, SiteRecord, SourceText,
};
use leeward_firmware::settings::Settings;
use libfuzzer_sys::fuzz_target;

// Compared as bytes: a float field may hold a value that is not equal to itself.
fn again<R: Record>(data: &[u8]) {
    if let Ok(v) = R::decode(data) {
        let (mut a, mut b) = (vec![0u8; 32 * 1024], vec![0u8; 32 * 1024]);
        let n = v.encode(&mut a).expect("a decoded record encodes");
        let w = R::decode(&a[..n]).expect("and decodes again");
        let m = w.encode(&mut b).expect("and encodes again");
        assert_eq!(&a[..n], &b[..m]);
    }
}

/// A sounding dataset (its record and any source text) writes back the same way.
fn sounding_again(data: &[u8]) {
    if let Ok((p, src)) = decode_sounding(data) {
        let (mut a, mut b) = (vec![0u8; 32 * 1024], vec![0u8; 32 * 1024]);
        let n = encode_sounding(&p, src.as_ref(), &mut a).expect("a decoded dataset encodes");
        let (q, t) = decode_sounding(&a[..n]).expect("and decodes again");
        let m = encode_sounding(&q, t.as_ref(), &mut b).expect("and encodes again");
        assert_eq!(&a[..n], &b[..m]);
    }
    if let Ok(s) = SourceText::decode(data) {
        let mut a = vec![0u8; 32 * 1024];
        let n = s.encode(&mut a).expect("a decoded source text encodes");
        let t = SourceText::decode(&a[..n]).expect("and decodes again");
        assert_eq!(s, t);
    }
}

fuzz_target!(|data: &[u8]| {
    let _ = check_any(data);
    again::<SiteRecord>(data);
    again::<Network>(data);
    again::<Profile>(data);
    again::<Ridge>(data);
    again::<Settings>(data);
    again::<LogEntry>(data);
    sounding_again(data);
});
