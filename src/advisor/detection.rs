//! Detection: which detector works with which separation mode, and the detector chosen from
//! the analytes' structures when the user names none (rule `rule:detector-from-structure`;
//! common practice, no source).
//!
//! LC: UV absorbance when every analyte has a UV chromophore (wavelength from the weakest
//! chromophore class, so that every analyte absorbs); otherwise mass spectrometry when every
//! analyte ionises, else charged-aerosol detection (refractive index for isocratic runs, or a
//! derivatisation, named as options). GC: flame ionisation, electron capture when most analytes
//! are polyhalogenated, mass spectrometry for confirmation. IC: suppressed conductivity.

use super::Detector;
use super::profile::AnalyteProfile;
use crate::phase::PhaseMode;
use crate::report::advice::Reason;
use crate::structure::chromophore::ChromophoreClass;

/// Whether a named UV detector still admits GC (then GC chooses its own detector and says UV
/// does not apply). It was `true` while the command line's default was `uv:220`; with the
/// default `auto` a UV detector with GC is refused like every other impossible pair.
pub const UV_NAMED_ALLOWS_GC: bool = false;

/// Modes a detector works with; `None` when no detector was named (every mode).
pub fn compatible_modes(d: Detector) -> Option<&'static [PhaseMode]> {
    use PhaseMode::*;
    Some(match d {
        Detector::FromStructure => return None,
        Detector::Ms => &[Rp, Hilic, Gc, IcAnion, IcCation, IonExclusion],
        Detector::Uv(_) if UV_NAMED_ALLOWS_GC => &[Rp, Hilic, IonExclusion, IcAnion, IcCation, Gc],
        // direct UV sees UV-absorbing ions (nitrate, nitrite, bromide) and organic acids
        Detector::Uv(_) => &[Rp, Hilic, IonExclusion, IcAnion, IcCation],
        Detector::Fluorescence | Detector::Elsd | Detector::ChargedAerosol => &[Rp, Hilic],
        Detector::RefractiveIndex => &[Rp, Hilic, IonExclusion],
        Detector::PulsedAmperometry => &[IcAnion, Rp],
        Detector::Fid | Detector::Ecd => &[Gc],
        Detector::Conductivity => &[IcAnion, IcCation, IonExclusion],
    })
}

/// Check that a named detector works with a mode.
///
/// # Errors
/// A message naming the detector and the mode, and the modes the detector works with.
pub fn check_pair(d: Detector, mode: PhaseMode) -> Result<(), String> {
    match compatible_modes(d) {
        Some(ok) if !ok.contains(&mode) => Err(format!(
            "detector {} cannot be used with {}: it works with {}",
            d.describe(),
            mode_words(mode),
            ok.iter()
                .map(|m| mode_words(*m))
                .collect::<Vec<_>>()
                .join(", ")
        )),
        _ => Ok(()),
    }
}

/// A mode in plain words.
pub fn mode_words(m: PhaseMode) -> &'static str {
    match m {
        PhaseMode::Rp => "reversed-phase LC",
        PhaseMode::Hilic => "HILIC",
        PhaseMode::Gc => "GC",
        PhaseMode::IcAnion => "anion-exchange IC",
        PhaseMode::IcCation => "cation-exchange IC",
        PhaseMode::IonExclusion => "ion exclusion",
    }
}

/// Whether an analyte carries a charge somewhere between pH 1 and 13 (electrospray sees it):
/// an acid below pKa 13, a base above pKa 1, or a permanent charge.
fn ionises(p: &AnalyteProfile) -> bool {
    use crate::structure::ionisable::SiteKind;
    p.inorganic_ion
        || p.sites.iter().any(|s| match s.kind {
            SiteKind::Acid => s.pka.is_some_and(|k| k < 13.0),
            SiteKind::Base => s.pka.is_some_and(|k| k > 1.0),
            SiteKind::PermanentAnion | SiteKind::PermanentCation => true,
        })
}

