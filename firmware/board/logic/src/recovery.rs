//! What the board says at power-on when the flash store found trouble, and what the
//! user's answer does.
//!
//! The store never erases anything unless asked (docs/reliability.md). An area it cannot
//! read even after sequential-storage's repair is offered for erasing: OK erases it and
//! starts afresh (the firmware then seeds a blank store as at the first power-on), any
//! other key keeps it as it is (nothing new can be stored there; the question comes back
//! at the next power-on). Damaged datasets or lost settings are only reported: the
//! datasets stay listed under Data, where the user can delete them.

use embedded_graphics::pixelcolor::BinaryColor;
use embedded_graphics::prelude::DrawTarget;
use leeward_firmware::flash::{AreaState, Health};
use leeward_firmware::ui::{Inspect, Painter};
use leeward_firmware::widgets::draw_notice;
use leeward_firmware::Key;

/// The question or report shown at power-on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Prompt {
    /// An area cannot be read: erase it?
    Unreadable {
        /// The map (settings and datasets).
        map: bool,
        /// The results log.
        log: bool,
    },
    /// Readable, with losses found by the checks.
    Damaged {
        /// Datasets whose chunks do not match their commit record.
        datasets: u8,
        /// The settings record could not be read (the defaults are in use).
        settings: bool,
    },
}

/// What to do after the user's answer.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Choice {
    /// Erase the unreadable areas named, then carry on.
    Erase {
        /// The map area.
        map: bool,
        /// The log area.
        log: bool,
    },
    /// Carry on with the store as it is.
    Keep,
}

impl Prompt {
    /// The prompt for what boot found, or `None` when all is well.
    pub fn for_health(h: &Health) -> Option<Prompt> {
        let map = h.map == AreaState::Unreadable;
        let log = h.log == AreaState::Unreadable;
        if map || log {
            return Some(Prompt::Unreadable { map, log });
        }
        if h.damaged > 0 || h.settings_lost {
            return Some(Prompt::Damaged {
                datasets: h.damaged,
                settings: h.settings_lost,
            });
        }
        None
    }

