//! The data link end to end: `leeward link` against `leeward device` over a Unix socket,
//! with the simulated device's flash in a file; then the device process killed at random
//! moments during pushes and restarted on the same flash file.
mod common;
use common::*;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

fn tmpdir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("leeward-e2e-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Start a device on `flash`, serving `socket`; wait until it answers.
fn device(flash: &Path, socket: &Path) -> Child {
    let mut child = Command::new(env!("CARGO_BIN_EXE_leeward"))
        .args(["device", "--flash"])
        .arg(flash)
        .arg("--socket")
        .arg(socket)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .expect("leeward device starts");
    let start = Instant::now();
    while start.elapsed() < Duration::from_secs(20) {
        if std::os::unix::net::UnixStream::connect(socket).is_ok() {
            return child;
        }
        std::thread::sleep(Duration::from_millis(20));
    }
    let _ = child.kill();
    let _ = child.wait();
    panic!("leeward device did not start listening");
}

fn link(socket: &Path, args: &[&str]) -> std::process::Output {
    let mut a = vec!["link", "--socket", socket.to_str().unwrap()];
    a.extend_from_slice(args);
    leeward(&a)
}

fn ok(out: &std::process::Output) -> String {
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

#[test]
fn push_list_pull_delete_and_a_restart_keeps_everything() {
    let d = tmpdir("basic");
    let (flash, socket) = (d.join("flash.img"), d.join("dev.sock"));
    let mut dev = device(&flash, &socket);
    let stations = demo_file("tessel-stations.csv");
    let sounding = demo_file("tessel-col-sounding.csv");
    let temp = demo_file("tessel-col.temp");
    let profile = data("profile_ok.csv");
    let out = ok(&link(&socket, &["push", &stations, "--name", "TESSEL"]));
    assert!(out.contains("stored TESSEL (stations"), "{out}");
    ok(&link(&socket, &["push", &sounding, "--name", "SONDE"]));
    ok(&link(
        &socket,
        &["push", &temp, "--name", "TEMP", "--elevation", "1850"],
    ));
    // A ridge profile needs its position and axis.
    let r = link(&socket, &["push", &profile, "--name", "RIDGE"]);
    assert_eq!(r.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&r.stderr).contains("# lat="));
    let ridge = d.join("ridge.csv");
    std::fs::write(
        &ridge,
        format!(
            "# lat=45.5\n# lon=-140\n# axis_deg=0\n{}",
            std::fs::read_to_string(&profile).unwrap()
        ),
    )
    .unwrap();
    ok(&link(
        &socket,
        &["push", ridge.to_str().unwrap(), "--name", "RIDGE"],
    ));
    // The name is taken now: refused with exit 2, and the stored one is untouched.
    let again = link(&socket, &["push", &stations, "--name", "TESSEL"]);
    assert_eq!(again.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&again.stderr).contains("already has"));

    let list = ok(&link(&socket, &["list"]));
    for n in ["TESSEL", "SONDE", "TEMP", "RIDGE"] {
        assert!(list.contains(n), "{list}");
    }
    // Restart the device on the same flash: all of it is still there and reads back as
    // pushed (stations and sounding parse to the same values as the originals).
    dev.kill().unwrap();
    dev.wait().unwrap();
    let mut dev = device(&flash, &socket);
    let back = d.join("back.csv");
    ok(&link(
        &socket,
        &["pull", "TESSEL", "--out", back.to_str().unwrap()],
    ));
    let a = json(&["geostrophic", &stations]);
    let b = json(&["geostrophic", back.to_str().unwrap()]);
    assert_eq!(a, b, "the pulled station set gives another answer");
    let sback = d.join("sonde.csv");
    ok(&link(
        &socket,
        &["pull", "SONDE", "--out", sback.to_str().unwrap()],
    ));
    assert_eq!(
        json(&["sounding", &sounding]),
        json(&["sounding", sback.to_str().unwrap()])
    );
    let rback = d.join("ridge-back.csv");
    ok(&link(
        &socket,
        &["pull", "RIDGE", "--out", rback.to_str().unwrap()],
    ));
    assert!(std::fs::read_to_string(&rback)
        .unwrap()
        .starts_with("# lat=45.5"));
    // Pulling over an existing file needs --force; deleting twice is an error.
    let r = link(
        &socket,
        &["pull", "TESSEL", "--out", back.to_str().unwrap()],
    );
    assert_eq!(r.status.code(), Some(2));
    ok(&link(&socket, &["delete", "TEMP"]));
    let r = link(&socket, &["delete", "TEMP"]);
    assert_eq!(r.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&r.stderr).contains("no dataset of that name"));
    ok(&link(&socket, &["clock"]));
    let log = d.join("log.csv");
    ok(&link(&socket, &["log", "--out", log.to_str().unwrap()]));
    assert!(std::fs::read_to_string(&log).unwrap().starts_with("seq,"));
    dev.kill().unwrap();
    dev.wait().unwrap();
    // No device: exit 2 and a line that says so.
    let r = link(&socket, &["list"]);
    assert_eq!(r.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&r.stderr).contains("no device at"));
    std::fs::remove_dir_all(&d).unwrap();
}