/// The LC detector: the user's, with a warning reason when some analytes have no chromophore
/// for UV, or one chosen from structure.
pub fn for_lc(profiles: &[AnalyteProfile], named: Detector) -> (Detector, Reason) {
    // analytes without a structure have an unknown chromophore: the choice rests on the
    // others, and the reason names them (unknown is not taken as "no chromophore" either)
    let unknown: Vec<&str> = profiles
        .iter()
        .filter(|p| p.chromophore.is_none())
        .map(AnalyteProfile::name)
        .collect();
    let known: Vec<&AnalyteProfile> = profiles
        .iter()
        .filter(|p| p.chromophore.is_some())
        .collect();
    let without: Vec<&str> = known
        .iter()
        .filter(|p| !p.chromophore.is_some_and(ChromophoreClass::uv_suitable))
        .map(|p| p.name())
        .collect();
    let unknown_note = if unknown.is_empty() {
        String::new()
    } else {
        format!(
            "; chromophore unknown for {} (no structure read): check that the detector sees {}",
            unknown.join(", "),
            if unknown.len() == 1 { "it" } else { "them" }
        )
    };
    let rule = |text: String| Reason {
        source: "rule:detector-from-structure".into(),
        text,
        weight: None,
    };
    if named != Detector::FromStructure {
        let text = match named {
            Detector::Uv(nm) if !without.is_empty() => format!(
                "{} named by the user, but {} ha{} no UV chromophore (or none known): not seen, or seen only weakly, at {nm:.0} nm; use mass spectrometry, charged-aerosol or refractive-index detection, or derivatise",
                named.describe(),
                without.join(", "),
                if without.len() == 1 { "s" } else { "ve" }
            ),
            _ => format!("{} named by the user", named.describe()),
        };
        return (named, rule(format!("{text}{unknown_note}")));
    }
    if without.is_empty() {
        // the weakest chromophore sets the wavelength, so that every analyte absorbs
        let weakest = profiles
            .iter()
            .filter_map(|p| p.chromophore)
            .min()
            .unwrap_or(ChromophoreClass::Benzenoid);
        let nm = profiles
            .iter()
            .filter_map(|p| p.chromophore.and_then(ChromophoreClass::wavelength_nm))
            .fold(f64::INFINITY, f64::min);
        let nm = if nm.is_finite() { nm } else { 220.0 };
        return (
            Detector::Uv(nm),
            rule(format!(
                "no detector named: UV absorbance at {nm:.0} nm, chosen from structure: every analyte has a UV chromophore, the weakest being {} (common practice, no source){unknown_note}",
                weakest.describe()
            )),
        );
    }
    // semivolatile analytes without a chromophore are lost by aerosol detectors: MS
    let volatile: Vec<&str> = known
        .iter()
        .filter(|p| !p.chromophore.is_some_and(ChromophoreClass::uv_suitable))
        .filter(|p| p.tb_k.is_some_and(|(t, _)| t < AEROSOL_MIN_TB_K))
        .map(|p| p.name())
        .collect();
    if !volatile.is_empty() && !known.iter().all(|p| ionises(p)) {
        return (
            Detector::Ms,
            rule(format!(
                "no detector named: {} ha{} no UV chromophore and {} boil{} below about {AEROSOL_MIN_TB_K:.0} K, so an aerosol detector would lose {} with the eluent; mass spectrometry (atmospheric-pressure chemical ionisation, or electrospray with ammonium or sodium adducts for neutral analytes; volatile buffer) is chosen; a derivatisation is the alternative (common practice, no source){unknown_note}",
                without.join(", "),
                if without.len() == 1 { "s" } else { "ve" },
                volatile.join(", "),
                if volatile.len() == 1 { "s" } else { "" },
                if volatile.len() == 1 { "it" } else { "them" }
            )),
        );
    }
    if known.iter().all(|p| ionises(p)) {
        (
            Detector::Ms,
            rule(format!(
                "no detector named: {} ha{} no UV chromophore, and every analyte ionises, so mass spectrometry (electrospray, volatile buffer) is chosen; charged-aerosol detection or a derivatisation are the alternatives (common practice, no source){unknown_note}",
                without.join(", "),
                if without.len() == 1 { "s" } else { "ve" }
            )),
        )
    } else {
        (
            Detector::ChargedAerosol,
            rule(format!(
                "no detector named: {} ha{} no UV chromophore and not every analyte ionises, so a charged-aerosol detector (volatile buffer; non-volatile analytes) is chosen; evaporative light scattering, refractive index (isocratic only), mass spectrometry or a derivatisation are the alternatives (common practice, no source){unknown_note}",
                without.join(", "),
                if without.len() == 1 { "s" } else { "ve" }
            )),
        )
    }
}

