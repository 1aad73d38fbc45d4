//! The built-in NEC–Omega_ar relationships: one published number per constant, one row per
//! relationship. Where each number was read is in `docs/nec-sources.md`.

use super::{Line, NecForm, NecRelationship, OmegaSpan, ReefKind};

/// Slope of the sediment net calcification of Eyre et al. (2018), mmol CaCO3 m⁻² d⁻¹ per unit
/// Omega_ar, per m² of permeable carbonate sediment: G_sed = 11.51 Omega_ar − 33.683.
///
/// Eyre, Cyronak, Drupp, De Carlo, Sachs & Andersson (2018), "Coral reefs will transition to
/// net dissolving before end of century", Science 359:908–911. Coefficients as carried in the
/// public model code `csiro-coasts/EMS` (`coral_spectral_carb_epi.c`, citing the paper); they
/// reproduce the paper's zero point 2.92 ± 0.16 (abstract) and its 18.1 and 4.3 mmol m⁻² d⁻¹
/// at Omega_ar 4.5 and 3.3 (Scripps summary). Fitted range not verified; the paper states
/// values for Omega_ar 2.55–4.5. Field data: in situ chambers on sediments of five reefs.
pub const EYRE2018_SEDIMENT_SLOPE: f64 = 11.51;

/// Intercept of the Eyre et al. (2018) sediment relationship, mmol CaCO3 m⁻² d⁻¹ (the
/// relationship is G_sed = [`EYRE2018_SEDIMENT_SLOPE`] · Omega_ar − 33.683). Same source.
pub const EYRE2018_SEDIMENT_INTERCEPT: f64 = -33.683;

/// Eyre et al. (2018) model coral calcification, (Omega_ar, mmol CaCO3 m⁻² d⁻¹): 111.4 at the
/// pre-industrial tropical mean Omega_ar ≈ 4.5 and 92.8 at the present 3.3 (Scripps summary
/// of the paper). Per m² of coral, as the paper's 5 % coral / 95 % sediment case implies.
pub const EYRE2018_CORAL_POINTS: [(f64, f64); 2] = [(4.5, 111.4), (3.3, 92.8)];

/// Eyre et al. (2018) model global-average coral reef NEC, (Omega_ar, mmol CaCO3 m⁻² d⁻¹):
/// 210.7 at Omega_ar ≈ 4.5 and 78.5 at 3.3 (Scripps summary of the paper).
pub const EYRE2018_GLOBAL_NEC_POINTS: [(f64, f64); 2] = [(4.5, 210.7), (3.3, 78.5)];

/// Omega_ar at which the One Tree Island reef flat's net calcification reaches zero, "∼ 2.5",
/// from the observed in situ relationship: Shaw, Phinn, Tilbrook & Steven, "Natural in situ
/// relationships suggest coral reef calcium carbonate production will decline with ocean
/// acidification" (abstract; journal and year not verified, recalled as Limnology and
/// Oceanography 2015). Fitted range not verified.
pub const SHAW_ONETREE_ZERO_OMEGA: f64 = 2.5;

/// The span over which Eyre et al. (2018) state values (pre-industrial 4.5 down to 2.55).
const EYRE2018_EVALUATED: OmegaSpan = OmegaSpan::PaperEvaluated { lo: 2.55, hi: 4.5 };

/// The Eyre et al. (2018) sediment line.
pub fn eyre2018_sediment_line() -> Line {
    Line {
        slope: EYRE2018_SEDIMENT_SLOPE,
        intercept: EYRE2018_SEDIMENT_INTERCEPT,
    }
}

/// The line through the two Eyre et al. (2018) coral calcification points (our construction:
/// the paper's equation was not seen).
pub fn eyre2018_coral_line() -> Line {
    let [a, b] = EYRE2018_CORAL_POINTS;
    // The two Omega_ar values differ (4.5 and 3.3), so the line exists; the fallback is never
    // taken.
    Line::through(a, b).unwrap_or(Line {
        slope: 0.0,
        intercept: a.1,
    })
}

/// The line through the two Eyre et al. (2018) global-average NEC points (our construction).
pub fn eyre2018_global_line() -> Line {
    let [a, b] = EYRE2018_GLOBAL_NEC_POINTS;
    // As for the coral line: distinct Omega_ar values.
    Line::through(a, b).unwrap_or(Line {
        slope: 0.0,
        intercept: a.1,
    })
}

const EYRE2018: &str = "Eyre, Cyronak, Drupp, De Carlo, Sachs & Andersson (2018), Coral reefs \
     will transition to net dissolving before end of century, Science 359:908-911";

