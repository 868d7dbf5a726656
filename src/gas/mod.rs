//! Gas properties: composition, moisture, psychrometrics and density.
//!
//! Owns the pure functions and validated types the flow computation calls to turn a gas
//! description into a density: dry composition and molar mass ([`composition`], [`molar_mass`]),
//! stack moisture by EPA Method 4 ([`method4`]) capped at saturation ([`moisture`]), humid air by ASHRAE Fundamentals ch. 1
//! ([`saturation`], [`psychro`]) and the ideal-gas density ([`density`]). SI units inside; every
//! name carries its unit. It must not read files, print, look at the clock, or choose a convention:
//! the caller says which rule (EPA coefficients or exact masses, 18.0 or 18.0153 for water) applies.

pub mod composition;
pub mod density;
pub mod error;
pub mod method4;
pub mod moisture;
pub mod molar_mass;
pub mod psychro;
#[cfg(test)]
mod psychrolib_reference;
pub mod saturation;

pub use composition::{DryComposition, DryMolarMass, DryMolarMassRule};
pub use density::{absolute_pressure_pa, ideal_gas_density_kg_m3};
pub use error::GasError;
pub use method4::{ImpingerGain, MeterPressure, Method4Form, Method4Result, Method4Train};
pub use moisture::{limit_to_saturation, MoistureBasis, StackMoisture};
pub use molar_mass::{wet_molar_mass, MolarMass, WaterMolarMass};
pub use psychro::HumiditySpec;
