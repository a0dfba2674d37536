//! The stepped (tray) still: energy closure, the one-tray reduction to the single slope,
//! evaporating area and yields against the published range. Each number names its source or
//! is marked common practice.

use std::path::{Path, PathBuf};

use proptest::prelude::*;
use stillbench::design::{self, LoadedDesign};
use stillbench::stills::{self, KindDetails, RunOptions, VariantResult};

fn designs_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("designs")
}

/// The demo site (invented) with one variant of `kind` and `fields`.
fn design_with(kind: &str, width_m: f64, length_m: f64, fields: &str) -> LoadedDesign {
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap()];
    let text = format!(
        "{head}[[variant]]\nname = \"test\"\nkind = \"{kind}\"\nwidth_m = {width_m}\n\
         length_m = {length_m}\ncover_azimuth_deg = 180\ncover = \"window-glass-4mm\"\n\
         liner = \"black-epdm\"\n{fields}\n"
    );
    design::parse_design_str(&text, Path::new("test.toml"), &designs_dir()).unwrap()
}

fn run(loaded: &LoadedDesign) -> VariantResult {
    let w = stills::site_weather(loaded).unwrap();
    stills::simulate_variant(
        loaded,
        &loaded.design.variants[0],
        &w,
        &RunOptions::default(),
    )
    .unwrap()
}

fn check_sane(r: &VariantResult) {
    for m in &r.months {
        // DESIGN.md "The shared model": residual below 0.1 % of the absorbed sunlight.
        assert!(m.energy.residual_fraction < 1e-3, "month {}", m.month);
        assert!(m.l_m2_day.is_finite() && m.l_m2_day >= 0.0);
        // REFERENCES.md §8: yield below the single-effect ceiling.
        assert!(m.l_m2_day < m.ceiling_l_m2_day, "month {}", m.month);
    }
}

#[test]
fn demo_months_close_and_yield_in_the_published_range() {
    let loaded = design::load_demo().unwrap();
    let w = stills::site_weather(&loaded).unwrap();
    let v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == "stepped")
        .unwrap();
    let r = stills::simulate_variant(&loaded, v, &w, &RunOptions::default()).unwrap();
    check_sane(&r);
    let KindDetails::Stepped {
        evaporating_per_footprint,
        mean_gap_mm,
        ..
    } = r.details
    else {
        panic!("not stepped details")
    };
    // Demo: 8 trays, 30 mm risers, wetted risers → 1 + 7·0.03·2/2 = 1.21 m² per m²
    // (hand calculation from the design).
    assert!((evaporating_per_footprint - 1.21).abs() < 1e-9);
    assert!(r.evaporating_m2 > r.footprint_m2);
    let april = &r.months[3];
    eprintln!(
        "tray-steps: mean {:.2} L/m2/day, April {:.2} L/m2/day at {:.1} kWh/m2 GHI, \
         efficiency {:.3}, mean gap {mean_gap_mm:.0} mm",
        r.mean_l_m2_day, april.l_m2_day, april.insolation_kwh_m2_day, april.efficiency
    );
    // Kabeel, Omara & Younes (2015), RSER 46:178 (REFERENCES.md §6): stepped stills in
    // sunny climates report roughly 2–7 L/m²/day (range from memory; the review collects
    // devices from about 2 to above 6, with reflectors and heaters higher). A sunny month
    // (April, 7.0 kWh/m²/day GHI at the invented demo site) must land in 2–7.
    assert!((2.0..=7.0).contains(&april.l_m2_day), "{}", april.l_m2_day);
}

/// The single-slope fields and the stepped fields of the same still: 1.0 × 2.0 m, south,
/// 15° glass cover, 100 mm front wall, 20 mm brine on a 1 mm metal tray, the same liner and
/// insulation, and the internal correlation `corr`.
fn same_still(corr: &str) -> (LoadedDesign, LoadedDesign) {
    let common = "cover_tilt_deg = 15\nfront_wall_mm = 100\n\
        base_insulation = [ { material = \"polystyrene-foam\", thickness_mm = 50 } ]\n\
        side_insulation = [ { material = \"polystyrene-foam\", thickness_mm = 25 } ]";
    let single = design_with(
        "single-slope",
        1.0,
        2.0,
        &format!(
            "{common}\nbrine_depth_mm = 20\nbasin = \"metal-tray\"\nbasin_thickness_mm = 1.0\n\
             internal_correlation = \"{corr}\""
        ),
    );
    let stepped = design_with(
        "stepped",
        1.0,
        2.0,
        &format!(
            "{common}\ntrays = 1\ntray_depth_mm = 20\nriser_mm = 30\n\
             internal_correlation = \"{corr}\""
        ),
    );
    (single, stepped)
}

