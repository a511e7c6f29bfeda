//! Decoders of single five-figure groups: figures, temperature and dew point, wind,
//! standard-surface heights, pressures.
//!
//! Sources: WMO Manual on Codes (WMO-No. 306), Vol. I.1, FM 35 TEMP, as described in the
//! US Navy Aerographer's Mate training manual (module 2, "TEMP code") and checked against
//! our FIELD-NOTES §7, which gives the same rules from memory. Where the two differ the
//! comment says so.

use super::IssueKind;
use crate::sounding::csv::MS_PER_KNOT;
use crate::sounding::profile::{MAX_WIND_MS, TEMPERATURE_RANGE_K};
use crate::sounding::Wind;

/// A figure coded `/` (missing).
pub(crate) const SLASH: u8 = 10;

/// The five figures of a group, each 0–9 or [`SLASH`].
pub(crate) type Figures = [u8; 5];

/// Split a group into its five figures. Anything but five characters from `0-9` and `/`
/// is unreadable.
pub(crate) fn figures(g: &[u8]) -> Result<Figures, IssueKind> {
    let legal = |b: &u8| b.is_ascii_digit() || *b == b'/';
    if !g.iter().all(legal) {
        return Err(IssueKind::Unreadable);
    }
    if g.len() != 5 {
        return Err(IssueKind::WrongLength);
    }
    let mut f = [0u8; 5];
    for (out, b) in f.iter_mut().zip(g) {
        *out = if *b == b'/' { SLASH } else { b - b'0' };
    }
    Ok(f)
}

/// The number the figures spell, or `None` if any is missing.
pub(crate) fn value(f: &[u8]) -> Option<u16> {
    f.iter().try_fold(0u16, |acc, &d| {
        if d == SLASH {
            None
        } else {
            Some(acc * 10 + u16::from(d))
        }
    })
}

/// Whether the group is five figures whose first two are `ind`.
pub(crate) fn has_indicator(g: &[u8], ind: [u8; 2]) -> bool {
    g.len() == 5 && g[0] == ind[0] && g[1] == ind[1]
}

/// Temperature and dew point of one `TTTaDD` group, °C.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct TempDew {
    /// Air temperature, °C.
    pub temp_c: Option<f64>,
    /// Dew point, °C.
    pub dewpoint_c: Option<f64>,
    /// Why the dew point was not used although the temperature was.
    pub dew_issue: Option<IssueKind>,
}

/// Decode `TTTaDD`: TT whole degrees, Ta the tenths whose parity gives the sign (even
/// for zero and above, odd below), DD the dew-point depression (code table 0777: 00–50
/// tenths of a degree, 51–55 not used, 56–99 whole degrees plus 50).
pub(crate) fn temp_dew(g: &[u8]) -> Result<TempDew, IssueKind> {
    let f = figures(g)?;
    let temp_c = value(&f[0..3]).map(|v| {
        let magnitude = f64::from(v) / 10.0;
        if f[2] % 2 == 0 {
            magnitude
        } else {
            -magnitude
        }
    });
    if let Some(t) = temp_c {
        let (lo, hi) = TEMPERATURE_RANGE_K;
        if t + 273.15 < lo || t + 273.15 > hi {
            return Err(IssueKind::BadTemperature);
        }
    }
    let mut dew_issue = None;
    let depression = match value(&f[3..5]) {
        None => None,
        Some(dd @ 0..=50) => Some(f64::from(dd) / 10.0),
        Some(51..=55) => {
            dew_issue = Some(IssueKind::BadDewPoint);
            None
        }
        Some(dd) => Some(f64::from(dd - 50)),
    };
    let dewpoint_c = match (temp_c, depression) {
        (Some(t), Some(d)) => Some(t - d),
        _ => None,
    };
    Ok(TempDew {
        temp_c,
        dewpoint_c,
        dew_issue,
    })
}

