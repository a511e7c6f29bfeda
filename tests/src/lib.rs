//! Shared helpers for leeward cross-crate tests.

pub mod temp_encode {
    //! A small TEMP (WMO FM 35) encoder for tests: the group coders, written from the code
    //! rules the simple way an encoder works ("the last three figures"; WMO-306 FM 35 as
    //! described in the US Navy Aerographer's Mate manual, and FIELD-NOTES §7 from
    //! memory), and a whole-profile encoder. The decoder must get the thousands back from
    //! each surface's range, so a round trip checks one against the other.

    use leeward_core::sounding::{LevelKind, Profile};
    use std::fmt::Write as _;

    /// Metres per second in one knot (1852 m per hour).
    const KT: f64 = 1852.0 / 3600.0;

    /// `TTTaDD`: tenths of |T| with the parity of the tenths giving the sign (even for zero
    /// and above, odd below: so the nearest such tenth), and the depression (tenths up to
    /// 5.0, whole degrees + 50 from 6).
    pub fn code_temp(t: Option<f64>, dep: Option<f64>) -> String {
        let Some(t) = t else {
            return "/////".into();
        };
        let exact = t.abs() * 10.0;
        let mut tenths = exact.round() as i64;
        if (tenths % 2 == 1) != (t < 0.0) {
            // The other parity: the neighbouring tenth nearer the exact value.
            tenths = if exact > tenths as f64 || tenths == 0 {
                tenths + 1
            } else {
                tenths - 1
            };
        }
        let dd = match dep {
            None => "//".to_string(),
            Some(d) if d <= 5.0 => format!("{:02}", (d * 10.0).round() as i64),
            Some(d) => format!("{:02}", (d.round() as i64).max(6) + 50),
        };
        format!("{tenths:03}{dd}")
    }

    /// `dddff` as `dd fff`: tens of degrees, speed with 500 added for a direction ending
    /// in 5.
    pub fn code_wind(w: Option<(u16, u16)>) -> String {
        match w {
            None => "/////".into(),
            Some((dir, kt)) => {
                let dir = if dir == 0 && kt > 0 { 360 } else { dir };
                let five = if dir % 10 == 5 { 500 } else { 0 };
                format!("{:02}{:03}", dir / 10, u32::from(kt) + five)
            }
        }
    }

    /// `hhh`: the last three figures of the height in metres up to 700 hPa, in decametres
    /// above; 1000 hPa below sea level is 500 + |z|.
    pub fn code_height(p: u16, z: Option<f64>) -> String {
        let Some(z) = z else {
            return "///".into();
        };
        let v = match p {
            1000 if z < 0.0 => 500 + (-z).round() as i64,
            1000 | 925 | 850 | 700 => z.round() as i64 % 1000,
            _ => (z / 10.0).round() as i64 % 1000,
        };
        format!("{v:03}")
    }

    pub fn indicator(p: u16) -> &'static str {
        match p {
            1000 => "00",
            925 => "92",
            850 => "85",
            700 => "70",
            500 => "50",
            400 => "40",
            300 => "30",
            250 => "25",
            200 => "20",
            150 => "15",
            100 => "10",
            _ => "??",
        }
    }

    pub fn level_id(i: usize) -> String {
        if i == 0 {
            "00".into()
        } else {
            let d = (i - 1) % 9 + 1;
            format!("{d}{d}")
        }
    }

    /// The standard surfaces of Part A, hPa.
    pub const STANDARD_HPA: [u16; 11] = [1000, 925, 850, 700, 500, 400, 300, 250, 200, 150, 100];

    fn temp_of(l: &leeward_core::sounding::Level) -> String {
        let c = |k: f64| k - 273.15;
        code_temp(
            l.temperature_k.map(c),
            match (l.temperature_k, l.dewpoint_k) {
                (Some(t), Some(td)) => Some(t - td),
                _ => None,
            },
        )
    }

    fn wind_of(l: &leeward_core::sounding::Level) -> String {
        code_wind(l.wind.map(|w| {
            let dir = ((w.dir_from_deg / 5.0).round() * 5.0) as u16 % 360;
            (dir, (w.speed_ms / KT).round() as u16)
        }))
    }

    /// Part A and Part B of `profile` (winds in knots, Id = 1): the surface (the lowest
    /// level), every standard surface (slashes for those below the ground or absent), the
    /// tropopause levels, no maximum wind; Part B the surface and every other level with a
    /// temperature, then (21212) every level with a wind that is not a standard surface.
    pub fn encode_profile(profile: &Profile, station: &str, day: u8, hour: u8) -> String {
        let levels = profile.levels();
        let Some(sfc) = levels.first() else {
            return String::new();
        };
        let hpa = |p: f64| (p / 100.0).round() as u16;
        let psfc = hpa(sfc.pressure_pa);
        let mut a = format!("TTAA {:02}{:02}1 {station}", day + 50, hour);
        let _ = write!(a, " 99{:03} {} {}", psfc % 1000, temp_of(sfc), wind_of(sfc));
        for p in STANDARD_HPA {
            match levels
                .iter()
                .find(|l| hpa(l.pressure_pa) == p && l.kind.contains(LevelKind::STANDARD))
            {
                Some(l) if p < psfc => {
                    let _ = write!(
                        a,
                        " {}{} {} {}",
                        indicator(p),
                        code_height(p, l.height_m),
                        temp_of(l),
                        wind_of(l)
                    );
                }
                _ => {
                    let _ = write!(a, " {}/// ///// /////", indicator(p));
                }
            }
        }
        let trops: Vec<_> = levels
            .iter()
            .filter(|l| l.kind.contains(LevelKind::TROPOPAUSE))
            .collect();
        if trops.is_empty() {
            a.push_str(" 88999");
        }
        for l in trops {
            let _ = write!(
                a,
                " 88{:03} {} {}",
                hpa(l.pressure_pa) % 1000,
                temp_of(l),
                wind_of(l)
            );
        }
        a.push_str(" 77999=");
        let mut b = format!("TTBB {:02}{:02}/ {station}", day + 50, hour);
        let mut n = 0;
        for l in levels.iter().filter(|l| l.temperature_k.is_some()) {
            if n > 0 && l.kind.contains(LevelKind::STANDARD) {
                continue;
            }
            let _ = write!(
                b,
                " {}{:03} {}",
                level_id(n),
                hpa(l.pressure_pa) % 1000,
                temp_of(l)
            );
            n += 1;
        }
        b.push_str(" 21212");
        let mut n = 0;
        for l in levels.iter().filter(|l| l.wind.is_some()) {
            if n > 0 && l.kind.contains(LevelKind::STANDARD) {
                continue;
            }
            let _ = write!(
                b,
                " {}{:03} {}",
                level_id(n),
                hpa(l.pressure_pa) % 1000,
                wind_of(l)
            );
            n += 1;
        }
        b.push('=');
        format!("{a}\n\n{b}\n")
    }
}
