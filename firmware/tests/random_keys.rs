//! Random key sequences never panic, always leave a state that draws cleanly on the
//! 400×240 display, and a key the app says changed nothing really changed nothing.
mod common;
use common::*;
use leeward_firmware::framebuffer::FrameBuffer;
use leeward_firmware::settings::{LatEntry, Settings};
use leeward_firmware::storage::{MemStorage, Storage};
use leeward_firmware::{App, Effect, Key};
use proptest::prelude::*;

fn key() -> impl Strategy<Value = Key> {
    // Weighted towards the keys that move between screens, so sequences go deep.
    prop_oneof![
        3 => prop::sample::select(vec![Key::Up, Key::Down, Key::Ok, Key::Back]),
        2 => prop::sample::select(Key::ALL.to_vec()),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 96, ..ProptestConfig::default() })]

    #[test]
    fn random_keys_leave_a_drawable_state(keys in prop::collection::vec(key(), 1..80), dm in any::<bool>()) {
        let settings = Settings {
            lat_entry: if dm { LatEntry::DegMin } else { LatEntry::Decimal },
            ..Settings::default()
        };
        let mut app = App::new(settings);
        let mut fb = FrameBuffer::new();
        app.render(&mut fb).unwrap();
        fb.mark_clean();
        for (i, &k) in keys.iter().enumerate() {
            let e = app.handle(k);
            app.render(&mut fb).unwrap();
            if e == Effect::Nothing {
                prop_assert_eq!(fb.dirty_count(), 0, "key {} ({:?}) said Nothing but changed the screen", i, k);
            }
            fb.mark_clean();
        }
        Shot::of(&app).assert_clean(&format!("after {keys:?}"));
    }

    #[test]
    fn random_keys_in_the_network_task(keys in prop::collection::vec(key(), 1..120), wind in 0u8..3) {
        let mut settings = Settings::default();
        for _ in 0..wind {
            settings.wind = settings.wind.next();
        }
        let mut app = App::new(settings);
        // Home → Network first, so every sequence starts among the stations.
        for k in [Key::Down, Key::Down, Key::Ok] {
            app.handle(k);
        }
        let mut fb = FrameBuffer::new();
        app.render(&mut fb).unwrap();
        fb.mark_clean();
        for (i, &k) in keys.iter().enumerate() {
            let e = app.handle(k);
            app.render(&mut fb).unwrap();
            if e == Effect::Nothing {
                prop_assert_eq!(fb.dirty_count(), 0, "key {} ({:?}) said Nothing but changed the screen", i, k);
            }
            fb.mark_clean();
        }
        Shot::of(&app).assert_clean(&format!("after {keys:?}"));
    }

    #[test]
    fn random_keys_in_the_ridge_crossing_task(keys in prop::collection::vec(key(), 1..100), ft in any::<bool>()) {
        let mut settings = Settings::default();
        if ft {
            settings.height = settings.height.next();
            settings.wind = settings.wind.next();
        }
        let mut app = App::new(settings);
        // Home → Ridge crossing first, so every sequence starts on its form.
        for k in [Key::Down, Key::Down, Key::Down, Key::Down, Key::Ok] {
            app.handle(k);
        }
        let mut fb = FrameBuffer::new();
        app.render(&mut fb).unwrap();
        fb.mark_clean();
        for (i, &k) in keys.iter().enumerate() {
            let e = app.handle(k);
            app.render(&mut fb).unwrap();
            if e == Effect::Nothing {
                prop_assert_eq!(fb.dirty_count(), 0, "key {} ({:?}) said Nothing but changed the screen", i, k);
            }
            fb.mark_clean();
        }
        Shot::of(&app).assert_clean(&format!("after {keys:?}"));
    }

    #[test]
    fn random_keys_in_the_data_task_with_a_store(keys in prop::collection::vec(key(), 1..100), save_first in any::<bool>()) {
        // The store starts as after a first power-on (the demo set); every effect is
        // carried out against it, as the board's loop does.
        let mut st = MemStorage::new();
        let mut app = App::power_on(&mut st);
        let start: &[Key] = if save_first {
            // Network → Save set as "1", then home → Data: two sets to work on.
            &[Key::Down, Key::Down, Key::Ok, Key::Up, Key::Up, Key::Up, Key::Up, Key::Ok,
              Key::Digit(1), Key::Ok, Key::Back, Key::Menu, Key::Up, Key::Up, Key::Up, Key::Ok]
        } else {
            &[Key::Up, Key::Up, Key::Up, Key::Ok]
        };
        for &k in start {
            let e = app.handle(k);
            app.apply(e, &mut st).unwrap();
        }
        let mut fb = FrameBuffer::new();
        app.render(&mut fb).unwrap();
        fb.mark_clean();
        for (i, &k) in keys.iter().enumerate() {
            let e = app.handle(k);
            app.apply(e, &mut st).unwrap();
            app.render(&mut fb).unwrap();
            if e == Effect::Nothing {
                prop_assert_eq!(fb.dirty_count(), 0, "key {} ({:?}) said Nothing but changed the screen", i, k);
            }
            fb.mark_clean();
            // What the Data list shows is what the store holds.
            let listed: Vec<String> = app.catalog().iter().map(|d| d.name.to_string()).collect();
            let stored: Vec<String> = st.list().iter().map(|d| d.name.to_string()).collect();
            prop_assert_eq!(listed, stored, "after key {} ({:?})", i, k);
            prop_assert_eq!(app.free_bytes(), Some(st.free_bytes()));
        }
        Shot::of(&app).assert_clean(&format!("after {keys:?}"));
    }
}
