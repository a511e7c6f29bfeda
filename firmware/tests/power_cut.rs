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
fn t1_cut_at_every_write_and_erase_point() {
    let s = every_cut_point::<4, 1024>(0x1EE1, 1000, MAX_LEN);
    eprintln!("test 1 (4-byte words, 1 KiB pages): 1000 operations, {s:?}");
    assert!(s.points > 1000 && s.acked > 500 && s.erases > 20, "{s:?}");
}
