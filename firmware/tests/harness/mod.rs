//! The power-cut harness: a seeded workload on a [`FlashStore`] over a [`SimFlash`], a
//! model of what was acknowledged, and the check after every reboot.
#![allow(dead_code)]

use std::collections::BTreeMap;

use leeward_firmware::flash::sim::{Cut, SimFlash};
use leeward_firmware::flash::{Areas, FlashStore};
use leeward_firmware::records::{LogEntry, LogTask};
use leeward_firmware::settings::{HeightUnit, Settings, WindUnit};
use leeward_firmware::storage::{DataKind, Storage, StoreError};

/// A flash image in RAM.
pub type Flash<const W: usize, const P: usize> = SimFlash<Vec<u8>, W, P>;

/// Pages of the map and of the log in the test geometries.
pub const MAP_PAGES: u32 = 6;
pub const LOG_PAGES: u32 = 2;

/// A fresh, erased flash of `MAP_PAGES + LOG_PAGES` pages.
pub fn erased<const W: usize, const P: usize>(seed: u64) -> Flash<W, P> {
    SimFlash::new(vec![0xFF; P * (MAP_PAGES + LOG_PAGES) as usize], seed)
}

/// Boot a store on `flash` (the map first, then the log).
pub fn boot<const W: usize, const P: usize>(flash: Flash<W, P>) -> FlashStore<Flash<W, P>> {
    let p = P as u32;
    match FlashStore::_open_any_word(
        flash,
        0..MAP_PAGES * p,
        MAP_PAGES * p..(MAP_PAGES + LOG_PAGES) * p,
    ) {
        Ok(s) => s,
        Err(e) => panic!("test geometry refused: {e:?}"),
    }
}

/// Tiny deterministic generator (splitmix64) so that every run replays the same cases.
#[derive(Clone)]
pub struct Rng(pub u64);
impl Rng {
    pub fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    pub fn below(&mut self, n: u64) -> u64 {
        self.next() % n.max(1)
    }
}

/// One operation of the workload.
#[derive(Debug, Clone)]
pub enum Op {
    Put(DataKind, String, Vec<u8>),
    Replace(DataKind, String, Vec<u8>),
    Rename(String, String),
    Delete(String),
    Settings(Settings),
    Log(u32),
    /// Drop the n oldest log entries (as the user does after an export).
    LogDrop(u32),
}

/// What the user was told is stored.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Model {
    pub datasets: BTreeMap<String, (DataKind, Vec<u8>)>,
    pub settings: Option<Settings>,
    /// Marks (uptime_s) of the log entries acknowledged, oldest first.
    pub log: Vec<u32>,
}

const NAMES: [&str; 6] = ["ALPS", "T_0600", "T_1200", "RIDGE1", "SITE", "NET2"];

/// A random operation that makes sense for `m`, with datasets of up to `max_len` bytes.
pub fn random_op(r: &mut Rng, m: &Model, max_len: usize, log_mark: &mut u32) -> Op {
    let name = NAMES[r.below(NAMES.len() as u64) as usize].to_string();
    let kind = [
        DataKind::Stations,
        DataKind::Sounding,
        DataKind::Site,
        DataKind::Ridge,
    ][r.below(4) as usize];
    let len = match r.below(4) {
        0 => r.below(40) as usize,
        _ => r.below(max_len as u64 + 1) as usize,
    };
    let fill = r.next();
    let data: Vec<u8> = (0..len)
        .map(|i| (fill.rotate_left(i as u32 % 64) as u8) ^ i as u8)
        .collect();
    let present: Vec<&String> = m.datasets.keys().collect();
    let pick_present = |r: &mut Rng| {
        if present.is_empty() || r.below(10) == 0 {
            name.clone() // now and then an operation the store must refuse
        } else {
            present[r.below(present.len() as u64) as usize].clone()
        }
    };
    let absent: Vec<&str> = NAMES
        .iter()
        .copied()
        .filter(|n| !m.datasets.contains_key(*n))
        .collect();
    let pick_absent = |r: &mut Rng| {
        if absent.is_empty() || r.below(10) == 0 {
            name.clone()
        } else {
            absent[r.below(absent.len() as u64) as usize].to_string()
        }
    };
    match r.below(10) {
        0 | 1 => Op::Put(kind, pick_absent(r), data),
        2 | 3 => Op::Replace(kind, pick_present(r), data),
        4 => {
            let from = pick_present(r);
            Op::Rename(from, pick_absent(r))
        }
        5 => Op::Delete(pick_present(r)),
        6 => Op::Settings(Settings {
            height: if r.below(2) == 0 {
                HeightUnit::Metre
            } else {
                HeightUnit::Foot
            },
            wind: [
                WindUnit::MetrePerSecond,
                WindUnit::Knot,
                WindUnit::KmPerHour,
            ][r.below(3) as usize],
            ..Settings::default()
        }),
        _ if m.log.len() > 20 && r.below(4) == 0 => Op::LogDrop(1 + r.below(12) as u32),
        _ => {
            *log_mark += 1;
            Op::Log(*log_mark)
        }
    }
}

