//! Host timings of the core's main calculations (criterion 0.5). Figures and their method
//! are recorded in docs/performance.md.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use leeward_core::column::stretch;
use leeward_core::crossing::{run, CrossingInput, Discard};
use leeward_core::geo::{LatLon, TangentPlane};
use leeward_core::network::{analyse, FitOptions, Network, Reference, Station};
use leeward_core::rotation::{beta, coriolis, Rotation};
use leeward_core::{demo, network};
use std::time::Duration;

/// Heights of an analytic 500 hPa field on the tangent plane (x east, y north, m): a
/// westerly gradient and a weak quadratic, the shape the fit is built for.
fn field(x: f64, y: f64) -> f64 {
    5600.0 - 1e-4 * y + 3e-5 * x + 0.6e-10 * x * x + 0.2e-10 * x * y + 0.9e-10 * y * y
}

/// `n` stations on a spiral 100 to 600 km about (45.5°N, 140°W), σ 10 m.
fn spiral_network(n: usize) -> (Network, LatLon) {
    let origin = LatLon::new(45.5, -140.0).unwrap();
    let plane = TangentPlane::new(origin);
    let mut net = Network::new();
    for i in 0..n {
        let t = i as f64 * 2.39996; // the golden angle, rad: an even, irregular spread
        let r = 100_000.0 + 500_000.0 * (i as f64 + 0.5) / n as f64;
        let (x, y) = (r * t.cos(), r * t.sin());
        let p = plane.to_latlon(x, y);
        net.push(
            Station::new(
                &format!("S{i}"),
                p.lat_deg,
                p.lon_deg,
                field(x, y),
                Some(10.0),
            )
            .unwrap(),
        )
        .unwrap();
    }
    (net, origin)
}

fn rotation(c: &mut Criterion) {
    c.bench_function("coriolis f and beta", |b| {
        b.iter(|| {
            let lat = black_box(45.5);
            (coriolis(lat), beta(lat))
        })
    });
    c.bench_function("Rotation::at", |b| b.iter(|| Rotation::at(black_box(45.5))));
}

fn network_fit(c: &mut Criterion) {
    for n in [8, 32] {
        let (net, origin) = spiral_network(n);
        let opts = FitOptions {
            reference: Reference::Point(origin),
            ..FitOptions::default()
        };
        // The automatic choice must be the full quadratic for the figure to mean that.
        let fit = analyse(&net, &opts).unwrap();
        assert_eq!(fit.model, network::Model::Quadratic);
        c.bench_function(
            &format!("network fit, {n} stations (auto: quadratic)"),
            |b| b.iter(|| analyse(black_box(&net), black_box(&opts))),
        );
    }
}

fn column(c: &mut Criterion) {
    c.bench_function("stretching solve", |b| {
        b.iter(|| {
            stretch(
                black_box(45.5),
                black_box(1.2e-5),
                black_box(10_500.0),
                black_box(43.0),
                black_box(8_200.0),
            )
        })
    });
}

fn crossing(c: &mut Criterion) {
    // A 3000 km track over the demo ridge at the default 5 km step: 600 RK4 steps.
    let mut input = CrossingInput::new(demo::ridge(), 20.0, 270.0, demo::LID_M);
    input.max_length_m = 3_000_000.0;
    input.stop_after_second_trough = false;
    let r = run(&input, &mut Discard).unwrap();
    assert_eq!(r.steps, 600);
    c.bench_function("ridge crossing, 3000 km at 5 km steps", |b| {
        b.iter(|| run(black_box(&input), &mut Discard))
    });
    let demo_input = demo::crossing(20.0, 270.0);
    c.bench_function("demo crossing (to the second trough)", |b| {
        b.iter(|| run(black_box(&demo_input), &mut Discard))
    });
}

fn config() -> Criterion {
    // Shorter than criterion's defaults (3 s warm-up, 5 s measurement) so the whole run
    // stays within a few minutes on the 2-core build machine.
    Criterion::default()
        .warm_up_time(Duration::from_secs(1))
        .measurement_time(Duration::from_secs(3))
        .sample_size(60)
}

criterion_group! {
    name = benches;
    config = config();
    targets = rotation, network_fit, column, crossing
}
criterion_main!(benches);
