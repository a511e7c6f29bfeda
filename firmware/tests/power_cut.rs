//! The flash store under power cuts: tests (1) to (5) of docs/reliability.md.
//!
//! The flash model (firmware/src/flash/sim.rs) follows the NOR flash rules stated in the
//! embedded-storage `NorFlash` documentation; the fault model (a cut at any byte of any
//! write or erase, torn words, weak bits) is common practice for NOR parts. After every
//! cut the store is rebuilt from the flash bytes alone.
mod harness;

use harness::*;
use leeward_firmware::flash::sim::Cut;
use leeward_firmware::storage::{DataKind, Storage};

/// Test (1) in small, for every `cargo test`: 100 operations, every cut point.
#[test]
fn cut_at_every_point_short() {
    let s = every_cut_point::<4, 1024>(0x5107, 100, MAX_LEN);
    assert!(s.points > 100, "{s:?}");
}

#[test]
fn smoke_put_get_reboot() {
    let mut st = boot(erased::<4, 1024>(1));
    let data: Vec<u8> = (0..2000).map(|i| i as u8).collect();
    st.put(DataKind::Sounding, "T_0600", &data).unwrap();
    st.put(DataKind::Stations, "ALPS", &[1, 2, 3]).unwrap();
    st.log_push(&log_entry(7)).unwrap();
    let mut st = boot(st.into_flash());
    let m = read_back(&mut st).unwrap();
    assert_eq!(m.datasets["T_0600"].1, data);
    assert_eq!(m.datasets["ALPS"].1, vec![1, 2, 3]);
    assert_eq!(m.log, vec![7]);
    let _ = Cut { op: 0, byte: 0 };
}

/// Largest dataset in the workloads on 1 KiB pages: three chunks and a bit.
const MAX_LEN: usize = 1500;

/// Test (1) on one geometry: a seeded workload of `ops` operations; before each, a cut
/// at every write and erase call it makes in turn (at a random byte of that call), a
/// reboot from the bytes, and the check. The number of cut points tried.
fn every_cut_point<const W: usize, const P: usize>(seed: u64, ops: usize, max_len: usize) -> Stats {
    let mut r = Rng(seed);
    let mut image = erased::<W, P>(seed);
    let mut model = Model::default();
    let mut mark = 0;
    let mut points = 0u64;
    let mut acked = 0;
    let mut refused = std::collections::BTreeMap::new();
    for i in 0..ops {
        let op = random_op(&mut r, &model, max_len, &mut mark);
        let n = count_ops(&image, &model, &op);
        for p in 0..n {
            let cut = Cut {
                op: p,
                byte: r.below(4096) as u32,
            };
            if let Err(e) = cut_and_check(&image, &model, &op, cut, false) {
                panic!("seed {seed}, op {i}, cut {cut:?}: {e}");
            }
            points += 1;
        }
        // Then the operation runs uncut and the workload goes on.
        let mut st = boot(image);
        match apply(&mut st, &mut model, &op) {
            Ok(()) => acked += 1,
            Err(e) => {
                *refused
                    .entry(
                        format!("{e:?}")
                            .split([' ', '{'])
                            .next()
                            .unwrap_or("")
                            .to_string(),
                    )
                    .or_insert(0) += 1
            }
        }
        image = st.into_flash();
        assert_eq!(image.violations(), 0);
    }
    Stats {
        points,
        acked,
        refused,
        erases: image.erases(),
    }
}

/// What a workload did.
#[derive(Debug)]
struct Stats {
    /// Cut points tried.
    points: u64,
    /// Operations acknowledged (the rest were refused: full, name taken, not found).
    acked: u32,
    /// Refusals by error.
    refused: std::collections::BTreeMap<String, u32>,
    /// Page erases in the uncut run (the store cycled through its pages).
    erases: u32,
}

#[test]
#[ignore = "heavy: run in release by .ci/run (see DEVELOPERS.md)"]
fn t1_cut_at_every_write_and_erase_point() {
    let s = every_cut_point::<4, 1024>(0x1EE1, 1000, MAX_LEN);
    eprintln!("test 1 (4-byte words, 1 KiB pages): 1000 operations, {s:?}");
    assert!(s.points > 1000 && s.acked > 500 && s.erases > 20, "{s:?}");
    // Refusals are the expected ones only, never a flash or corruption error.
    assert!(
        s.refused
            .keys()
            .all(|k| ["Full", "LogFull", "NameTaken", "NotFound"].contains(&k.as_str())),
        "{s:?}"
    );
}