#[test]
fn one_tray_of_basin_depth_reproduces_the_single_slope() {
    // Issue 5: a stepped still reduced to one tray of basin depth, with the same internal
    // correlation selected, reproduces the single-slope still within 5 %.
    for corr in ["dunkle", "inclined-enclosure"] {
        let (single, stepped) = same_still(corr);
        let a = run(&single);
        let b = run(&stepped);
        check_sane(&b);
        eprintln!(
            "{corr}: single slope {:.3} L/m2/day, one-tray stepped {:.3} L/m2/day",
            a.mean_l_m2_day, b.mean_l_m2_day
        );
        assert!(
            (b.annual_l / a.annual_l - 1.0).abs() < 0.05,
            "{corr}: {} vs {}",
            b.annual_l,
            a.annual_l
        );
        for (ma, mb) in a.months.iter().zip(&b.months) {
            assert!(
                (mb.l_m2_day / ma.l_m2_day - 1.0).abs() < 0.05,
                "month {}",
                ma.month
            );
        }
    }
}

#[test]
fn more_trays_under_the_same_cover_give_a_smaller_gap_and_more_evaporating_area() {
    // Geometry (hand calculation): 1 m wide, 20° cover from 80 mm, 10 mm trays, 30 mm risers:
    // one tray has a mean gap of 70 + 500·tan 20° = 252 mm; eight trays rise 7·30 = 210 mm,
    // so the mean gap falls by 105 mm to 147 mm.
    let gap = |trays: u32| {
        let l = design_with(
            "stepped",
            1.0,
            2.0,
            &format!(
                "cover_tilt_deg = 20\nfront_wall_mm = 80\ntrays = {trays}\n\
                 tray_depth_mm = 10\nriser_mm = 30"
            ),
        );
        let w = stills::site_weather(&l).unwrap();
        let m = stills::build_model(&l, &l.design.variants[0], &w)
            .unwrap()
            .unwrap();
        let KindDetails::Stepped { mean_gap_mm, .. } = m.details() else {
            panic!("not stepped")
        };
        (mean_gap_mm, m.evaporating_m2())
    };
    let (g1, a1) = gap(1);
    let (g8, a8) = gap(8);
    assert!((g1 - 251.99).abs() < 0.1, "{g1}");
    assert!((g8 - 146.99).abs() < 0.1, "{g8}");
    assert!((a1 - 2.0).abs() < 1e-12 && (a8 - 2.42).abs() < 1e-9);
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 1000, ..ProptestConfig::default() })]

    /// Random valid designs, a day each: the energy closes to 0.1 % (DESIGN.md), no NaN,
    /// no negative yield, yield below the single-effect ceiling (REFERENCES.md §8).
    #[test]
    fn random_designs_close_their_energy_balance(
        width in 0.5f64..3.0,
        length in 0.5f64..5.0,
        tilt in 10.0f64..40.0,
        trays in 1u32..20,
        depth in 3.0f64..40.0,
        riser_share in 0.1f64..0.9,
        front in 60.0f64..300.0,
        wetted in any::<bool>(),
        correlation in 0usize..3,
        month in 1u32..=12,
    ) {
        // Keep the steps under the cover: each riser a share of the cover's rise per tray
        // (at least 10 mm, the schema's lower bound), and the front wall above the brine.
        let rise_per_tray_mm = width * 1000.0 / f64::from(trays) * tilt.to_radians().tan();
        let riser = (riser_share * rise_per_tray_mm).max(10.0);
        prop_assume!(riser < rise_per_tray_mm - 15.0 || trays == 1);
        prop_assume!(front > depth + 20.0);
        let corr = ["dunkle", "kumar-tiwari", "inclined-enclosure"][correlation];
        let text = format!(
            "cover_tilt_deg = {tilt}\nfront_wall_mm = {front}\ntrays = {trays}\n\
             tray_depth_mm = {depth}\nriser_mm = {riser}\nwetted_risers = {wetted}\n\
             internal_correlation = \"{corr}\""
        );
        let demo = design::DEMO_DESIGN;
        let head = &demo[..demo.find("[[variant]]").unwrap()];
        let full = format!(
            "{head}[[variant]]\nname = \"p\"\nkind = \"stepped\"\nwidth_m = {width}\n\
             length_m = {length}\ncover_azimuth_deg = 180\ncover = \"window-glass-4mm\"\n\
             liner = \"black-epdm\"\n{text}\n"
        );
        let Ok(loaded) = design::parse_design_str(&full, Path::new("p.toml"), &designs_dir())
        else {
            // A design the validator rejects is not a valid design; skip it.
            return Ok(());
        };
        let w = stills::site_weather(&loaded).unwrap();
        let model = stills::build_model(&loaded, &loaded.design.variants[0], &w)
            .unwrap()
            .unwrap();
        let m = stills::run_single_day(model.as_ref(), "p", &w, month, &RunOptions::default())
            .unwrap();
        prop_assert!(m.energy.residual_fraction.abs() < 1e-3);
        prop_assert!(m.l_m2_day.is_finite() && m.l_m2_day >= 0.0);
        prop_assert!(m.l_m2_day <= m.ceiling_l_m2_day);
    }
}