/// Boiling point above which an analyte counts as semivolatile for detection: a charged-aerosol
/// detector loses analytes more volatile than this with the evaporated eluent, and two Cl/Br
/// atoms on such an analyte (halogenated pesticides) are enough for electron capture
/// (common practice, no source).
const SEMIVOLATILE_TB_K: f64 = 450.0;

/// Boiling point below which a charged-aerosol (or light-scattering) detector is not chosen:
/// the analyte evaporates with the eluent in the detector's drying step (common practice,
/// no source; the detector needs analytes clearly less volatile than the mobile phase).
const AEROSOL_MIN_TB_K: f64 = 600.0;

/// Electron-capturing groups of an analyte: each chlorine, bromine or iodine atom, each nitro
/// group, and each three fluorine atoms (a trifluoromethyl group captures about as one
/// chlorine does; fluorine alone captures weakly). Common practice, no source.
fn cl_br(p: &AnalyteProfile) -> usize {
    p.estimate.as_ref().map_or(0, |e| {
        let atoms = &e.graph.atoms;
        let heavy = atoms
            .iter()
            .filter(|a| matches!(a.atomic_number, 17 | 35 | 53))
            .count();
        let fluorine = atoms.iter().filter(|a| a.atomic_number == 9).count();
        // a nitro group: N bonded to two O, one of them charged or both double-bonded
        let nitro = (0..atoms.len())
            .filter(|&i| atoms[i].atomic_number == 7)
            .filter(|&i| {
                e.graph
                    .bonds
                    .iter()
                    .filter(|b| b.a == i || b.b == i)
                    .filter(|b| atoms[if b.a == i { b.b } else { b.a }].atomic_number == 8)
                    .count()
                    >= 2
            })
            .count();
        heavy + nitro + fluorine / 3
    })
}