/// `n`, or the count in `LEEWARD_TRIALS` (to explore more, or less while debugging).
fn trials(n: u64) -> u64 {
    std::env::var("LEEWARD_TRIALS")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(n)
}

/// Test (2) on one geometry: `trials` random torn writes (a random write or erase call
/// of a random operation, a random byte, torn bits; with `weak_bits`, weak bits in one
/// trial of two)
/// along a seeded workload. The trials run and the acknowledged records lost, with the
/// first few losses described.
fn torn_trials<const W: usize, const P: usize>(
    seed: u64,
    trials: u64,
    weak_bits: bool,
) -> (u64, u64, Vec<String>) {
    let mut r = Rng(seed);
    let mut image = erased::<W, P>(seed);
    let mut model = Model::default();
    let mut mark = 0;
    let (mut done, mut lost) = (0u64, 0u64);
    let mut found = Vec::new();
    while done < trials {
        let op = random_op(&mut r, &model, MAX_LEN, &mut mark);
        let n = count_ops(&image, &model, &op);
        for _ in 0..n.min(8) {
            if done >= trials {
                break;
            }
            let cut = Cut {
                op: r.below(n as u64) as u32,
                byte: r.below(4096) as u32,
            };
            let weak = weak_bits && r.below(2) == 0;
            done += 1;
            if let Err(e) = cut_and_check(&image, &model, &op, cut, weak) {
                lost += 1;
                let mut d = format!("trial {done}, {cut:?} of {n} calls, weak bits {weak}: {e}");
                d.truncate(400);
                found.push(d);
            }
        }
        let mut st = boot(image);
        let _ = apply(&mut st, &mut model, &op);
        image = st.into_flash();
        // Start again from erased flash now and then so that early states recur.
        if r.below(400) == 0 {
            image = erased::<W, P>(r.next());
            model = Model::default();
        }
    }
    (done, lost, found)
}

#[test]
#[ignore = "heavy: run in release by .ci/run (see DEVELOPERS.md)"]
fn t2_100000_torn_writes_lose_nothing_acknowledged() {
    let (done, lost, found) = torn_trials::<4, 1024>(0x7042, trials(100_000), false);
    eprintln!("test 2 (4-byte words, 1 KiB pages): {done} trials, {lost} with a loss");
    assert!(done >= trials(100_000));
    assert_eq!(lost, 0, "{:#?}", &found[..found.len().min(3)]);
}

/// The canary: the same trials at a write size of 1 byte, where sequential-storage 8.0.2
/// is known to lose acknowledged items (its open issue; the store refuses such flash).
/// Run with `--ignored` to see the harness catch it; docs/reliability.md has the result.
#[test]
#[ignore = "canary: shows the harness catches sequential-storage's loss on 1-byte words"]
fn canary_one_byte_words_lose_items() {
    let (done, lost, found) = torn_trials::<1, 1024>(0x7042, 100_000, false);
    eprintln!("canary (1-byte words, 1 KiB pages): {done} trials, {lost} with a loss");
    for f in found.iter().take(3) {
        eprintln!("{f}");
    }
    assert!(lost > 0, "the harness saw no loss on 1-byte words");
}

/// Weak bits (torn bits that read differently on each read): sequential-storage trusts
/// what it reads of page markers and item headers, so a weak bit can make a dataset read
/// as damaged; the chunk generations and the CRC-32 over the dataset catch wrong
/// contents. What it does not catch: a commit record that vanishes (sequential-storage
/// then finds no item for the key), which we measured in about 1 trial in 1,500.
#[test]
#[ignore = "open finding: under weak bits a dataset can vanish silently (docs/reliability.md)"]
fn weak_bits_are_caught_never_returned_as_data() {
    let (done, bad, found) = torn_trials::<4, 1024>(0x3EAC, trials(20_000), true);
    let silent: Vec<&String> = found.iter().filter(|f| !f.contains("DETECTED")).collect();
    eprintln!("weak bits (4-byte words, 1 KiB pages): {done} trials, {bad} with a dataset reported damaged or lost");
    assert!(
        silent.is_empty(),
        "{} silent, e.g. {:#?}",
        silent.len(),
        &silent[..silent.len().min(3)]
    );
}

