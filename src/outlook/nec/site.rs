//! Everything the NEC outlook needs from one site, gathered once: the relationships, the
//! site's coral cover, its measured NEC (when given) and the row closest to its habitat.

use serde::Serialize;

use super::{
    HabitatChoice, NecModel, NecModelError, NecRelationship, SiteNec, builtin, closest_to_habitat,
};

/// One member's NEC and its paired change (mmol CaCO3 m⁻² d⁻¹), or why there is none.
pub type MemberNec = Result<(f64, f64), NecModelError>;

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

    /// Per relationship, the Omega_ar at which NEC = 0 at this site's cover. Anchoring scales
    /// a row and keeps this point, and NEC rises with Omega_ar in every row, so "NEC ≤ 0" is
    /// "Omega_ar ≤ this level": the first year of net dissolution is the first year Omega_ar
    /// falls to it (`None` where a cover-weighted row has no cover, or a line never crosses).
    pub fn zero_omegas(&self) -> Vec<(&'static str, Option<f64>)> {
        self.relationships
            .iter()
            .map(|r| (r.id, r.zero_omega(self.cover).ok().flatten()))
            .collect()
    }

    /// One member's NEC in a year and its paired change against the same member's present
    /// state, per relationship: `(nec, nec − nec_present)`, mmol CaCO3 m⁻² d⁻¹, or why not.
    pub fn member_values(
        &self,
        (omega, temp_c): (f64, f64),
        (omega_present, temp_present): (f64, f64),
    ) -> Vec<(&'static str, MemberNec)> {
        self.models(omega_present)
            .into_iter()
            .map(|(id, m)| {
                let v = m.map(|m| {
                    let now = m.nec(omega, temp_c);
                    (now, now - m.nec(omega_present, temp_present))
                });
                (id, v)
            })
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
        // Paired: the member's change is zero when its state has not moved (steady
        // atmosphere, warming off), and negative when Omega_ar falls.
        for (id, v) in s.member_values((3.1, 27.0), (3.1, 27.0)) {
            let (now, change) = v.unwrap();
            assert!((now - 60.0).abs() < 1e-9 && change == 0.0, "{id}");
        }
        for (id, v) in s.member_values((2.8, 27.5), (3.1, 27.0)) {
            assert!(v.unwrap().1 < 0.0, "{id}");
        }
        let s = NecSettings::for_site(None, None, None);
        // Without cover or anchor: the sediment, global and reef-flat zero points only.
        let zeros: Vec<_> = s.zero_omegas().into_iter().filter_map(|(_, z)| z).collect();
        assert_eq!(zeros.len(), 3);
        let models = s.models(3.1);
        let shaw = models.iter().find(|(id, _)| *id == "shaw_onetree").unwrap();
        assert_eq!(
            shaw.1,
            Err(NecModelError::Unavailable(NecUnavailable::NeedsAnchor))
        );
    }
}