pub fn log_entry(mark: u32) -> LogEntry {
    let mut inputs = heapless::Vec::new();
    let _ = inputs.push("ALPS".try_into().unwrap());
    let mut values = heapless::Vec::new();
    let _ = values.push(mark as f64 * 1e-5);
    LogEntry {
        seq: 0,
        utc_s: Some(mark),
        uptime_s: mark,
        task: LogTask::Network,
        inputs,
        values,
    }
}

/// Apply `op` to the store; whether it was acknowledged (Ok), and the model updated
/// if so.
pub fn apply<A: Areas>(st: &mut FlashStore<A>, m: &mut Model, op: &Op) -> Result<(), StoreError>
where
    A::Log: embedded_storage::nor_flash::MultiwriteNorFlash,
{
    match op {
        Op::Put(k, n, d) => {
            st.put(*k, n, d)?;
            m.datasets.insert(n.clone(), (*k, d.clone()));
        }
        Op::Replace(k, n, d) => {
            st.replace(*k, n, d)?;
            m.datasets.insert(n.clone(), (*k, d.clone()));
        }
        Op::Rename(a, b) => {
            st.rename(a, b)?;
            if let Some(v) = m.datasets.remove(a) {
                m.datasets.insert(b.clone(), v);
            }
        }
        Op::Delete(n) => {
            st.delete(n)?;
            m.datasets.remove(n);
        }
        Op::Settings(s) => {
            st.save_settings(s)?;
            m.settings = Some(*s);
        }
        Op::Log(mark) => {
            st.log_push(&log_entry(*mark))?;
            m.log.push(*mark);
        }
        Op::LogDrop(n) => {
            let k = st.log_drop_oldest(*n)? as usize;
            m.log.drain(..k.min(m.log.len()));
        }
    }
    Ok(())
}

/// What the store holds, read back through its public interface.
pub fn read_back<A: Areas>(st: &mut FlashStore<A>) -> Result<Model, String> {
    let mut out = Model {
        settings: st.load_settings(),
        ..Model::default()
    };
    let mut buf = vec![0u8; 20_000];
    for d in st.list() {
        let (kind, len) = st
            .get(&d.name, &mut buf)
            .map_err(|e| format!("DETECTED: get {}: {e}", d.name))?;
        out.datasets
            .insert(d.name.to_string(), (kind, buf[..len].to_vec()));
    }
    st.log_for_each(|e| out.log.push(e.uptime_s))
        .map_err(|e| format!("DETECTED: log: {e}"))?;
    Ok(out)
}

