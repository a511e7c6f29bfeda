//! The flash store with its map and its log on flash of different erase sizes
//! ([`TwoFlash`]), as on the board: the map in three 16 KiB sectors, the log in one
//! 128 KiB sector (docs/board.md, "Flash storage"; the sector sizes are RM0383's table of
//! the STM32F411's flash). The same checks as tests (1) and (3) of docs/reliability.md,
//! with the power cut at every write and erase call of either area in turn.
mod harness;

use harness::*;
use leeward_firmware::flash::sim::{Cut, SimFlash};
use leeward_firmware::flash::{ConfigError, FlashStore, TwoFlash};
use leeward_firmware::storage::{DataKind, Storage, StoreError};

/// The board's layout scaled down 16 times: map pages 1-3 of 1 KiB, log page of 8 KiB
/// at 24 KiB (sector 7's place), both flashes seeing one address space.
const MAP: core::ops::Range<u32> = 0x400..0x1000;
const LOG: core::ops::Range<u32> = 0x6000..0x8000;

type Small = TwoFlash<SimFlash<Vec<u8>, 4, 1024>, SimFlash<Vec<u8>, 4, 8192>>;

fn erased_small(seed: u64) -> Small {
    TwoFlash {
        map: SimFlash::new(vec![0xFF; MAP.end as usize], seed),
        log: SimFlash::new(vec![0xFF; LOG.end as usize], seed ^ 1),
    }
}

fn boot2<M, L>(
    f: TwoFlash<M, L>,
    map: &core::ops::Range<u32>,
    log: &core::ops::Range<u32>,
) -> FlashStore<TwoFlash<M, L>>
where
    M: embedded_storage::nor_flash::NorFlash,
    L: embedded_storage::nor_flash::NorFlash,
{
    match FlashStore::open(f, map.clone(), log.clone()) {
        Ok(s) => s,
        Err(e) => panic!("layout refused: {e:?}"),
    }
}

/// Which flash the cut is on.
#[derive(Debug, Clone, Copy)]
enum Area {
    Map,
    Log,
}

/// Write and erase calls `op` makes on each area's flash.
fn count2<const MP: usize, const LP: usize>(
    image: &TwoFlash<SimFlash<Vec<u8>, 4, MP>, SimFlash<Vec<u8>, 4, LP>>,
    ranges: (&core::ops::Range<u32>, &core::ops::Range<u32>),
    before: &Model,
    op: &Op,
) -> (u32, u32) {
    let mut st = boot2(image.clone(), ranges.0, ranges.1);
    st._flash_mut().map.set_cut(None);
    st._flash_mut().log.set_cut(None);
    let mut m = before.clone();
    let _ = apply(&mut st, &mut m, op);
    (st.flash().map.ops(), st.flash().log.ops())
}

/// Cut the power at `cut` on `area` during `op`, reboot from the bytes of both flashes
/// and check that the store holds what was acknowledged, the interrupted operation old
/// or new.
fn cut_and_check2<const MP: usize, const LP: usize>(
    image: &TwoFlash<SimFlash<Vec<u8>, 4, MP>, SimFlash<Vec<u8>, 4, LP>>,
    ranges: (&core::ops::Range<u32>, &core::ops::Range<u32>),
    before: &Model,
    op: &Op,
    area: Area,
    cut: Cut,
) -> Result<(), String> {
    let mut st = boot2(image.clone(), ranges.0, ranges.1);
    match area {
        Area::Map => st._flash_mut().map.set_cut(Some(cut)),
        Area::Log => st._flash_mut().log.set_cut(Some(cut)),
    }
    let mut m = before.clone();
    let acked = apply(&mut st, &mut m, op).is_ok();
    let mut f = st.into_flash();
    // A cut cuts the whole chip: both areas lose power together.
    let was_cut = f.map.is_off() || f.log.is_off();
    if !was_cut {
        return Err(format!("the cut at {area:?} {cut:?} never came"));
    }
    f.map.power_on();
    f.log.power_on();
    if f.map.violations() + f.log.violations() != 0 {
        return Err("flash contract broken".into());
    }
    let mut st = boot2(f, ranges.0, ranges.1);
    let got = read_back(&mut st)?;
    if acked {
        if got != m {
            return Err(format!(
                "acknowledged {} lost: {}",
                op_name(op),
                diff(&got, &m)
            ));
        }
        Ok(())
    } else {
        check_after_cut(&got, before, op)
    }
}

/// Test (1) on two flashes: `ops` operations of a seeded workload, and before each a cut
/// at every write and erase call of the map's flash and of the log's flash in turn. The
/// cut points tried on each area and the operations acknowledged.
fn every_cut_point2<const MP: usize, const LP: usize>(
    mut image: TwoFlash<SimFlash<Vec<u8>, 4, MP>, SimFlash<Vec<u8>, 4, LP>>,
    ranges: (&core::ops::Range<u32>, &core::ops::Range<u32>),
    seed: u64,
    ops: usize,
    max_len: usize,
) -> (u64, u64, u32) {
    let mut r = Rng(seed);
    let mut model = Model::default();
    let mut mark = 0;
    let (mut on_map, mut on_log, mut acked) = (0u64, 0u64, 0u32);
    for i in 0..ops {
        let op = random_op(&mut r, &model, max_len, &mut mark);
        let (nm, nl) = count2(&image, ranges, &model, &op);
        for (area, n) in [(Area::Map, nm), (Area::Log, nl)] {
            for p in 0..n {
                let cut = Cut {
                    op: p,
                    byte: r.below(4096) as u32,
                };
                if let Err(e) = cut_and_check2(&image, ranges, &model, &op, area, cut) {
                    panic!("seed {seed}, op {i}, {area:?} cut {cut:?}: {e}");
                }
                match area {
                    Area::Map => on_map += 1,
                    Area::Log => on_log += 1,
                }
            }
        }
        let mut st = boot2(image, ranges.0, ranges.1);
        if apply(&mut st, &mut model, &op).is_ok() {
            acked += 1;
        }
        image = st.into_flash();
        assert_eq!(image.map.violations() + image.log.violations(), 0);
    }
    (on_map, on_log, acked)
}

