//! Site climate: hourly weather from monthly means, weather files and stochastic sequences (being written).