/// The built-in relationships.
pub fn builtin() -> Vec<NecRelationship> {
    vec![
        NecRelationship {
            id: "eyre2018_sediment",
            name: "Eyre et al. (2018), reef sediments",
            citation: "Eyre, Cyronak, Drupp, De Carlo, Sachs & Andersson (2018), Coral reefs \
                       will transition to net dissolving before end of century, Science \
                       359:908-911; zero point 2.92 +/- 0.16 in the abstract",
            form_text: "G_sed = a x Omega_ar - b (per m2 of carbonate sediment)",
            coefficients: "a = 11.51, b = 33.683 mmol CaCO3 m-2 d-1; zero at Omega_ar 2.93",
            unit: "mmol CaCO3 m-2 d-1",
            omega_span: EYRE2018_EVALUATED,
            temp_range_c: None,
            reef_type: "permeable carbonate reef sediments, in situ chambers at five reefs",
            reef_kind: ReefKind::Sediment,
            construction: "none: the printed coefficients are used as they are",
            verified_from: "coefficients: public model code csiro-coasts/EMS citing the paper; \
                            zero point: the paper's abstract (MEDLINE record); 18.1 and 4.3 at \
                            Omega_ar 4.5 and 3.3: Scripps summary of the paper",
            form: NecForm::Linear {
                line: eyre2018_sediment_line(),
            },
        },
        NecRelationship {
            id: "eyre2018_community",
            name: "Eyre et al. (2018), coral and sediment by cover",
            citation: EYRE2018,
            form_text: "NEC = c x G_coral(Omega_ar) + (1 - c) x G_sed(Omega_ar), c = live \
                        coral cover",
            coefficients: "G_coral through 111.4 and 92.8 mmol m-2 d-1 at Omega_ar 4.5 and 3.3 \
                           (slope 15.5, intercept 41.65); G_sed = 11.51 Omega_ar - 33.683",
            unit: "mmol CaCO3 m-2 d-1",
            omega_span: EYRE2018_EVALUATED,
            temp_range_c: None,
            reef_type: "a reef of live coral and carbonate sediment (the paper's global model)",
            reef_kind: ReefKind::CoralAndSediment,
            construction: "ours: the coral line through the paper's two model points, the \
                           non-coral bottom taken as sediment; checked against the paper's \
                           zero at Omega_ar 2.55 for 5 % coral cover",
            verified_from: "Scripps summary of the paper (coral points, the 5 % cover case); \
                            sediment line as in eyre2018_sediment",
            form: NecForm::CoverWeighted {
                coral: eyre2018_coral_line(),
                sediment: eyre2018_sediment_line(),
            },
        },
        NecRelationship {
            id: "eyre2018_global",
            name: "Eyre et al. (2018), global-average reef",
            citation: EYRE2018,
            form_text: "NEC = s x Omega_ar + i",
            coefficients: "through 210.7 and 78.5 mmol m-2 d-1 at Omega_ar 4.5 and 3.3 (s = \
                           110.17, i = -285.05); zero at Omega_ar 2.59",
            unit: "mmol CaCO3 m-2 d-1",
            omega_span: EYRE2018_EVALUATED,
            temp_range_c: None,
            reef_type: "global average over reef types (not any one reef)",
            reef_kind: ReefKind::GlobalAverage,
            construction: "ours: the line through the paper's two model points; checked \
                           against the paper's Omega_ar 2.62 where sediment dissolution \
                           exceeds this NEC",
            verified_from: "Scripps summary of the paper",
            form: NecForm::Linear {
                line: eyre2018_global_line(),
            },
        },
        NecRelationship {
            id: "shaw_onetree",
            name: "Shaw et al., One Tree Island reef flat",
            citation: "Shaw, Phinn, Tilbrook & Steven, Natural in situ relationships suggest \
                       coral reef calcium carbonate production will decline with ocean \
                       acidification (abstract: net calcification zero at Omega_ar ~2.5)",
            form_text: "NEC = s x (Omega_ar - 2.5)",
            coefficients: "zero at Omega_ar 2.5 (published); slope s from the site's own \
                           measured NEC (not published)",
            unit: "mmol CaCO3 m-2 d-1",
            omega_span: OmegaSpan::NotVerified,
            temp_range_c: None,
            reef_type: "reef flat, One Tree Island, southern Great Barrier Reef",
            reef_kind: ReefKind::ReefFlat,
            construction: "ours: a straight line through the published zero point with the \
                           slope from the site's measured NEC; without one, only the zero \
                           point is used",
            verified_from: "the paper's abstract, University of Tasmania repository record",
            form: NecForm::ZeroPoint {
                omega_zero: SHAW_ONETREE_ZERO_OMEGA,
            },
        },
    ]
}