#[test]
fn a_device_killed_during_pushes_keeps_what_it_acknowledged() {
    const ROUNDS: usize = 24;
    // Pushes run one after another while the device is killed at random moments and
    // restarted on the same flash file. Every push that was acknowledged must then read
    // back identical; one cut short is absent or whole, never damaged.
    let d = tmpdir("kill");
    let (flash, socket) = (d.join("flash.img"), d.join("dev.sock"));
    let sounding = demo_file("tessel-col-sounding.csv");
    let original = std::fs::read_to_string(&sounding).unwrap();
    let mut seed = 0x5EED_u64;
    let mut rand = move || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        seed
    };
    let mut acknowledged: Vec<String> = vec![];
    let mut dev = device(&flash, &socket);
    for round in 0..ROUNDS {
        let name = format!("S{round}");
        // Kill the device after a random delay while this push runs.
        let delay = Duration::from_micros(rand() % 8_000);
        let pid = dev.id();
        let killer = std::thread::spawn(move || {
            std::thread::sleep(delay);
            kill_9(pid);
        });
        let out = link(&socket, &["push", &sounding, "--name", &name]);
        killer.join().unwrap();
        let _ = dev.wait();
        if out.status.success() {
            acknowledged.push(name.clone());
        }
        dev = device(&flash, &socket);
        // Everything acknowledged so far is there and intact.
        for n in &acknowledged {
            let back = d.join(format!("{n}.csv"));
            let _ = std::fs::remove_file(&back);
            ok(&link(
                &socket,
                &["pull", n, "--out", back.to_str().unwrap()],
            ));
            let b = std::fs::read_to_string(&back).unwrap();
            assert_eq!(
                json(&["sounding", back.to_str().unwrap()]),
                json(&["sounding", &sounding]),
                "{n} changed after a kill: {b} vs {original}"
            );
        }
        // The one cut short, if stored at all, is whole.
        if !out.status.success() {
            let back = d.join("cut.csv");
            let _ = std::fs::remove_file(&back);
            let p = link(&socket, &["pull", &name, "--out", back.to_str().unwrap()]);
            if p.status.success() {
                assert_eq!(
                    json(&["sounding", back.to_str().unwrap()]),
                    json(&["sounding", &sounding])
                );
            }
        }
    }
    println!(
        "{} of {ROUNDS} pushes acknowledged before their kill",
        acknowledged.len()
    );
    dev.kill().unwrap();
    dev.wait().unwrap();
    std::fs::remove_dir_all(&d).unwrap();
}

/// SIGKILL through the `kill` command (no libc binding needed in the tests).
fn kill_9(pid: u32) {
    let _ = Command::new("kill").args(["-9", &pid.to_string()]).status();
}