/// Decode a wind group `dddff`: direction to 5 degrees and speed, with the hundreds of
/// the speed added to the direction's units figure (110° 112 kt is `11112`, 115° 112 kt
/// is `11612`). Read as `dd fff` this is the same thing: `fff` of 500 or more means 5
/// more degrees and 500 less speed. FIELD-NOTES §7 remembers it as "500 added to the
/// direction"; the worked examples show it is the speed figures that carry the 500.
/// Missing figures give `None`; calm is `00000`.
pub(crate) fn wind(g: &[u8], knots: bool) -> Result<Option<Wind>, IssueKind> {
    let f = figures(g)?;
    let (Some(dd), Some(fff)) = (value(&f[0..2]), value(&f[2..5])) else {
        return Ok(None);
    };
    let dir_deg = u32::from(dd) * 10 + if fff >= 500 { 5 } else { 0 };
    let speed = f64::from(fff % 500);
    if dir_deg > 360 {
        return Err(IssueKind::BadWind);
    }
    let speed_ms = if knots { speed * MS_PER_KNOT } else { speed };
    if speed_ms > MAX_WIND_MS {
        return Err(IssueKind::BadWind);
    }
    let dir_from_deg = if speed == 0.0 || dir_deg == 360 {
        0.0
    } else {
        f64::from(dir_deg)
    };
    Ok(Some(Wind {
        dir_from_deg,
        speed_ms,
    }))
}

/// Geopotential height of a standard isobaric surface from its three figures `hhh`:
/// metres with the thousands left out up to 700 hPa, decametres with the thousands of
/// decametres left out above (FIELD-NOTES §7; the Aerographer's Mate manual gives the
/// metre/decametre split and the 850 hPa example 1457 m → `85457`). The thousands come
/// back by the usual ranges of each surface:
///
/// | hPa | coded | height |
/// |---|---|---|
/// | 1000 | metres; 500 and above mean minus (hhh − 500) | −499 … 499 m |
/// | 925 | metres | 0 … 999 m |
/// | 850 | metres + 1000 | 1000 … 1999 m |
/// | 700 | metres + 3000 below 500, else + 2000 | 2500 … 3499 m |
/// | 500, 400 | decametres | 0 … 9990 m |
/// | 300, 250 | decametres, + 1000 dam below 500 | 5000 … 14 990 m |
/// | 200, 150, 100 | decametres + 1000 | 10 000 … 19 990 m |
pub(crate) fn standard_height_m(level_hpa: u16, hhh: u16) -> Option<f64> {
    let h = f64::from(hhh);
    let z = match level_hpa {
        1000 if hhh >= 500 => -(h - 500.0),
        1000 | 925 => h,
        850 => h + 1000.0,
        700 if hhh < 500 => h + 3000.0,
        700 => h + 2000.0,
        500 | 400 => h * 10.0,
        300 | 250 if hhh < 500 => (h + 1000.0) * 10.0,
        300 | 250 => h * 10.0,
        200 | 150 | 100 => (h + 1000.0) * 10.0,
        _ => return None,
    };
    Some(z)
}

/// A pressure coded as whole hectopascals in three figures, where the thousand is left
/// out (`013` is 1013 hPa): values below 100 get 1000 added. Used for the surface
/// (`99PoPoPo`) and Part B levels (`nnPPP`), which never lie above 100 hPa.
pub(crate) fn pressure_with_thousand_hpa(ppp: u16) -> u16 {
    if ppp < 100 {
        ppp + 1000
    } else {
        ppp
    }
}

/// Day, hour and wind unit of the `YYGGI` group (day + 50 when winds are in knots).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct DayTime {
    /// Day of the month.
    pub day: u8,
    /// Hour, UTC.
    pub hour: u8,
    /// Winds in knots (true) or m/s.
    pub knots: bool,
    /// Last figure: `Id` in Part A (`None` for `/`), `a4` in Part B.
    pub last: Option<u8>,
}

/// Decode `YYGGI`. Days 1–31 (m/s) and 51–81 (knots), hours 0–23.
pub(crate) fn day_time(g: &[u8]) -> Result<DayTime, IssueKind> {
    let f = figures(g)?;
    let (Some(yy), Some(gg)) = (value(&f[0..2]), value(&f[2..4])) else {
        return Err(IssueKind::BadDayTime);
    };
    let (day, knots) = match yy {
        1..=31 => (yy, false),
        51..=81 => (yy - 50, true),
        _ => return Err(IssueKind::BadDayTime),
    };
    if gg > 23 {
        return Err(IssueKind::BadDayTime);
    }
    Ok(DayTime {
        day: day as u8,
        hour: gg as u8,
        knots,
        last: if f[4] == SLASH { None } else { Some(f[4]) },
    })
}

