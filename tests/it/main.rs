//! One integration-test binary (one link step) with a module per area.

mod calibrate;
mod check;
mod cli;
mod climate;
mod compare;
mod compare_size;
mod compare_sweep;
mod compare_uncertainty;
mod currency;
mod design;
mod economics;
mod economics_operator;
mod network;
mod operation;
mod output_contract;
mod physics_sun;
mod physics_transfer;
mod physics_water;
mod report;
mod stills;
mod stills_double_slope;
mod stills_multi_effect;
mod stills_stepped;
mod stills_wick;
mod workshop;
