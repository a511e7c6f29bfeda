//! Property tests of the sounding reader and analysis: no text makes them panic, and what
//! they read they write back unchanged.

use leeward_core::sounding::csv::{parse, write};
use leeward_core::sounding::ridge_flow::RidgeCheck;
use leeward_core::sounding::summary::{summarise, SummaryOptions};
use proptest::prelude::*;

/// Rows of a plausible ascent: pressure falling, temperature and wind anywhere physical.
fn ascent() -> impl Strategy<Value = String> {
    (
        2usize..60,
        prop::collection::vec(
            (
                1.0f64..40.0,
                -70.0f64..35.0,
                0.0f64..25.0,
                0.0f64..360.0,
                0.0f64..150.0,
            ),
            60,
        ),
        any::<bool>(),
    )
        .prop_map(|(n, rows, with_heights)| {
            let mut s = String::from("# lat=45\n# elevation_m=200\n");
            s += "pressure_hpa,height_m,temperature_c,dewpoint_c,wind_dir_deg,wind_speed_kt\n";
            let mut p = 1000.0;
            for (dp, t, dd, dir, spd) in rows.into_iter().take(n) {
                p -= dp * p / 1000.0;
                // Roughly hydrostatic heights (7.5 km scale height), rising with p falling.
                let z = 200.0 + 7500.0 * (1000.0f64 / p).ln();
                let zc = if with_heights {
                    format!("{z:.0}")
                } else {
                    String::new()
                };
                s += &format!("{p:.1},{zc},{t:.1},{:.1},{dir:.0},{spd:.0}\n", t - dd);
            }
            s
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn arbitrary_text_never_panics(text in "\\PC{0,400}") {
        let _ = parse(&text);
    }

    #[test]
    fn csv_like_text_never_panics(text in "[-0-9a-z_.,#=: \n]{0,300}") {
        if let Ok(p) = parse(&text) {
            let _ = summarise(&p, &SummaryOptions::default());
        }
    }

    #[test]
    fn ascents_read_analyse_and_round_trip(text in ascent(), crest in 0.0f64..4000.0) {
        let p = parse(&text).expect("a plausible ascent must read");
        let opts = SummaryOptions {
            ridge: Some(RidgeCheck { ground_m: 200.0, crest_m: crest, axis_deg: Some(0.0) }),
            ..Default::default()
        };
        // Any outcome but a panic; where heights exist, the computed ones rise upward.
        if let Ok(s) = summarise(&p, &opts) {
            let z: Vec<f64> = s.heights.computed_all().flatten().collect();
            prop_assert!(z.windows(2).all(|w| w[1] > w[0]));
        }
        let mut out = String::new();
        write(&p, &mut out).unwrap();
        let back = parse(&out).unwrap();
        prop_assert_eq!(back.len(), p.len());
        for (a, b) in back.levels().iter().zip(p.levels()) {
            prop_assert!((a.pressure_pa - b.pressure_pa).abs() < 1e-3);
            prop_assert_eq!(a.height_m, b.height_m);
        }
    }

    #[test]
    fn mutated_ascents_never_panic(text in ascent(), pos in 0usize..2000, byte in any::<u8>()) {
        let mut bytes = text.into_bytes();
        if !bytes.is_empty() {
            let i = pos % bytes.len();
            bytes[i] = byte;
        }
        if let Ok(t) = String::from_utf8(bytes) {
            if let Ok(p) = parse(&t) {
                let _ = summarise(&p, &SummaryOptions::default());
            }
        }
    }
}