#[test]
fn two_flashes_cut_at_every_point_short() {
    let (on_map, on_log, acked) =
        every_cut_point2(erased_small(0x2A), (&MAP, &LOG), 0x2A, 120, 700);
    eprintln!("two areas, scaled: {on_map} map cuts, {on_log} log cuts, {acked} acknowledged");
    // Both areas were cut many times: the check covers a cut in either.
    assert!(
        on_map > 100 && on_log > 20 && acked > 60,
        "{on_map} {on_log} {acked}"
    );
}

#[test]
#[ignore = "heavy: run in release by .ci/run (see DEVELOPERS.md)"]
fn t4_two_flashes_board_geometry() {
    // The board's own layout (`flash::layout`, shared with the board and the simulator):
    // map in sectors 1-3 (16 KiB each), log in sector 7, 4-byte words.
    use leeward_firmware::flash::layout::{LOG_AREA, LOG_ERASE, MAP_AREA, MAP_ERASE, WRITE_SIZE};
    let (map, log) = (MAP_AREA, LOG_AREA);
    let image = TwoFlash {
        map: SimFlash::<_, WRITE_SIZE, MAP_ERASE>::new(vec![0xFF; map.end as usize], 7),
        log: SimFlash::<_, WRITE_SIZE, LOG_ERASE>::new(vec![0xFF; log.end as usize], 8),
    };
    let (on_map, on_log, acked) = every_cut_point2(image, (&map, &log), 0xB0A2D, 150, 6000);
    eprintln!(
        "two areas, board geometry: {on_map} map cuts, {on_log} log cuts, {acked} acknowledged"
    );
    assert!(
        on_map > 200 && on_log > 20 && acked > 75,
        "{on_map} {on_log} {acked}"
    );
}

#[test]
fn a_one_page_log_fills_then_empties_and_takes_entries_again() {
    // The board's log is one erase page: its space comes back only when every entry on
    // it has been dropped (sequential-storage frees whole pages).
    let mut st = boot2(erased_small(3), &MAP, &LOG);
    let mut n = 0;
    loop {
        match st.log_push(&log_entry(n)) {
            Ok(_) => n += 1,
            Err(StoreError::LogFull) => break,
            Err(e) => panic!("push {n}: {e}"),
        }
        assert!(n < 10_000, "the log never filled");
    }
    assert!(n > 50, "only {n} entries in 8 KiB");
    assert!(st.log_warning().is_some());
    // Dropping some gives no room back on a single page...
    assert_eq!(st.log_drop_oldest(n / 2).unwrap(), n / 2);
    let mut st = boot2(st.into_flash(), &MAP, &LOG);
    assert_eq!(st.log_len(), n - n / 2);
    assert_eq!(st.log_push(&log_entry(n)), Err(StoreError::LogFull));
    // ...dropping all of them does.
    assert_eq!(st.log_drop_oldest(n).unwrap(), n - n / 2);
    st.log_push(&log_entry(9999)).unwrap();
    let mut st = boot2(st.into_flash(), &MAP, &LOG);
    let m = read_back(&mut st).unwrap();
    assert_eq!(m.log, vec![9999]);
}

#[test]
fn datasets_and_log_live_in_their_own_areas() {
    let mut st = boot2(erased_small(4), &MAP, &LOG);
    let data: Vec<u8> = (0..900).map(|i| (i * 7) as u8).collect();
    st.put(DataKind::Sounding, "T_0600", &data).unwrap();
    st.log_push(&log_entry(5)).unwrap();
    let f = st.into_flash();
    // Nothing outside the areas was written (the rest stands for the program's sectors).
    assert!(f.map.bytes()[..MAP.start as usize]
        .iter()
        .all(|&b| b == 0xFF));
    assert!(f.log.bytes()[..LOG.start as usize]
        .iter()
        .all(|&b| b == 0xFF));
    let mut st = boot2(f, &MAP, &LOG);
    let m = read_back(&mut st).unwrap();
    assert_eq!(m.datasets["T_0600"].1, data);
    assert_eq!(m.log, vec![5]);
}

#[test]
fn overlapping_or_misaligned_areas_are_refused() {
    // Overlap in the shared address space, an area off its flash's pages, too small.
    let bad = [
        (0x400..0x1000, 0x0..0x2000),
        (0x400..0x1000, 0x5000..0x7000),
        (0x400..0x800, 0x6000..0x8000),
    ];
    for (map, log) in bad {
        let r = FlashStore::open(erased_small(5), map.clone(), log.clone());
        assert_eq!(r.err(), Some(ConfigError::BadArea), "{map:?} {log:?}");
    }
    // A log flash of 1-byte words is refused as the map's would be.
    let f = TwoFlash {
        map: SimFlash::<_, 4, 1024>::new(vec![0xFF; 0x1000], 1),
        log: SimFlash::<_, 1, 8192>::new(vec![0xFF; 0x8000], 1),
    };
    assert_eq!(
        FlashStore::open(f, MAP, LOG).err(),
        Some(ConfigError::WriteSizeTooSmall)
    );
}
