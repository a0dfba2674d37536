//! The library look-ups every still builder makes, with errors that name the variant.
//!
//! A validated design only names materials that exist and have the right role, so a failure
//! here means a library item lacks the physical properties its use needs: a model problem
//! ([`Error::Model`]), reported with the variant, the part and the item.

use crate::design::{CoverProps, Layer, Library, PlateProps, SurfaceProps, Variant, WickProps};
use crate::error::Error;

/// The materials library seen from one variant.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Materials<'a> {
    variant: &'a str,
    lib: &'a Library,
    /// `[variant.calibration] cover_emissivity`, which replaces every cover's own.
    cover_emissivity: Option<f64>,
}

impl<'a> Materials<'a> {
    /// Look-ups for `variant` in `lib`.
    pub(crate) fn new(variant: &'a Variant, lib: &'a Library) -> Self {
        Materials {
            variant: variant.name.as_str(),
            lib,
            cover_emissivity: variant
                .calibration
                .as_ref()
                .and_then(|c| c.cover_emissivity),
        }
    }

    fn missing(&self, part: &str, id: &str) -> Error {
        Error::Model {
            variant: self.variant.to_owned(),
            at: String::new(),
            reason: format!(
                "{part} (`{id}`) has no properties for this use in the materials library"
            ),
        }
    }

    /// Optical and thermal properties of a cover or glazing, with the long-wave emissivity
    /// replaced by the variant's calibrated `cover_emissivity` when it has one.
    pub(crate) fn cover(&self, part: &str, id: &str) -> Result<CoverProps, Error> {
        let mut props = self
            .lib
            .get(id)
            .and_then(|i| i.cover)
            .ok_or_else(|| self.missing(part, id))?;
        if let Some(e) = self.cover_emissivity {
            props.emissivity = e;
        }
        Ok(props)
    }

    /// Surface properties of a liner, paint or absorber.
    pub(crate) fn surface(&self, part: &str, id: &str) -> Result<SurfaceProps, Error> {
        self.lib
            .get(id)
            .and_then(|i| i.surface().copied())
            .ok_or_else(|| self.missing(part, id))
    }

    /// Properties of a wick cloth.
    pub(crate) fn wick(&self, part: &str, id: &str) -> Result<WickProps, Error> {
        self.lib
            .get(id)
            .and_then(|i| i.wick)
            .ok_or_else(|| self.missing(part, id))
    }

    /// Properties of a stage plate.
    pub(crate) fn plate(&self, part: &str, id: &str) -> Result<PlateProps, Error> {
        self.lib
            .get(id)
            .and_then(|i| i.plate)
            .ok_or_else(|| self.missing(part, id))
    }

    /// Insulation layers as (thickness [m], conductivity [W m⁻¹ K⁻¹]), outermost last;
    /// `field` names the design field in errors.
    pub(crate) fn layers(&self, layers: &[Layer], field: &str) -> Result<Vec<(f64, f64)>, Error> {
        layers
            .iter()
            .map(|l| {
                self.lib
                    .get(&l.material)
                    .and_then(|i| i.insulation.as_ref())
                    .map(|p| (l.thickness_mm / 1000.0, p.conductivity_w_m_k))
                    .ok_or_else(|| self.missing(field, &l.material))
            })
            .collect()
    }
}