/// The GC detector in plain words, with its reason: the user's (FID, ECD or MS), else electron
/// capture when at least half the analytes carry three or more electron-capturing groups (two on a semivolatile analyte), else a phosphorus-selective detector or MS when half contain phosphorus, else flame
/// ionisation; mass spectrometry named for confirmation. Electron-capturing groups are
/// counted as in `cl_br` (each Cl, Br, I, nitro group, or three F).
pub fn for_gc(profiles: &[AnalyteProfile], named: Detector) -> (String, Reason) {
    // three or more Cl/Br atoms, or two on a semivolatile analyte (boiling above 450 K:
    // halogenated pesticides such as pyrethroids, not dichlorinated solvents, which labs run
    // at levels flame ionisation sees)
    let poly = profiles
        .iter()
        .filter(|p| {
            cl_br(p) >= 3 || (cl_br(p) >= 2 && p.tb_k.is_some_and(|(t, _)| t > SEMIVOLATILE_TB_K))
        })
        .count();
    let phosphorus = profiles
        .iter()
        .filter(|p| {
            p.estimate
                .as_ref()
                .is_some_and(|e| e.graph.atoms.iter().any(|a| a.atomic_number == 15))
        })
        .count();
    let rule = |text: String| Reason {
        source: "rule:detector-from-structure".into(),
        text,
        weight: None,
    };
    match named {
        Detector::Ecd => {
            let blind: Vec<&str> = profiles
                .iter()
                .filter(|p| p.halogens() == 0)
                .map(AnalyteProfile::name)
                .collect();
            let text = if blind.is_empty() {
                "electron capture named by the user".to_string()
            } else {
                format!(
                    "electron capture named by the user, but {} carr{} no halogen: electron capture responds to halogenated, nitro and conjugated carbonyl compounds (acylation with a fluorinated anhydride gives a response)",
                    blind.join(", "),
                    if blind.len() == 1 { "ies" } else { "y" }
                )
            };
            ("electron capture (halogenated analytes), 300 °C".into(), rule(text))
        }
        Detector::Ms => (
            "mass spectrometry (electron ionisation, scan 35-350 m/z)".into(),
            rule("mass spectrometry named by the user".into()),
        ),
        Detector::Fid => (
            "flame ionisation, 280 °C".into(),
            rule("flame ionisation named by the user".into()),
        ),
        Detector::Uv(_) => {
            let (text, reason) = for_gc(profiles, Detector::FromStructure);
            (
                text,
                rule(format!(
                    "a UV detector was named, which GC does not use; {}",
                    reason.text
                )),
            )
        }
        _ if 2 * poly >= profiles.len().max(1) => (
            "electron capture (halogenated or nitro analytes), 300 °C; confirm on a second column of another polarity or by mass spectrometry".into(),
            rule(format!(
                "no detector named: {poly} of {} analytes carry three or more electron-capturing groups (Cl, Br, I, nitro, or three F; two on a semivolatile analyte), so electron capture (selective and sensitive for them) is chosen; mass spectrometry confirms identity (common practice, no source)",
                profiles.len()
            )),
        ),
        _ if 2 * phosphorus >= profiles.len().max(1) => (
            "mass spectrometry (electron ionisation), or a phosphorus-selective detector (flame photometric in phosphorus mode, or nitrogen-phosphorus)".into(),
            rule(format!(
                "no detector named: {phosphorus} of {} analytes contain phosphorus (organophosphorus pesticides), which phosphorus-selective detectors see at trace levels in matrix, and mass spectrometry identifies; flame ionisation sees them but not selectively (common practice, no source)",
                profiles.len()
            )),
        ),
        _ => (
            "flame ionisation, 280 °C".into(),
            rule("no detector named: flame ionisation responds to every organic analyte; mass spectrometry for confirmation of identity (common practice, no source)".into()),
        ),
    }
}

