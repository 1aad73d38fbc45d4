//! Everything the NEC outlook needs from one site, gathered once: the relationships, the
//! site's coral cover, its measured NEC (when given) and the row closest to its habitat.

use serde::Serialize;

use super::{
    HabitatChoice, NecModel, NecModelError, NecRelationship, SiteNec, builtin, closest_to_habitat,
};

/// The NEC settings of a site.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct NecSettings {
    pub relationships: Vec<NecRelationship>,
    /// Live coral cover, 0–1 (`[baseline] coral_cover_fraction`).
    pub cover: Option<f64>,
    /// The site's measured NEC (`[calcification.measured_nec]`).
    pub measured: Option<SiteNec>,
    /// The row closest to the site's habitat, and why.
    pub closest: HabitatChoice,
}

impl NecSettings {
    /// Settings for a site with this `habitat` text, coral `cover` and measured NEC.
    pub fn for_site(habitat: Option<&str>, cover: Option<f64>, measured: Option<SiteNec>) -> Self {
        NecSettings {
            relationships: builtin(),
            cover,
            closest: closest_to_habitat(habitat, cover),
            measured,
        }
    }

    /// One model per relationship, anchored to the measured NEC when the site gives one. The
    /// anchor's Omega_ar is the one the site file gives with the measurement, or else
    /// `omega_present` (for paired members: the member's own present-day Omega_ar).
    pub fn models(
        &self,
        omega_present: f64,
    ) -> Vec<(&'static str, Result<NecModel, NecModelError>)> {
        let anchor = self
            .measured
            .as_ref()
            .map(|m| (m, m.omega_ar.unwrap_or(omega_present)));
        self.relationships
            .iter()
            .map(|r| (r.id, NecModel::for_site(r, self.cover, anchor)))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::outlook::nec::{NecMethod, NecUnavailable, NecUnit};

    /// With a measured NEC at a stated Omega_ar every row reproduces it there, whatever the
    /// member's present state; without one, the zero-point row says it needs the anchor.
    #[test]
    fn models_anchor_at_the_stated_omega_or_the_present_one() {
        let measured = SiteNec {
            mmol_m2_d: 60.0,
            unit_written: NecUnit::MmolPerM2PerDay,
            method: NecMethod::AlkalinityAnomaly,
            source: "invented".into(),
            omega_ar: Some(3.5),
        };
        let s = NecSettings::for_site(Some("reef flat"), Some(0.25), Some(measured.clone()));
        assert_eq!(s.closest.relationship, "shaw_onetree");
        for (id, m) in s.models(3.1) {
            let m = m.unwrap_or_else(|e| panic!("{id}: {e}"));
            assert!((m.nec(3.5, 27.0) - 60.0).abs() < 1e-9, "{id}");
        }
        let mut present = measured;
        present.omega_ar = None;
        let s = NecSettings::for_site(None, Some(0.25), Some(present));
        for (id, m) in s.models(3.1) {
            assert!((m.unwrap().nec(3.1, 27.0) - 60.0).abs() < 1e-9, "{id}");
        }
        let s = NecSettings::for_site(None, None, None);
        let models = s.models(3.1);
        let shaw = models.iter().find(|(id, _)| *id == "shaw_onetree").unwrap();
        assert_eq!(
            shaw.1,
            Err(NecModelError::Unavailable(NecUnavailable::NeedsAnchor))
        );
    }
}