/// Whether the `IIiii` group is a station number: five digits. Block 99 is not a land
/// block (from memory: 99 starts the position groups of ships' TEMP reports), so a
/// group starting 99 here is the surface group with the station group lost.
pub(crate) fn is_station(g: &[u8]) -> bool {
    g.len() == 5 && g.iter().all(u8::is_ascii_digit) && !(g[0] == b'9' && g[1] == b'9')
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // Source of every check here unless a line says otherwise: WMO-306 FM 35 as
    // described in the Aerographer's Mate training manual and FIELD-NOTES §7 (from
    // memory), the two agreeing.

    #[test]
    fn figures_accept_digits_and_slashes_only() {
        assert_eq!(figures(b"12/45"), Ok([1, 2, SLASH, 4, 5]));
        assert_eq!(figures(b"1234"), Err(IssueKind::WrongLength));
        assert_eq!(figures(b"123456"), Err(IssueKind::WrongLength));
        assert_eq!(figures(b"12a45"), Err(IssueKind::Unreadable));
        assert_eq!(figures("12\u{e9}4".as_bytes()), Err(IssueKind::Unreadable));
        assert_eq!(value(&[0, 1, 3]), Some(13));
        assert_eq!(value(&[0, SLASH, 3]), None);
    }

    #[test]
    fn temperature_parity_gives_the_sign() {
        let warm = temp_dew(b"15208").unwrap();
        assert_abs_diff_eq!(warm.temp_c.unwrap(), 15.2, epsilon = 1e-12);
        assert_abs_diff_eq!(warm.dewpoint_c.unwrap(), 14.4, epsilon = 1e-12);
        let cold = temp_dew(b"15310").unwrap();
        assert_abs_diff_eq!(cold.temp_c.unwrap(), -15.3, epsilon = 1e-12);
        assert_abs_diff_eq!(cold.dewpoint_c.unwrap(), -16.3, epsilon = 1e-12);
        // Zero is coded even: 0.0 °C.
        assert_eq!(temp_dew(b"00000").unwrap().temp_c, Some(0.0));
        // -0.1 °C: tenths 1, odd.
        assert_abs_diff_eq!(temp_dew(b"00100").unwrap().temp_c.unwrap(), -0.1);
    }

    #[test]
    fn dew_point_depression_code_table() {
        // 00–50: tenths; 56–99: whole degrees + 50; 51–55 not used.
        let t = |g: &[u8]| temp_dew(g).unwrap();
        assert_abs_diff_eq!(t(b"10050").dewpoint_c.unwrap(), 10.0 - 5.0, epsilon = 1e-12);
        assert_abs_diff_eq!(t(b"10056").dewpoint_c.unwrap(), 10.0 - 6.0, epsilon = 1e-12);
        assert_abs_diff_eq!(
            t(b"10099").dewpoint_c.unwrap(),
            10.0 - 49.0,
            epsilon = 1e-12
        );
        let unused = t(b"10053");
        assert_eq!(unused.temp_c, Some(10.0));
        assert_eq!(unused.dewpoint_c, None);
        assert_eq!(unused.dew_issue, Some(IssueKind::BadDewPoint));
        // Missing depression: temperature kept, no dew point, no complaint.
        let dry = t(b"101//");
        assert_eq!(
            (dry.temp_c, dry.dewpoint_c, dry.dew_issue),
            (Some(-10.1), None, None)
        );
        // Missing temperature: the depression alone says nothing.
        let none = t(b"///05");
        assert_eq!((none.temp_c, none.dewpoint_c), (None, None));
    }

    #[test]
    fn impossible_temperatures_are_refused() {
        // 85.0 °C is impossible; -95.1 °C is cold but possible (profile range -100 to +60 °C).
        assert_eq!(temp_dew(b"85000"), Err(IssueKind::BadTemperature));
        assert!(temp_dew(b"95100").is_ok());
    }

    #[test]
    fn wind_hundreds_ride_on_the_direction() {
        // Worked examples of the public TEMP description: 110° 112 kt = 11112,
        // 115° 112 kt = 11612.
        let w = wind(b"11112", true).unwrap().unwrap();
        assert_abs_diff_eq!(w.dir_from_deg, 110.0);
        assert_abs_diff_eq!(w.speed_ms, 112.0 * 1852.0 / 3600.0, epsilon = 1e-9);
        let w = wind(b"11612", true).unwrap().unwrap();
        assert_abs_diff_eq!(w.dir_from_deg, 115.0);
        assert_abs_diff_eq!(w.speed_ms, 112.0 * 1852.0 / 3600.0, epsilon = 1e-9);
        // m/s stay m/s; 275° 25 m/s = 27525.
        let w = wind(b"27525", false).unwrap().unwrap();
        assert_eq!((w.dir_from_deg, w.speed_ms), (275.0, 25.0));
        // Calm, north, missing, impossible.
        assert_eq!(
            wind(b"00000", true).unwrap(),
            Some(Wind {
                dir_from_deg: 0.0,
                speed_ms: 0.0
            })
        );
        assert_eq!(wind(b"36010", false).unwrap().unwrap().dir_from_deg, 0.0);
        assert_eq!(wind(b"/////", true), Ok(None));
        assert_eq!(wind(b"27///", true), Ok(None));
        assert_eq!(wind(b"37010", true), Err(IssueKind::BadWind));
        assert_eq!(wind(b"36510", true), Err(IssueKind::BadWind));
        // 299 m/s is above any wind on record (profile limit 150 m/s).
        assert_eq!(wind(b"27299", false), Err(IssueKind::BadWind));
    }

    #[test]
    fn standard_heights_get_their_thousands_back() {
        // FIELD-NOTES §6 table (US Standard Atmosphere 1976, computed) coded by the
        // FIELD-NOTES §7 rules; 850 hPa 1457 m → 85457 is the manual's own example.
        let cases: [(u16, u16, f64); 11] = [
            (1000, 111, 111.0),
            (925, 762, 762.0),
            (850, 457, 1457.0),
            (700, 12, 3012.0),
            (500, 557, 5570.0),
            (400, 719, 7190.0),
            (300, 916, 9160.0),
            (250, 36, 10_360.0),
            (200, 178, 11_780.0),
            (150, 361, 13_610.0),
            (100, 618, 16_180.0),
        ];
        for (p, hhh, z) in cases {
            assert_eq!(standard_height_m(p, hhh), Some(z), "{p} hPa");
        }
        // 1000 hPa below sea level: 500 + |h| (from memory).
        assert_eq!(standard_height_m(1000, 520), Some(-20.0));
        // 700 hPa at 2950 m: 950 → + 2000.
        assert_eq!(standard_height_m(700, 950), Some(2950.0));
        // 250 hPa at 9900 m: 990 dam, no thousand added.
        assert_eq!(standard_height_m(250, 990), Some(9900.0));
        assert_eq!(standard_height_m(600, 100), None);
    }

    #[test]
    fn pressures_get_their_thousand_back() {
        // Surface 030 = 1030 hPa (Aerographer's Mate example).
        assert_eq!(pressure_with_thousand_hpa(30), 1030);
        assert_eq!(pressure_with_thousand_hpa(942), 942);
        assert_eq!(pressure_with_thousand_hpa(100), 100);
    }

    #[test]
    fn day_group_carries_the_wind_unit() {
        assert_eq!(
            day_time(b"62121"),
            Ok(DayTime {
                day: 12,
                hour: 12,
                knots: true,
                last: Some(1)
            })
        );
        let ms = day_time(b"1200/").unwrap();
        assert_eq!((ms.day, ms.hour, ms.knots, ms.last), (12, 0, false, None));
        assert_eq!(day_time(b"32121"), Err(IssueKind::BadDayTime));
        assert_eq!(day_time(b"12241"), Err(IssueKind::BadDayTime));
        assert_eq!(day_time(b"//121"), Err(IssueKind::BadDayTime));
        assert!(is_station(b"03005"));
        assert!(!is_station(b"99012"));
        assert!(!is_station(b"0300/"));
    }
}