/// Test (3): two or three cuts in a row (during the operation, then during the reboot
/// and the user's retry), then a clean reboot: the interrupted operation is done or not,
/// everything acknowledged before it is intact.
#[test]
#[ignore = "heavy: run in release by .ci/run (see DEVELOPERS.md)"]
fn t3_two_or_three_cuts_in_a_row() {
    let mut r = Rng(0x3C07);
    let mut image = erased::<4, 1024>(3);
    let mut model = Model::default();
    let mut mark = 0;
    let mut sequences = 0;
    for i in 0..1500 {
        let op = random_op(&mut r, &model, MAX_LEN, &mut mark);
        let n = count_ops(&image, &model, &op);
        if n > 0 {
            let mut flash = image.clone();
            let mut st = boot(flash);
            st._flash_mut().set_cut(Some(Cut {
                op: r.below(n as u64) as u32,
                byte: r.below(4096) as u32,
            }));
            let _ = apply(&mut st, &mut model.clone(), &op);
            flash = st.into_flash();
            for _ in 0..1 + r.below(2) {
                // Power back; it fails again during the boot or the retry.
                flash.power_on();
                flash.set_cut(Some(Cut {
                    op: r.below(12) as u32,
                    byte: r.below(4096) as u32,
                }));
                let mut st = boot(flash);
                if !matches!(op, Op::Log(_) | Op::LogDrop(_)) && !st.flash().is_off() {
                    let _ = apply(&mut st, &mut model.clone(), &op);
                }
                flash = st.into_flash();
            }
            flash.power_on();
            let mut st = boot(flash);
            let got = read_back(&mut st).unwrap_or_else(|e| panic!("op {i}: {e}"));
            if let Err(e) = check_after_cut(&got, &model, &op) {
                panic!("op {i}: {e}");
            }
            sequences += 1;
            // A clean operation afterwards works.
            let probe = Op::Settings(leeward_firmware::settings::Settings::default());
            let mut m = got.clone();
            apply(&mut st, &mut m, &probe)
                .unwrap_or_else(|e| panic!("op {i}: store unusable after cuts: {e}"));
            assert_eq!(read_back(&mut boot(st.into_flash())).unwrap(), m);
        }
        let mut st = boot(image);
        let _ = apply(&mut st, &mut model, &op);
        image = st.into_flash();
    }
    eprintln!("test 3: {sequences} sequences of two or three cuts, all checked");
    assert!(sequences > 1000);
}

/// Test (4): test (1) on other geometries: 8-byte words, and the board's 16 KiB pages
/// (STM32F411 sectors 1 to 3, RM0383 table 5) with 4- and 8-byte words and datasets up
/// to the largest sounding.
#[test]
#[ignore = "heavy: run in release by .ci/run (see DEVELOPERS.md)"]
fn t4_word_sizes_and_the_real_page_size() {
    let s = every_cut_point::<8, 1024>(0x48, 1000, MAX_LEN);
    eprintln!("test 4 (8-byte words, 1 KiB pages): {s:?}");
    assert!(s.points > 1000 && s.erases > 10, "{s:?}");
    let s = every_cut_point::<4, 16384>(0x416, 150, 14_000);
    eprintln!("test 4 (4-byte words, 16 KiB pages): {s:?}");
    assert!(s.points > 1000 && s.erases > 2, "{s:?}");
    let s = every_cut_point::<8, 16384>(0x816, 100, 14_000);
    eprintln!("test 4 (8-byte words, 16 KiB pages): {s:?}");
    assert!(s.points > 500 && s.erases > 0, "{s:?}");
}

