//! # leeward-firmware
//!
//! The behaviour of the leeward handheld, as a `no_std` library without a heap: the
//! keypad's [`Key`]s go into a pure state machine, [`App`], which gathers inputs, calls
//! leeward-core and draws the results on any one-bit `DrawTarget` (the device's display
//! is a 400×240 memory-in-pixel panel, see [`framebuffer`]). The board binary and the
//! desktop simulator only map buttons to keys and provide a display and storage.
//!
//! | module | what it holds |
//! |---|---|
//! | [`key`] | the keys, and the [`Effect`] a key press asks for |
//! | [`link`] | the data link to a laptop: frames, requests and replies, the device side |
//! | [`app`] | the state machine: screens, tasks, notices |
//! | [`crossing`] | the Ridge crossing task's form, kept tracks and plots |
//! | [`data`] | the Data task: dataset operations, summaries, dataset lists, name editor |
//! | [`field`] | the numeric field editor and its checks |
//! | [`network`] | the Network task's station editor, residual table and station map |
//! | [`widgets`] | list, form, result page, notice |
//! | [`pages`] | core results turned into result pages; the About texts |
//! | [`plot`] | what the small plots share: axes and clipped lines |
//! | [`ui`] | layout, fonts, the measuring [`ui::Painter`] |
//! | [`framebuffer`] | 400×240 one-bit buffer with changed-line tracking |
//! | [`settings`] | display units and latitude entry, unit conversions |
//! | [`sounding`] | the Sounding task: summary and profile plot of the current sounding |
//! | [`storage`] | the storage trait and an in-memory implementation |
//! | [`records`] | the stored records: postcard with a schema version, checked on reading |
//! | [`flash`] | the flash store (sequential-storage map and queue) and a fault-injecting flash |
//! | [`text`] | fixed-capacity strings and word wrapping |
//!
//! ```
//! use leeward_firmware::{App, Key, framebuffer::FrameBuffer};
//! let mut app = App::default();
//! let mut fb = FrameBuffer::new();
//! for k in [Key::Ok, Key::Down, Key::Ok] {
//!     app.handle(k); // Site, then Compute with the demo latitude
//! }
//! app.render(&mut fb).unwrap();
//! assert!(app.site_result().is_some());
//! ```
//!
//! leeward gives idealised estimates for trained users; it is not a forecast. The About
//! screens say so on the device.
#![no_std]
#![forbid(unsafe_code)]
#![warn(missing_docs)]
#![cfg_attr(
    not(test),
    deny(clippy::unwrap_used, clippy::expect_used, clippy::panic)
)]

pub mod app;
pub mod crossing;
pub mod data;
pub mod field;
pub mod flash;
pub mod framebuffer;
pub mod glyphs;
pub mod key;
pub mod link;
pub mod network;
pub mod pages;
pub mod plot;
pub mod records;
pub mod settings;
pub mod sounding;
pub mod storage;
pub mod text;
pub mod ui;
pub mod widgets;

pub use app::App;
pub use key::{Effect, Key};
