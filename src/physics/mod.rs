//! Pure physical functions, one module per physical concept, one correlation per function,
//! each citing its source and equation and tested against a published or reference value.
//!
//! Units ride in names: `_k` kelvin, `_c` degrees Celsius, `_pa` pascal, `_w_m2` W m⁻²,
//! `_j_kg` J kg⁻¹, `_kg_m2_s` kg m⁻² s⁻¹, `_deg` degrees, `_rad` radians, `_m` metres.

pub mod constants;
pub mod heat_transfer;
pub mod humid_air;
pub mod irradiance;
pub mod optics;
pub mod seawater;
pub mod sky;
pub mod sun;
pub mod water;