    /// The heading.
    pub fn heading(&self) -> &'static str {
        match self {
            Prompt::Unreadable { .. } => "Stored data unreadable",
            Prompt::Damaged { .. } => "Stored data damaged",
        }
    }

    /// The words (at most 7 lines of 36 characters: a notice's room).
    pub fn text(&self, out: &mut impl core::fmt::Write) -> core::fmt::Result {
        match *self {
            Prompt::Unreadable { map, log } => {
                let what = match (map, log) {
                    (true, true) => "settings, datasets and results log",
                    (true, false) => "settings and datasets",
                    _ => "results log",
                };
                write!(
                    out,
                    "The flash holding the {what} cannot be read. OK: erase it and \
                     start afresh. Other keys: keep it; nothing new can be stored there."
                )
            }
            Prompt::Damaged { datasets, settings } => {
                if datasets > 0 {
                    write!(
                        out,
                        "{datasets} dataset{} failed the check and {} marked damaged \
                         under Data: delete {} there. ",
                        if datasets == 1 { "" } else { "s" },
                        if datasets == 1 { "is" } else { "are" },
                        if datasets == 1 { "it" } else { "them" },
                    )?;
                }
                if settings {
                    write!(out, "The settings were lost: the defaults are in use. ")?;
                }
                write!(out, "Any key goes on.")
            }
        }
    }

    /// What `key` answers.
    pub fn answer(&self, key: Key) -> Choice {
        match (*self, key) {
            (Prompt::Unreadable { map, log }, Key::Ok) => Choice::Erase { map, log },
            _ => Choice::Keep,
        }
    }

    /// Draw the prompt over a blank screen.
    pub fn draw<D, I>(&self, d: &mut D, inspect: &mut I) -> Result<(), D::Error>
    where
        D: DrawTarget<Color = BinaryColor>,
        I: Inspect,
    {
        let mut words = leeward_firmware::text::Message::new();
        let _ = self.text(&mut words);
        let mut p = Painter::new(d, inspect);
        p.clear()?;
        p.title("leeward", "")?;
        draw_notice(&mut p, self.heading(), &words)
    }
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::*;
    use embedded_graphics::primitives::Rectangle;
    use leeward_firmware::framebuffer::FrameBuffer;
    use std::string::String;
    use std::vec::Vec;

    fn health() -> Health {
        Health::OK
    }

    /// Every piece of text drawn, and whether it fitted its box.
    struct Seen(Vec<(String, bool)>);
    impl Inspect for Seen {
        fn text(&mut self, _area: Rectangle, text: &str, fits: bool) {
            self.0.push((text.into(), fits));
        }
    }

    #[test]
    fn a_healthy_store_asks_nothing() {
        assert_eq!(Prompt::for_health(&health()), None);
        // Commits from a newer firmware are left alone, not reported as damage.
        let h = Health {
            foreign: 2,
            ..health()
        };
        assert_eq!(Prompt::for_health(&h), None);
    }

    #[test]
    fn an_unreadable_area_is_offered_for_erasing_and_only_ok_erases() {
        let h = Health {
            log: AreaState::Unreadable,
            damaged: 1,
            ..health()
        };
        let p = Prompt::for_health(&h).unwrap();
        assert_eq!(
            p,
            Prompt::Unreadable {
                map: false,
                log: true
            }
        );
        assert_eq!(
            p.answer(Key::Ok),
            Choice::Erase {
                map: false,
                log: true
            }
        );
        for k in [Key::Back, Key::Menu, Key::Digit(0), Key::Delete] {
            assert_eq!(p.answer(k), Choice::Keep, "{k:?}");
        }
        let mut s = String::new();
        p.text(&mut s).unwrap();
        assert!(s.contains("results log") && !s.contains("datasets"), "{s}");
    }

    #[test]
    fn damage_is_reported_and_any_key_goes_on() {
        let h = Health {
            damaged: 2,
            settings_lost: true,
            ..health()
        };
        let p = Prompt::for_health(&h).unwrap();
        assert_eq!(p.answer(Key::Ok), Choice::Keep);
        let mut s = String::new();
        p.text(&mut s).unwrap();
        assert!(
            s.starts_with("2 datasets failed") && s.contains("defaults"),
            "{s}"
        );
    }

    type Sim<const P: usize> = leeward_firmware::flash::sim::SimFlash<Vec<u8>, 4, P>;
    type BoardLike = leeward_firmware::flash::TwoFlash<Sim<1024>, Sim<8192>>;
    const MAP: core::ops::Range<u32> = 0x400..0x1000;
    const LOG: core::ops::Range<u32> = 0x6000..0x8000;

    fn open(f: BoardLike) -> leeward_firmware::flash::FlashStore<BoardLike> {
        leeward_firmware::flash::FlashStore::open(f, MAP, LOG).unwrap()
    }

    #[test]
    fn power_on_keeps_what_was_stored_and_an_erase_brings_a_wrecked_map_back() {
        use leeward_firmware::flash::sim::SimFlash;
        use leeward_firmware::storage::Storage;
        use leeward_firmware::App;
        // The first power-on seeds the demo set and the settings (App::open_store);
        // a reset (a new store from the same bytes) finds them again, with no prompt.
        let f = leeward_firmware::flash::TwoFlash {
            map: SimFlash::new(std::vec![0xFF; MAP.end as usize], 1),
            log: SimFlash::new(std::vec![0xFF; LOG.end as usize], 2),
        };
        let mut st = open(f);
        let _app = App::power_on(&mut st);
        let listed = st.list();
        assert!(!listed.is_empty());
        let mut st = open(st.into_flash());
        assert_eq!(Prompt::for_health(&st.health()), None);
        assert_eq!(st.list(), listed);
        assert!(st.load_settings().is_some());
        // Wreck the map's page markers: the store cannot read it, the prompt offers the
        // erase, OK erases, and the next power-on starts afresh.
        let mut f = st.into_flash();
        for b in &mut f.map.bytes_mut()[MAP.start as usize..] {
            *b = 0x00;
        }
        let mut st = open(f);
        let p = Prompt::for_health(&st.health());
        assert_eq!(
            p,
            Some(Prompt::Unreadable {
                map: true,
                log: false
            }),
            "{:?}",
            st.health()
        );
        let Some(Choice::Erase {
            map: true,
            log: false,
        }) = p.map(|p| p.answer(Key::Ok))
        else {
            panic!("OK does not erase the map");
        };
        st.erase_datasets().unwrap();
        let _app = App::power_on(&mut st);
        let mut st = open(st.into_flash());
        assert_eq!(Prompt::for_health(&st.health()), None);
        assert_eq!(
            st.list(),
            listed,
            "the fresh store holds the demo set again"
        );
    }

    #[test]
    fn every_prompt_fits_its_notice() {
        let prompts = [
            Prompt::Unreadable {
                map: true,
                log: true,
            },
            Prompt::Unreadable {
                map: true,
                log: false,
            },
            Prompt::Unreadable {
                map: false,
                log: true,
            },
            Prompt::Damaged {
                datasets: 12,
                settings: true,
            },
            Prompt::Damaged {
                datasets: 1,
                settings: false,
            },
            Prompt::Damaged {
                datasets: 0,
                settings: true,
            },
        ];
        for p in prompts {
            let mut fb = FrameBuffer::new();
            let mut seen = Seen(Vec::new());
            p.draw(&mut fb, &mut seen).unwrap();
            assert!(seen.0.iter().all(|(_, fits)| *fits), "{p:?}: {:?}", seen.0);
            let words: String = seen
                .0
                .iter()
                .map(|(t, _)| t.as_str())
                .collect::<Vec<_>>()
                .join(" ");
            assert!(words.contains(p.heading()), "{words}");
            assert!(fb.dirty_count() > 0);
        }
    }
}
