//! Benchmarks of the single-slope basin still: one solver step of its network, and one
//! simulated year of hourly weather (365 days built from the demo's 12 average days) at
//! the default accuracy (the one that passes the 1 % step-refinement test).
//!
//! Run with `cargo bench --bench stills`. Targets (issue 4): a step under 2 µs, a year
//! under 100 ms.

use stillbench::climate::{Plane, SkyModel, WeatherSeries, WeatherSource};
use stillbench::design;
use stillbench::network::{Solver, SolverSettings, StepRecord};
use stillbench::stills::{self, HourContext, RunOptions, SiteWeather};

fn main() {
    divan::main();
}

fn demo() -> (design::LoadedDesign, SiteWeather) {
    let loaded = design::load_demo().expect("the demo design loads");
    let w = stills::site_weather(&loaded).expect("the demo weather builds");
    (loaded, w)
}

/// 365 days: each month's average day repeated for the days of the month.
fn year_of(w: &SiteWeather) -> SiteWeather {
    let mut hours = Vec::with_capacity(8760);
    let mut doy = 1;
    for (m, days) in design::DAYS_IN_MONTH.iter().enumerate() {
        let day: Vec<_> = w
            .series
            .hours
            .iter()
            .filter(|h| h.month == m as u32 + 1)
            .copied()
            .collect();
        for _ in 0..*days {
            hours.extend(day.iter().map(|h| {
                let mut h = *h;
                h.day_of_year = doy;
                h
            }));
            doy += 1;
        }
    }
    SiteWeather {
        series: WeatherSeries {
            hours,
            poa_plane: None,
            source: WeatherSource::AverageDays,
            albedo: w.series.albedo,
        },
        average_days: false,
        ..w.clone()
    }
}

#[divan::bench]
fn one_solver_step(bencher: divan::Bencher) {
    let (loaded, w) = demo();
    let v = &loaded.design.variants[0];
    let model = stills::build_model(&loaded, v, &w)
        .expect("builds")
        .expect("single-slope is modelled");
    let net = model.network();
    let plane = Plane::from_degrees(v.cover_tilt_deg(), v.cover_azimuth_deg);
    let poa = w.series.plane_series(plane, SkyModel::HayDavies);
    // April, 12:00–13:00 solar time.
    let i = 3 * 24 + 12;
    let ctx = HourContext {
        weather: &w.series.hours[i],
        poa: std::slice::from_ref(&poa[i]),
        ground_k: w.month_mean_air_k[3],
        dew_point_known: w.dew_point_known,
        feed_salinity_g_kg: w.feed_salinity_g_kg,
    };
    let start = model
        .initial_state(320.0, w.feed_salinity_g_kg)
        .expect("state");
    let mut inputs = net.inputs(300.0).expect("inputs");
    model
        .hour_inputs(&ctx, &start, &mut inputs)
        .expect("hour inputs");
    let mut solver = Solver::new(net, SolverSettings::default()).expect("solver");
    let mut record = StepRecord::new(net);
    bencher.bench_local(|| {
        let mut s = start.clone();
        let out = solver.step(&mut s, &inputs, 60.0, &mut record);
        divan::black_box((out, s))
    });
}

#[divan::bench(sample_count = 10)]
fn one_year_hourly(bencher: divan::Bencher) {
    let (loaded, w) = demo();
    let year = year_of(&w);
    let v = &loaded.design.variants[0];
    let model = stills::build_model(&loaded, v, &year)
        .expect("builds")
        .expect("single-slope is modelled");
    bencher.bench_local(|| {
        let r = stills::run_model(
            model.as_ref(),
            &v.name,
            "single-slope",
            &year,
            &RunOptions::default(),
        )
        .expect("a year runs");
        divan::black_box(r.annual_l)
    });
}

/// One solver step (60 s, April noon) of the demo variant of `kind`, all its planes.
fn step_of_kind(bencher: divan::Bencher, kind: &str) {
    let (loaded, w) = demo();
    let v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == kind)
        .expect("the demo has the kind");
    let model = stills::build_model(&loaded, v, &w)
        .expect("builds")
        .expect("the kind is modelled");
    let net = model.network();
    let i = 3 * 24 + 12;
    let poa: Vec<_> = model
        .planes()
        .iter()
        .map(|(p, _)| w.series.plane_series(*p, SkyModel::HayDavies)[i])
        .collect();
    let ctx = HourContext {
        weather: &w.series.hours[i],
        poa: &poa,
        ground_k: w.month_mean_air_k[3],
        dew_point_known: w.dew_point_known,
        feed_salinity_g_kg: w.feed_salinity_g_kg,
    };
    let start = model
        .initial_state(320.0, w.feed_salinity_g_kg)
        .expect("state");
    let mut inputs = net.inputs(300.0).expect("inputs");
    model
        .hour_inputs(&ctx, &start, &mut inputs)
        .expect("hour inputs");
    let mut solver = Solver::new(net, SolverSettings::default()).expect("solver");
    let mut record = StepRecord::new(net);
    bencher.bench_local(|| {
        let mut s = start.clone();
        let out = solver.step(&mut s, &inputs, 60.0, &mut record);
        divan::black_box((out, s))
    });
}

/// One hourly year of the demo variant of `kind`.
fn year_of_kind(bencher: divan::Bencher, kind: &str) {
    let (loaded, w) = demo();
    let year = year_of(&w);
    let v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == kind)
        .expect("the demo has the kind");
    let model = stills::build_model(&loaded, v, &year)
        .expect("builds")
        .expect("the kind is modelled");
    bencher.bench_local(|| {
        let r = stills::run_model(model.as_ref(), &v.name, kind, &year, &RunOptions::default())
            .expect("a year runs");
        divan::black_box(r.annual_l)
    });
}

#[divan::bench]
fn double_slope_step(bencher: divan::Bencher) {
    step_of_kind(bencher, "double-slope");
}

#[divan::bench(sample_count = 10)]
fn double_slope_year(bencher: divan::Bencher) {
    year_of_kind(bencher, "double-slope");
}

#[divan::bench]
fn stepped_step(bencher: divan::Bencher) {
    step_of_kind(bencher, "stepped");
}

#[divan::bench(sample_count = 10)]
fn stepped_year(bencher: divan::Bencher) {
    year_of_kind(bencher, "stepped");
}
