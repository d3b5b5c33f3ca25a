//! pH rules for reversed phase by ionisable class (used by `lc::choose_ph`): the limits a list
//! of analytes sets on the mobile-phase pH, and the reasons stated for the pH chosen.

use super::profile::AnalyteProfile;
use crate::phase::PhaseMode;
use crate::report::advice::Reason;
use crate::structure::ionisable::SiteKind;

/// The pH limits the ionisable classes of a list set in reversed phase (common practice, no
/// source): bases with pKa above 8 at pH 2-3.5 (protonated analytes and neutral silanols) or at
/// pH 9.5 or above on a phase rated for it (neutral bases), never in between, where both the
/// bases and the silanols are ionised and peaks tail (rule:ph-bases-low-or-high); acids at
/// least 1.5 units below the lowest acid pKa, so that they are neutral and retained
/// (rule:ph-acids-below-pka).
#[derive(Debug, Clone, PartialEq)]
pub struct PhLimits {
    /// Strong bases (name, pKa) that forbid the middle band.
    pub bases: Vec<(String, f64)>,
    /// The lowest acid pKa and its analyte.
    pub lowest_acid: Option<(String, f64)>,
}

/// Bases above this pKa forbid the middle pH band on silica phases.
pub const STRONG_BASE_PKA: f64 = 8.0;
/// The middle band forbidden for strong bases: above this low edge...
pub const BASE_LOW_PH_MAX: f64 = 3.5;
/// ...and below this high edge.
pub const BASE_HIGH_PH_MIN: f64 = 9.5;
/// pH at least this far below the lowest acid pKa.
pub const ACID_UNITS_BELOW: f64 = 1.5;

impl PhLimits {
    /// Whether a pH meets every limit.
    pub fn allows(&self, ph: f64) -> bool {
        let bases_ok = self.bases.is_empty() || ph <= BASE_LOW_PH_MAX || ph >= BASE_HIGH_PH_MIN;
        let acids_ok = self
            .lowest_acid
            .as_ref()
            .is_none_or(|(_, k)| ph <= k - ACID_UNITS_BELOW);
        bases_ok && acids_ok
    }

    /// How far a pH is from meeting the limits, in pH units (0 when it meets them): used to
    /// take the nearest buffer when none meets them.
    pub fn violation(&self, ph: f64) -> f64 {
        let base = if !self.bases.is_empty() && ph > BASE_LOW_PH_MAX && ph < BASE_HIGH_PH_MIN {
            (ph - BASE_LOW_PH_MAX).min(BASE_HIGH_PH_MIN - ph)
        } else {
            0.0
        };
        let acid = self
            .lowest_acid
            .as_ref()
            .map_or(0.0, |(_, k)| (ph - (k - ACID_UNITS_BELOW)).max(0.0));
        base + acid
    }

    /// The reasons for a chosen pH.
    pub fn reasons(&self, ph: f64, met: bool, lo: f64, hi: f64) -> Vec<Reason> {
        let mut out = Vec::new();
        if !self.bases.is_empty() {
            let names: Vec<String> = self
                .bases
                .iter()
                .map(|(n, k)| format!("{n} (pKa {k:.1})"))
                .collect();
            out.push(Reason {
                source: "rule:ph-bases-low-or-high".into(),
                text: format!(
                    "bases with pKa above {STRONG_BASE_PKA:.0}: {}; run at pH 2-{BASE_LOW_PH_MAX} on silica phases (bases protonated, silanols neutral) or at pH {BASE_HIGH_PH_MIN} or above on a high-pH-stable phase (bases neutral), never in between, where ionised bases meet ionised silanols and tail{} (common practice, no source)",
                    names.join(", "),
                    if met {
                        format!("; pH {ph:.1} chosen")
                    } else {
                        format!("; no buffer meets this inside the phase's range {lo:.0}-{hi:.0}, so pH {ph:.1} is a compromise: prefer another phase")
                    }
                ),
                weight: None,
            });
        }
        if let Some((n, k)) = &self.lowest_acid {
            out.push(Reason {
                source: "rule:ph-acids-below-pka".into(),
                text: format!(
                    "lowest acid pKa {k:.1} ({n}): pH at most {:.1} keeps the acids neutral and retained{} (common practice, no source)",
                    k - ACID_UNITS_BELOW,
                    if met {
                        format!("; pH {ph:.1} chosen")
                    } else {
                        format!("; no buffer reaches it inside the phase's range {lo:.0}-{hi:.0}: pH {ph:.1} is the nearest, and the acids are partly ionised there")
                    }
                ),
                weight: None,
            });
        }
        out
    }
}

/// The pH limits of a list (reversed phase only; HILIC and the other modes have none here).
pub fn ph_limits(profiles: &[AnalyteProfile], mode: PhaseMode) -> PhLimits {
    let mut limits = PhLimits {
        bases: Vec::new(),
        lowest_acid: None,
    };
    if mode != PhaseMode::Rp {
        return limits;
    }
    for p in profiles {
        for s in &p.sites {
            let Some(k) = s.pka else { continue };
            match s.kind {
                SiteKind::Base
                    if k > STRONG_BASE_PKA && !limits.bases.iter().any(|(n, _)| n == p.name()) =>
                {
                    limits.bases.push((p.name().to_string(), k));
                }
                // acids that ionise in the usable range; weaker ones (phenols, pKa 8-10) are
                // neutral at every pH the low-pH choices give
                SiteKind::Acid
                    if k < 7.0 && limits.lowest_acid.as_ref().is_none_or(|(_, m)| k < *m) =>
                {
                    limits.lowest_acid = Some((p.name().to_string(), k));
                }
                _ => {}
            }
        }
    }
    limits
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::advisor::profile::test_profile;

    // Expectations: common practice, no source.
    #[test]
    fn strong_bases_forbid_the_middle_band_on_every_base_class() {
        // a tertiary amine (tricyclic), a secondary amine (beta-blocker), a primary amine
        for (name, smi) in [
            ("amitriptyline", "CN(C)CCC=C1c2ccccc2CCc2ccccc12"),
            ("propranolol", "CC(C)NCC(O)COc1cccc2ccccc12"),
            ("amphetamine", "CC(N)Cc1ccccc1"),
        ] {
            let l = ph_limits(&[test_profile(name, smi)], PhaseMode::Rp);
            assert_eq!(l.bases.len(), 1, "{name}");
            assert!(l.allows(2.7) && l.allows(10.0), "{name}");
            for ph in [4.8, 6.8, 8.0] {
                assert!(!l.allows(ph), "{name} at pH {ph}");
            }
        }
    }

    #[test]
    fn acids_need_a_ph_well_below_their_pka() {
        let l = ph_limits(
            &[test_profile("ibuprofen", "CC(C)Cc1ccc(cc1)C(C)C(=O)O")],
            PhaseMode::Rp,
        );
        let (_, k) = l.lowest_acid.clone().expect("an acid");
        assert!(l.allows(k - 1.6) && !l.allows(k - 1.0));
        // a phenol (pKa about 10) sets no limit; HILIC has none here
        assert!(
            ph_limits(&[test_profile("phenol", "Oc1ccccc1")], PhaseMode::Rp)
                .lowest_acid
                .is_none()
        );
        assert!(
            ph_limits(
                &[test_profile("ibuprofen", "CC(C)Cc1ccc(cc1)C(C)C(=O)O")],
                PhaseMode::Hilic
            )
            .allows(6.8)
        );
    }
}