/// Test (5): random flash images, and valid images with bytes changed: booting and
/// every operation return (no panic, no hang), damage is an error value, nothing is
/// erased unless asked, and the recovery path (erase the area on request) gives a
/// working store.
#[test]
#[ignore = "heavy: run in release by .ci/run (see DEVELOPERS.md)"]
fn t5_random_and_mutated_images() {
    let mut r = Rng(0x5A5A);
    // A valid image to mutate.
    let mut st = boot(erased::<4, 1024>(5));
    let mut model = Model::default();
    let mut mark = 0;
    for _ in 0..60 {
        let op = random_op(&mut r, &model, MAX_LEN, &mut mark);
        let _ = apply(&mut st, &mut model, &op);
    }
    let valid = st.into_flash();
    let (mut unreadable, mut damaged, mut intact, mut boot_erased) = (0, 0, 0, 0);
    for trial in 0..3000 {
        let mut flash = valid.clone();
        let bytes = flash.bytes_mut();
        if trial % 3 == 0 {
            for b in bytes.iter_mut() {
                *b = r.next() as u8;
            }
        } else {
            for _ in 0..1 + r.below(8) {
                let i = r.below(bytes.len() as u64) as usize;
                bytes[i] ^= 1 << r.below(8);
            }
        }
        let erases = flash.erases();
        let mut st = boot(flash);
        if trial % 3 != 0 && st.flash().erases() != erases {
            boot_erased += 1;
        }
        let h = st.health();
        match read_back(&mut st) {
            Ok(m) if m == model => intact += 1,
            Ok(_) | Err(_) => damaged += 1,
        }
        // Every operation returns, with a value or an error.
        let mut m = Model::default();
        for _ in 0..4 {
            let op = random_op(&mut r, &m, MAX_LEN, &mut mark);
            let _ = apply(&mut st, &mut m, &op);
        }
        if h.map == leeward_firmware::flash::AreaState::Unreadable
            || h.log == leeward_firmware::flash::AreaState::Unreadable
        {
            unreadable += 1;
        }
        // The recovery path: erase both areas on request; the store then works.
        st.erase_datasets()
            .unwrap_or_else(|e| panic!("trial {trial}: erase failed: {e}"));
        st.erase_log()
            .unwrap_or_else(|e| panic!("trial {trial}: erase failed: {e}"));
        let mut st = boot(st.into_flash());
        let mut m = Model::default();
        let op = Op::Put(DataKind::Stations, "ALPS".into(), vec![1, 2, 3]);
        apply(&mut st, &mut m, &op)
            .unwrap_or_else(|e| panic!("trial {trial}: after recovery: {e}"));
        assert_eq!(read_back(&mut boot(st.into_flash())).unwrap(), m);
    }
    eprintln!(
        "test 5: 3000 images (1000 random, 2000 with 1 to 8 bits flipped), {intact} read back whole, \
         {damaged} with damage found, {unreadable} with an area unreadable, \
         {boot_erased} mutated images where boot's repair erased a page"
    );
    assert_eq!(
        boot_erased, 0,
        "a flipped bit made boot erase a page of user data"
    );
}

/// The app runs on the flash store unchanged, through the `Storage` trait: the first
/// power-on stores the demo set and the settings, and a reboot finds them.
#[test]
fn app_runs_on_the_flash_store() {
    use leeward_firmware::App;
    let mut st = boot(erased::<4, 1024>(9));
    let _app = App::power_on(&mut st);
    let names: Vec<String> = st.list().iter().map(|d| d.name.to_string()).collect();
    assert_eq!(names.len(), 1, "{names:?}");
    let mut st = boot(st.into_flash());
    assert!(st.load_settings().is_some());
    let mut buf = [0u8; 2048];
    let (kind, n) = st.get(&names[0], &mut buf).unwrap();
    assert_eq!(kind, DataKind::Stations);
    assert!(leeward_firmware::storage::decode_stations(&buf[..n]).is_ok());
    let _app = App::power_on(&mut st);
    assert_eq!(st.list().len(), 1, "the demo set is stored once only");
}

/// The log warns before it is full, refuses entries when full without dropping any, and
/// drops the oldest only when told.
#[test]
fn log_warns_before_full_and_drops_only_when_told() {
    let mut st = boot(erased::<4, 1024>(11));
    let mut warned_at = None;
    let mut pushed = 0u32;
    loop {
        if warned_at.is_none() && st.log_warning().is_some() {
            warned_at = Some(pushed);
        }
        match st.log_push(&log_entry(pushed + 1)) {
            Ok(_) => pushed += 1,
            Err(leeward_firmware::storage::StoreError::LogFull) => break,
            Err(e) => panic!("push {pushed}: {e}"),
        }
    }
    let warned_at = warned_at.expect("no warning before the log was full");
    assert!(
        warned_at < pushed && pushed - warned_at >= 3,
        "warned at {warned_at} of {pushed}"
    );
    let all: Vec<u32> = (1..=pushed).collect();
    let mut st = boot(st.into_flash());
    assert_eq!(
        read_back(&mut st).unwrap().log,
        all,
        "a full log kept every entry"
    );
    assert_eq!(st.log_drop_oldest(5).unwrap(), 5);
    let mut st = boot(st.into_flash());
    assert_eq!(read_back(&mut st).unwrap().log, all[5..].to_vec());
    // Space comes back a whole page at a time (sequential-storage's queue erases a page
    // once all its entries are gone): after half the entries, there is room.
    assert_eq!(st.log_drop_oldest(pushed / 2).unwrap(), pushed / 2);
    // Running numbers go on after a reboot.
    let mut st = boot(st.into_flash());
    assert_eq!(st.log_push(&log_entry(999)).unwrap(), pushed);
}