/// After a cut during `op` (not acknowledged) the store must hold `before` or `before`
/// with `op` applied, nothing else: every acknowledged record identical, the interrupted
/// one old or new.
pub fn check_after_cut(got: &Model, before: &Model, op: &Op) -> Result<(), String> {
    if got == before {
        return Ok(());
    }
    let mut after = before.clone();
    match op {
        Op::Put(k, n, d) | Op::Replace(k, n, d) => {
            after.datasets.insert(n.clone(), (*k, d.clone()));
        }
        Op::Rename(a, b) => {
            if let Some(v) = after.datasets.remove(a) {
                after.datasets.insert(b.clone(), v);
            }
        }
        Op::Delete(n) => {
            after.datasets.remove(n);
        }
        Op::Settings(s) => after.settings = Some(*s),
        Op::Log(mark) => after.log.push(*mark),
        Op::LogDrop(n) => {
            // Entries go one by one: any number up to n of the oldest may be gone.
            for k in 0..=(*n as usize).min(before.log.len()) {
                let mut a = before.clone();
                a.log.drain(..k);
                if *got == a {
                    return Ok(());
                }
            }
        }
    }
    if *got == after {
        Ok(())
    } else {
        Err(format!(
            "after a cut during {}: {}",
            op_name(op),
            diff(got, before)
        ))
    }
}

/// Cut the power at `cut` during `op` on the store in `image`, power on, reboot from
/// the bytes alone and check. The flash left after the reboot and whether it matched.
pub fn cut_and_check<const W: usize, const P: usize>(
    image: &Flash<W, P>,
    before: &Model,
    op: &Op,
    cut: Cut,
    weak: bool,
) -> Result<Flash<W, P>, String> {
    let mut flash = image.clone();
    flash.set_weak_bits(weak);
    let mut st = boot(flash);
    st._flash_mut().set_cut(Some(cut));
    let mut m = before.clone();
    let acked = apply(&mut st, &mut m, op).is_ok();
    let mut flash = st.into_flash();
    let was_cut = flash.is_off();
    if !was_cut {
        return Err(format!("the cut at {cut:?} never came"));
    }
    flash.power_on();
    if flash.violations() != 0 {
        return Err(format!(
            "flash contract broken {} times",
            flash.violations()
        ));
    }
    let mut st = boot(flash);
    let got = read_back(&mut st)?;
    if acked {
        // The cut came after the operation (or it needed no flash write).
        if got != m {
            return Err(format!(
                "acknowledged {} lost: {}",
                op_name(op),
                diff(&got, &m)
            ));
        }
    } else {
        check_after_cut(&got, before, op)?;
    }
    Ok(st.into_flash())
}

/// Flash write and erase calls `op` makes on `image`.
pub fn count_ops<const W: usize, const P: usize>(
    image: &Flash<W, P>,
    before: &Model,
    op: &Op,
) -> u32 {
    let mut st = boot(image.clone());
    st._flash_mut().set_cut(None);
    let mut m = before.clone();
    let _ = apply(&mut st, &mut m, op);
    st.flash().ops()
}

/// An operation in a few words.
pub fn op_name(op: &Op) -> String {
    match op {
        Op::Put(k, n, d) => format!("put {k:?} {n} ({} bytes)", d.len()),
        Op::Replace(k, n, d) => format!("replace {k:?} {n} ({} bytes)", d.len()),
        other => format!("{other:?}"),
    }
}

/// How `got` differs from `want`, briefly.
pub fn diff(got: &Model, want: &Model) -> String {
    let mut out = Vec::new();
    let names: std::collections::BTreeSet<&String> =
        got.datasets.keys().chain(want.datasets.keys()).collect();
    for n in names {
        let g = got
            .datasets
            .get(n)
            .map(|(k, d)| (k, d.len(), leeward_firmware::flash::crc32(d)));
        let w = want
            .datasets
            .get(n)
            .map(|(k, d)| (k, d.len(), leeward_firmware::flash::crc32(d)));
        if g != w {
            out.push(format!("{n}: got {g:?}, before {w:?}"));
        }
    }
    if got.settings != want.settings {
        out.push(format!(
            "settings: got {:?}, before {:?}",
            got.settings, want.settings
        ));
    }
    if got.log != want.log {
        out.push(format!("log: got {:?}, before {:?}", got.log, want.log));
    }
    out.join("; ")
}
