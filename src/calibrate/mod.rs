//! Calibration of a still model to a pilot still's measurements, and validation of the
//! default model against published devices.
//!
//! * [`measured`] reads a pilot's measured CSV onto the model's hourly grid (gaps, negative
//!   distillate, counter resets and irregular steps handled as documented there);
//! * [`fit`] fits calibration factors by weighted least squares (Levenberg–Marquardt) with
//!   95 % confidence intervals, goodness of fit and identifiability warnings
//!   ([`CalibrationReport`]);
//! * [`report`] renders the report as text and draws the parity chart and time-series
//!   overlay as SVG;
//! * [`write`] writes the fitted factors into a copy of the design file, keeping its text;
//! * [`validation`] lists the published devices the default model is checked against and
//!   the model-form uncertainty their spread gives ([`MODEL_FORM_RELATIVE_SD`]).
//!
//! The loop closes outside the pipeline: the factors become design values
//! (`[variant.calibration]`) and every later run (`compare`, `size`, `report`) builds the
//! calibrated model from them. See `docs/calibrate.md`.

pub mod fit;
pub mod measured;
pub mod report;
pub mod validation;
pub mod write;

pub use fit::{
    CalibrationReport, Calibrator, FitParam, FitSettings, FitStatistic, FittedParameter,
    OverlayPoint, Quantity, calibrate, calibrate_with, calibration_run_options, fit_statistics,
    student_t_975,
};
pub use measured::{
    MeasuredHour, MeasuredRecord, MeasuredSummary, load_measured, parse_measured_bytes,
};
pub use validation::{MODEL_FORM_RELATIVE_SD, PublishedDevice, model_form_relative_sd};
pub use write::{calibrated_design_text, write_calibrated_design};