/// The IC detector in plain words.
pub fn for_ic(named: Detector) -> String {
    match named {
        Detector::Ms => "mass spectrometry after the suppressor".into(),
        Detector::Uv(nm) => format!(
            "UV absorbance at {nm:.0} nm (direct UV sees only UV-absorbing ions such as nitrate, nitrite, bromide and organic anions; suppressed conductivity is the usual detector)"
        ),
        Detector::PulsedAmperometry => {
            "pulsed amperometry (gold working electrode; carbohydrates, alcohols, amines)".into()
        }
        _ => "suppressed conductivity".into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::advisor::profile::test_profile;

    // Expectations: common practice, no source.
    #[test]
    fn impossible_detector_mode_pairs_are_refused_naming_both() {
        let e = check_pair(Detector::Ecd, PhaseMode::Rp).unwrap_err();
        assert!(
            e.contains("electron capture") && e.contains("reversed-phase"),
            "{e}"
        );
        let e = check_pair(Detector::Conductivity, PhaseMode::Rp).unwrap_err();
        assert!(
            e.contains("conductivity") && e.contains("reversed-phase"),
            "{e}"
        );
        assert!(check_pair(Detector::Fid, PhaseMode::Hilic).is_err());
        assert_eq!(
            check_pair(Detector::Uv(254.0), PhaseMode::Gc).is_err(),
            !UV_NAMED_ALLOWS_GC
        );
        assert!(check_pair(Detector::Ms, PhaseMode::Gc).is_ok());
        assert!(check_pair(Detector::FromStructure, PhaseMode::Gc).is_ok());
        assert!(check_pair(Detector::Conductivity, PhaseMode::IcCation).is_ok());
    }

    #[test]
    fn lc_detection_follows_the_chromophores() {
        let aromatic = [
            test_profile("toluene", "Cc1ccccc1"),
            test_profile("acetophenone", "CC(=O)c1ccccc1"),
        ];
        let (d, r) = for_lc(&aromatic, Detector::FromStructure);
        assert_eq!(d, Detector::Uv(220.0), "the weakest chromophore sets it");
        assert_eq!(r.source, "rule:detector-from-structure");
        let pah = [test_profile("naphthalene", "c1ccc2ccccc2c1")];
        assert_eq!(for_lc(&pah, Detector::FromStructure).0, Detector::Uv(254.0));
        // sugars: no chromophore, not ionised: an aerosol detector
        let sugars = [
            test_profile("glucose", "OCC1OC(O)C(O)C(O)C1O"),
            test_profile("sorbitol", "OCC(O)C(O)C(O)C(O)CO"),
        ];
        assert_eq!(
            for_lc(&sugars, Detector::FromStructure).0,
            Detector::ChargedAerosol
        );
        // semivolatile neutrals without a chromophore (an aliphatic ester and ether): an aerosol
        // detector would lose them, MS is chosen
        let volatile = [
            test_profile("dibutyl adipate", "CCCCOC(=O)CCCCC(=O)OCCCC"),
            test_profile("dibutyl ether", "CCCCOCCCC"),
        ];
        assert_eq!(for_lc(&volatile, Detector::FromStructure).0, Detector::Ms);
        // amino acids and perfluorinated acids: no chromophore but ionised: MS
        let ions = [
            test_profile("glycine", "NCC(=O)O"),
            test_profile("PFBS", "OS(=O)(=O)C(F)(F)C(F)(F)C(F)(F)C(F)(F)F"),
        ];
        assert_eq!(for_lc(&ions, Detector::FromStructure).0, Detector::Ms);
        // a named UV detector is kept, and the analytes it cannot see are named
        let (d, r) = for_lc(&sugars, Detector::Uv(220.0));
        assert_eq!(d, Detector::Uv(220.0));
        assert!(r.text.contains("glucose") && r.text.contains("no UV chromophore"));
    }

    #[test]
    fn gc_detection_is_electron_capture_for_polyhalogenated_lists() {
        let ocp = [
            test_profile("lindane", "ClC1C(Cl)C(Cl)C(Cl)C(Cl)C1Cl"),
            test_profile("hexachlorobenzene", "Clc1c(Cl)c(Cl)c(Cl)c(Cl)c1Cl"),
        ];
        assert!(
            for_gc(&ocp, Detector::FromStructure)
                .0
                .contains("electron capture")
        );
        let solvents = [
            test_profile("toluene", "Cc1ccccc1"),
            test_profile("hexane", "CCCCCC"),
        ];
        assert!(
            for_gc(&solvents, Detector::FromStructure)
                .0
                .contains("flame ionisation")
        );
        // pyrethroids (two Cl or Br on a semivolatile ester; common practice for their residue
        // analysis by electron capture, from memory)
        let pyrethroids = [
            test_profile(
                "permethrin",
                "CC1(C)C(C=C(Cl)Cl)C1C(=O)OCc1cccc(Oc2ccccc2)c1",
            ),
            test_profile(
                "deltamethrin",
                "CC1(C)C(C=C(Br)Br)C1C(=O)OC(C#N)c1cccc(Oc2ccccc2)c1",
            ),
        ];
        assert!(
            for_gc(&pyrethroids, Detector::FromStructure)
                .0
                .contains("electron capture")
        );
        // dichlorinated solvents stay on flame ionisation
        let chlorinated = [
            test_profile("dichloromethane", "ClCCl"),
            test_profile("1,2-dichloroethane", "ClCCCl"),
        ];
        assert!(
            for_gc(&chlorinated, Detector::FromStructure)
                .0
                .contains("flame ionisation")
        );
        // organophosphorus pesticides: a phosphorus-selective detector or MS
        let ops = [
            test_profile("diazinon", "CCOP(=S)(OCC)Oc1cc(C)nc(n1)C(C)C"),
            test_profile("malathion", "CCOC(=O)CC(SP(=S)(OC)OC)C(=O)OCC"),
        ];
        let d = for_gc(&ops, Detector::FromStructure).0;
        assert!(d.contains("phosphorus"), "{d}");
        let (_, r) = for_gc(&solvents, Detector::Ecd);
        assert!(r.text.contains("no halogen"), "{}", r.text);
    }
}
