//! Physical constants used across the physics modules [SI].

/// Stefan–Boltzmann constant σ [W m⁻² K⁻⁴] (CODATA 2018, exact since the 2019 SI).
pub const STEFAN_BOLTZMANN_W_M2_K4: f64 = 5.670_374_419e-8;
/// Offset between the Celsius and kelvin scales [K].
pub const ZERO_CELSIUS_K: f64 = 273.15;
/// Solar constant G_sc [W m⁻²] as used by Duffie & Beckman (2013), §1.2 (1367 W m⁻²).
pub const SOLAR_CONSTANT_W_M2: f64 = 1367.0;
/// Standard atmosphere [Pa].
pub const STANDARD_PRESSURE_PA: f64 = 101_325.0;
/// Molar gas constant R [J mol⁻¹ K⁻¹] (CODATA 2018, exact).
pub const GAS_CONSTANT_J_MOL_K: f64 = 8.314_462_618;
/// Molar mass of water [kg mol⁻¹] (IAPWS-95: 18.015268 g mol⁻¹).
pub const MOLAR_MASS_WATER_KG_MOL: f64 = 0.018_015_268;
/// Molar mass of dry air [kg mol⁻¹] (Lemmon et al. 2000: 28.9586 g mol⁻¹).
pub const MOLAR_MASS_AIR_KG_MOL: f64 = 0.028_958_6;
/// Standard gravity [m s⁻²].
pub const GRAVITY_M_S2: f64 = 9.806_65;
