//! Benchmarks of the site-climate stage: loading a year of hourly weather and synthesising
//! stochastic years. Run with `cargo bench --bench climate`.

use stillbench::climate::file::{
    ColumnMap, FileFormat, GapFill, PeriodConvention, WeatherFileSpec,
};
use stillbench::climate::stochastic::StochasticModel;
use stillbench::climate::{
    Humidity, MonthlyMeans, SiteLocation, StochasticSettings, load_weather_file,
};

fn main() {
    divan::main();
}

/// An invented site (no real place).
fn site() -> SiteLocation {
    SiteLocation {
        latitude_deg: 14.0,
        longitude_deg: 42.0,
        elevation_m: 20.0,
        utc_offset_h: 3.0,
        albedo: 0.25,
        horizon: vec![],
    }
}

/// Invented monthly means (synthetic, for timing only).
fn means() -> MonthlyMeans {
    MonthlyMeans {
        ghi_kwh_m2_day: [5.2, 5.9, 6.5, 6.9, 7.0, 6.8, 6.3, 6.2, 6.3, 6.0, 5.4, 5.0],
        t_max_c: [
            29.0, 29.5, 31.0, 33.0, 35.0, 37.0, 38.0, 37.5, 36.0, 33.0, 31.0, 29.5,
        ],
        t_min_c: [
            21.0, 21.5, 23.0, 25.0, 27.0, 29.0, 30.0, 29.5, 28.0, 25.0, 23.0, 21.5,
        ],
        wind_m_s: [4.0; 12],
        wind_height_m: 10.0,
        humidity: Humidity::DewPointC([18.0; 12]),
        rain_mm: None,
    }
}

/// Write a synthetic year of hourly CSV (a clear-sky-like shape, invented values).
fn synthetic_csv() -> std::path::PathBuf {
    use std::fmt::Write;
    let mut s = String::from("timestamp,ghi,t_air,wind\n");
    for d in 0..365 {
        for h in 1..=24 {
            let (day, hour) = if h == 24 { (d + 1, 0) } else { (d, h) };
            let date =
                chrono::NaiveDate::from_yo_opt(2025, 1).unwrap() + chrono::Duration::days(day);
            let x = (h as f64 - 0.5 - 12.0) / 6.0;
            let ghi = if x.abs() < 1.0 {
                900.0 * (1.0 - x * x) * 0.8
            } else {
                0.0
            };
            let _ = writeln!(
                s,
                "{}T{hour:02}:00:00+03:00,{ghi:.1},{:.1},3.0",
                date,
                25.0 + 5.0 * (1.0 - x.abs().min(2.0))
            );
        }
    }
    let path = std::env::temp_dir().join(format!("stillbench-bench-{}.csv", std::process::id()));
    std::fs::write(&path, s).unwrap();
    path
}

#[divan::bench(sample_count = 20)]
fn load_year_csv(bencher: divan::Bencher) {
    let path = synthetic_csv();
    let spec = WeatherFileSpec {
        path: path.clone(),
        format: FileFormat::Csv,
        period: PeriodConvention::Ending,
        columns: ColumnMap {
            timestamp: "timestamp".into(),
            ghi: stillbench::climate::file::Column::named("ghi"),
            t_air: stillbench::climate::file::Column::named("t_air"),
            wind: Some(stillbench::climate::file::Column::named("wind")),
            ..ColumnMap::default()
        },
        gap_fill: GapFill::Linear { max_gap_h: 3.0 },
        wind_height_m: 10.0,
    };
    let site = site();
    bencher
        .bench(|| load_weather_file(divan::black_box(&spec), &site).map(|l| l.series.hours.len()));
    let _ = std::fs::remove_file(path);
}

#[divan::bench(sample_count = 20)]
fn stochastic_one_year(bencher: divan::Bencher) {
    let model = StochasticModel::new(&means(), &site(), StochasticSettings::default()).unwrap();
    let mut k = 0_u64;
    bencher.bench_local(|| {
        k += 1;
        model.year(7, divan::black_box(k)).hours.len()
    });
}

#[divan::bench(sample_count = 20)]
fn stochastic_daily_clearness_year(bencher: divan::Bencher) {
    let model = StochasticModel::new(&means(), &site(), StochasticSettings::default()).unwrap();
    let mut k = 0_u64;
    bencher.bench_local(|| {
        k += 1;
        model.daily_clearness(7, divan::black_box(k)).len()
    });
}

#[divan::bench(sample_count = 5)]
fn stochastic_thousand_years(bencher: divan::Bencher) {
    let model = StochasticModel::new(&means(), &site(), StochasticSettings::default()).unwrap();
    bencher.bench_local(|| {
        (0..1000_u64)
            .map(|k| model.year(11, k).hours.len())
            .sum::<usize>()
    });
}

#[divan::bench(sample_count = 20)]
fn site_sun_table_and_average_days(bencher: divan::Bencher) {
    let (site, means) = (site(), means());
    bencher.bench_local(|| {
        let table = stillbench::climate::SunTable::new(divan::black_box(&site)).unwrap();
        stillbench::climate::average_days(&means, &site, &table).map(|s| s.hours.len())
    });
}