/// The CRC-32 a push reports ("… (CRC-32 1c7850bb)"): equal CRCs mean equal datasets.
fn pushed_crc(out: &str) -> String {
    let at = out.find("CRC-32 ").expect("a CRC in the push report") + 7;
    out[at..at + 8].to_string()
}

#[test]
fn each_file_comes_back_in_the_format_it_was_pushed_in() {
    let d = tmpdir("formats");
    let (flash, socket) = (d.join("flash.img"), d.join("dev.sock"));
    let mut dev = device(&flash, &socket);
    let temp = demo_file("tessel-col.temp");
    let sounding = demo_file("tessel-col-sounding.csv");
    let stations = demo_file("tessel-stations.csv");
    let push = |file: &str, name: &str, extra: &[&str]| {
        let mut a = vec!["push", file, "--name", name];
        a.extend_from_slice(extra);
        pushed_crc(&ok(&link(&socket, &a)))
    };
    let pull = |name: &str, file: &str| {
        let back = d.join(file);
        let out = ok(&link(
            &socket,
            &["pull", name, "--out", back.to_str().unwrap()],
        ));
        (back, out)
    };

    // A TEMP report comes back as the same text, byte for byte.
    push(&temp, "TEMP", &["--elevation", "1850"]);
    let (tback, out) = pull("TEMP", "temp-back.temp");
    assert!(out.contains("(sounding, TEMP)"), "{out}");
    assert_eq!(
        std::fs::read(&tback).unwrap(),
        std::fs::read(&temp).unwrap(),
        "the pulled TEMP report differs from the pushed one"
    );
    // After a restart on the same flash too.
    dev.kill().unwrap();
    dev.wait().unwrap();
    let mut dev = device(&flash, &socket);
    let (tback2, _) = pull("TEMP", "temp-back2.temp");
    assert_eq!(
        std::fs::read(&tback2).unwrap(),
        std::fs::read(&temp).unwrap()
    );

    // A sounding CSV comes back as leeward's sounding CSV of the same values: pushed
    // again, it makes the same dataset (same CRC), and it analyses the same.
    let a = push(&sounding, "SONDE", &[]);
    let (sback, out) = pull("SONDE", "sonde-back.csv");
    assert!(out.contains("(sounding, CSV)"), "{out}");
    let text = std::fs::read_to_string(&sback).unwrap();
    assert!(
        text.lines()
            .find(|l| !l.starts_with('#'))
            .unwrap()
            .starts_with("pressure_hpa,"),
        "{text}"
    );
    assert!(!text.contains("TTAA"), "{text}");
    assert_eq!(a, push(sback.to_str().unwrap(), "SONDE2", &[]));
    assert_eq!(
        json(&["sounding", &sounding]),
        json(&["sounding", sback.to_str().unwrap()])
    );

    // A station CSV comes back as a station CSV of the same values (not the same bytes:
    // its comments are not kept and numbers are written in their shortest form).
    let a = push(&stations, "ST", &[]);
    let (stback, out) = pull("ST", "st-back.csv");
    assert!(out.contains("(stations, CSV)"), "{out}");
    assert!(std::fs::read_to_string(&stback)
        .unwrap()
        .starts_with("id,lat,lon,height_m,sigma_m\n"));
    assert_eq!(a, push(stback.to_str().unwrap(), "ST2", &[]));

    // A ridge profile likewise.
    let ridge = d.join("ridge.csv");
    std::fs::write(
        &ridge,
        format!(
            "# lat=45.5\n# lon=-140\n# axis_deg=0\n{}",
            std::fs::read_to_string(data("profile_ok.csv")).unwrap()
        ),
    )
    .unwrap();
    let a = push(ridge.to_str().unwrap(), "RIDGE", &[]);
    let (rback, out) = pull("RIDGE", "ridge-back.csv");
    assert!(out.contains("(ridge, CSV)"), "{out}");
    assert_eq!(a, push(rback.to_str().unwrap(), "RIDGE2", &[]));

    dev.kill().unwrap();
    dev.wait().unwrap();
    std::fs::remove_dir_all(&d).unwrap();
}
