//! GC suitability from structure: flags (with reasons and whether derivatisation helps), an
//! overall verdict, and a volatility class from the normal boiling point.
//!
//! The rules are rules of thumb of GC practice (common practice, no source) unless a comment
//! names one. The volatility class uses boiling-point bands only (no vapour pressure), so it
//! works when only an experimental Tb is known: the band edges (100 °C, 260 °C, 400 °C) follow
//! the WHO (1989) indoor-air classification of very volatile / volatile / semi-volatile organic
//! compounds, whose edges are given as ranges (50–100, 240–260, 380–400 °C); the upper ends are
//! used here (from memory).
//!
//! Safety: derivatisation reagents are hazardous. Silylating reagents are moisture-sensitive and
//! release irritant by-products; common methylating reagents are toxic, and diazomethane is also
//! explosive; acylating anhydrides are corrosive. These are starting points to verify; the lab's
//! SOPs and local regulations take precedence.

use serde::{Deserialize, Serialize};

use super::graph::{BondOrder, MolGraph};
use super::ionisable::{GroupClass, IonisableError, IonisableSite, SiteKind, detect_sites};
use super::joback::{JobackError, JobackOptions, joback_tb};
use super::query::{GraphError, GraphView};

/// Very volatile below this Tb, K (100 °C).
pub const VERY_VOLATILE_BELOW_K: f64 = 373.15;
/// Volatile below this Tb, K (260 °C).
pub const VOLATILE_BELOW_K: f64 = 533.15;
/// Semi-volatile below this Tb, K (400 °C); non-volatile at or above.
pub const SEMI_VOLATILE_BELOW_K: f64 = 673.15;
/// Estimated Tb above which elution by GC is doubtful, K (about 377 °C, typical upper column
/// temperatures 320–380 °C; common practice, no source).
pub const GC_MAX_TB_K: f64 = 650.0;
/// Molar mass above which GC is doubtful, g/mol (common practice, no source).
pub const GC_MAX_MOLAR_MASS_G_MOL: f64 = 600.0;
/// Hydroxyl count at which a molecule needs silylation for GC (common practice, no source).
pub const MANY_HYDROXYLS: usize = 3;

/// Volatility class from the normal boiling point.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum VolatilityClass {
    /// Tb < 100 °C.
    VeryVolatile,
    /// 100 °C ≤ Tb < 260 °C.
    Volatile,
    /// 260 °C ≤ Tb < 400 °C.
    SemiVolatile,
    /// Tb ≥ 400 °C.
    NonVolatile,
}

/// Derivatisation that would address a flag.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Derivatisation {
    /// Silylation of OH, COOH, NH (trimethylsilyl ethers/esters).
    Silylation,
    /// Methylation / esterification of acids.
    Esterification,
    /// Acylation of amines (and alcohols).
    Acylation,
    /// Esterification of the acid plus acylation of the amine (amino acids), or silylation.
    EsterificationAndAcylation,
}

/// What a flag is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GcIssue {
    /// Free carboxylic acid.
    CarboxylicAcid,
    /// Free sulfonic acid.
    SulfonicAcid,
    /// Free phosphonic / phosphoric acid.
    PhosphorusAcid,
    /// Three or more hydroxyls, or a sugar-like ring with three or more OH.
    ManyHydroxyls,
    /// Permanent charge (quaternary ammonium, sulfonium, phosphonium, borate).
    PermanentCharge,
    /// Input given as a salt / ionised form.
    IonisedForm,
    /// Zwitterion-forming (amino-acid-like).
    Zwitterion,
    /// Primary amide.
    PrimaryAmide,
    /// Urea.
    Urea,
    /// Primary or secondary amine (tailing).
    Amine,
    /// Molar mass above [`GC_MAX_MOLAR_MASS_G_MOL`].
    HighMolarMass,
    /// Estimated or experimental Tb above [`GC_MAX_TB_K`].
    HighBoilingPoint,
    /// No boiling point available.
    UnknownBoilingPoint,
}

/// How serious a flag is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Severity {
    /// Peak shape or response may suffer; GC still workable.
    Caution,
    /// Needs derivatisation before GC.
    NeedsDerivatisation,
    /// Not amenable to GC, derivatisation or not.
    Unsuitable,
}

/// One GC flag.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcFlag {
    /// Issue.
    pub issue: GcIssue,
    /// Severity.
    pub severity: Severity,
    /// Atoms involved (sorted).
    pub atoms: Vec<usize>,
    /// Derivatisation that helps, if any.
    pub derivatisation: Option<Derivatisation>,
    /// Explanation for the user.
    pub reason: String,
}

/// Overall verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GcVerdict {
    /// GC as is.
    Suitable,
    /// GC after the derivatisations listed in the flags.
    SuitableAfterDerivatisation,
    /// Prefer LC (or another technique).
    Unsuitable,
}

/// Where the boiling point came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum TbSource {
    /// Experimental value supplied by the caller.
    Experimental,
    /// Joback estimate (with the Stein & Brown correction).
    JobackSteinBrown,
    /// None available.
    Unknown,
}

/// Result of [`assess_gc`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct GcAssessment {
    /// Verdict.
    pub verdict: GcVerdict,
    /// Volatility class from `tb_k`.
    pub volatility_class: Option<VolatilityClass>,
    /// Normal boiling point used, K.
    pub tb_k: Option<f64>,
    /// Its typical error, K (0 for experimental values as given).
    pub tb_error_k: Option<f64>,
    /// Where `tb_k` came from.
    pub tb_source: TbSource,
    /// Why no Joback estimate could be made, if so.
    pub tb_note: Option<String>,
    /// Molar mass, g/mol.
    pub molar_mass_g_mol: Option<f64>,
    /// Flags, sorted by severity (worst first), then issue.
    pub flags: Vec<GcFlag>,
}

/// Errors from the volatility functions.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum VolatilityError {
    /// Malformed graph.
    #[error(transparent)]
    Graph(#[from] GraphError),
    /// Site detection failed.
    #[error(transparent)]
    Ionisable(#[from] IonisableError),
    /// Boiling point not finite or not positive.
    #[error(
        "boiling point {value} K is not a positive finite number; give Tb in kelvin (e.g. 351.4 for ethanol)"
    )]
    BadTb {
        /// Value.
        value: f64,
    },
}

/// Volatility class from a normal boiling point in kelvin (usable with an experimental Tb alone).
///
/// # Errors
/// [`VolatilityError::BadTb`] for a non-finite or non-positive value.
///
/// # Examples
/// ```
/// use phasewise::structure::volatility::{volatility_class, VolatilityClass};
/// assert_eq!(volatility_class(351.4).unwrap(), VolatilityClass::VeryVolatile); // ethanol
/// assert_eq!(volatility_class(491.1).unwrap(), VolatilityClass::Volatile); // naphthalene
/// ```
pub fn volatility_class(tb_k: f64) -> Result<VolatilityClass, VolatilityError> {
    if !tb_k.is_finite() || tb_k <= 0.0 {
        return Err(VolatilityError::BadTb { value: tb_k });
    }
    Ok(if tb_k < VERY_VOLATILE_BELOW_K {
        VolatilityClass::VeryVolatile
    } else if tb_k < VOLATILE_BELOW_K {
        VolatilityClass::Volatile
    } else if tb_k < SEMI_VOLATILE_BELOW_K {
        VolatilityClass::SemiVolatile
    } else {
        VolatilityClass::NonVolatile
    })
}

/// Assess GC suitability of a molecule. `experimental_tb_k`, when given, is used instead of
/// the Joback estimate (Stein & Brown corrected, which is less biased for large molecules).
///
/// # Errors
/// [`VolatilityError`] for a malformed graph or a bad experimental Tb. A molecule Joback
/// cannot treat is not an error: `tb_note` says why and a flag records the unknown Tb.
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, volatility::{assess_gc, GcVerdict}};
/// let toluene = parse_smiles("Cc1ccccc1").unwrap().graph;
/// assert_eq!(assess_gc(&toluene, None).unwrap().verdict, GcVerdict::Suitable);
/// let glucose = parse_smiles("OCC1OC(O)C(O)C(O)C1O").unwrap().graph;
/// assert_eq!(assess_gc(&glucose, None).unwrap().verdict, GcVerdict::SuitableAfterDerivatisation);
/// ```
pub fn assess_gc(
    graph: &MolGraph,
    experimental_tb_k: Option<f64>,
) -> Result<GcAssessment, VolatilityError> {
    let v = GraphView::new(graph)?;
    let sites = detect_sites(graph)?;
    let mut flags = Vec::new();

    let (tb_k, tb_error_k, tb_source, tb_note) = match experimental_tb_k {
        Some(t) => {
            volatility_class(t)?;
            (Some(t), Some(0.0), TbSource::Experimental, None)
        }
        None => match joback_tb(
            graph,
            JobackOptions {
                stein_brown_correction: true,
            },
        ) {
            Ok(e) => (
                Some(e.tb_k),
                Some(e.typical_error_k),
                TbSource::JobackSteinBrown,
                None,
            ),
            Err(JobackError::Graph(g)) => return Err(g.into()),
            Err(e) => (None, None, TbSource::Unknown, Some(e.to_string())),
        },
    };
    let molar_mass_g_mol = v.molar_mass_g_mol();

    acid_flags(&sites, &mut flags);
    charge_flags(&sites, &mut flags);
    hydroxyl_flags(&v, &mut flags);
    amide_flags(&v, &mut flags);
    amine_flags(&sites, &mut flags);

    let derivatisable = flags.iter().any(|f| f.derivatisation.is_some())
        || (0..v.len()).any(|i| matches!(v.z(i), 7 | 8 | 16) && v.h(i) > 0);
    if let Some(m) = molar_mass_g_mol
        && m > GC_MAX_MOLAR_MASS_G_MOL
    {
        flags.push(GcFlag {
            issue: GcIssue::HighMolarMass,
            severity: Severity::Unsuitable,
            atoms: Vec::new(),
            derivatisation: None,
            reason: format!(
                "molar mass {m:.0} g/mol is above about {GC_MAX_MOLAR_MASS_G_MOL:.0} g/mol: too involatile for GC; derivatisation adds mass"
            ),
        });
    }
    match tb_k {
        Some(t) if t > GC_MAX_TB_K => {
            let (severity, derivatisation, extra) = if derivatisable {
                (
                    Severity::NeedsDerivatisation,
                    Some(Derivatisation::Silylation),
                    "; capping the H-bond donors (silylation) lowers the real boiling point, this boiling point is for the free compound",
                )
            } else {
                (Severity::Unsuitable, None, "")
            };
            flags.push(GcFlag {
                issue: GcIssue::HighBoilingPoint,
                severity,
                atoms: Vec::new(),
                derivatisation,
                reason: format!(
                    "boiling point {t:.0} K ({:.0} °C) is above about {GC_MAX_TB_K:.0} K, beyond typical upper column temperatures{extra}",
                    t - 273.15
                ),
            });
        }
        None => flags.push(GcFlag {
            issue: GcIssue::UnknownBoilingPoint,
            severity: Severity::Caution,
            atoms: Vec::new(),
            derivatisation: None,
            reason: format!(
                "no boiling point: {}",
                tb_note.clone().unwrap_or_else(|| "not supplied".into())
            ),
        }),
        _ => {}
    }

    for f in &mut flags {
        f.atoms.sort_unstable();
        f.atoms.dedup();
    }
    flags.sort_by(|a, b| {
        b.severity
            .cmp(&a.severity)
            .then(a.issue.cmp(&b.issue))
            .then(a.atoms.cmp(&b.atoms))
    });
    let verdict = if flags.iter().any(|f| f.severity == Severity::Unsuitable) {
        GcVerdict::Unsuitable
    } else if flags
        .iter()
        .any(|f| f.severity == Severity::NeedsDerivatisation)
    {
        GcVerdict::SuitableAfterDerivatisation
    } else {
        GcVerdict::Suitable
    };
    Ok(GcAssessment {
        verdict,
        volatility_class: tb_k.and_then(|t| volatility_class(t).ok()),
        tb_k,
        tb_error_k,
        tb_source,
        tb_note,
        molar_mass_g_mol,
        flags,
    })
}

fn acid_flags(sites: &[IonisableSite], flags: &mut Vec<GcFlag>) {
    let has_strong_base = sites
        .iter()
        .any(|s| s.kind == SiteKind::Base && s.pka.is_some_and(|p| p > 8.0));
    for s in sites {
        let (issue, derivatisation, reason) = match s.class {
            GroupClass::CarboxylicAcid | GroupClass::AromaticCarboxylicAcid => (
                GcIssue::CarboxylicAcid,
                Derivatisation::Esterification,
                "free carboxylic acid: adsorbs and tails; esterify (methyl ester) or silylate",
            ),
            GroupClass::AminoAcidCarboxyl if has_strong_base => continue, // flagged as zwitterion
            GroupClass::AminoAcidCarboxyl => (
                GcIssue::CarboxylicAcid,
                Derivatisation::Esterification,
                "free carboxylic acid: esterify or silylate",
            ),
            GroupClass::SulfonicAcid => (
                GcIssue::SulfonicAcid,
                Derivatisation::Esterification,
                "free sulfonic acid: non-volatile and strongly acidic; needs esterification, LC is usually the better choice",
            ),
            GroupClass::PhosphorusAcidFirst => (
                GcIssue::PhosphorusAcid,
                Derivatisation::Silylation,
                "free phosphonic/phosphoric acid: non-volatile; silylate or methylate",
            ),
            _ => continue,
        };
        flags.push(GcFlag {
            issue,
            severity: Severity::NeedsDerivatisation,
            atoms: s.atoms.clone(),
            derivatisation: Some(derivatisation),
            reason: reason.to_string(),
        });
    }
}

fn charge_flags(sites: &[IonisableSite], flags: &mut Vec<GcFlag>) {
    for s in sites {
        if matches!(s.kind, SiteKind::PermanentCation | SiteKind::PermanentAnion) {
            flags.push(GcFlag {
                issue: GcIssue::PermanentCharge,
                severity: Severity::Unsuitable,
                atoms: s.atoms.clone(),
                derivatisation: None,
                reason: format!(
                    "permanent charge ({}): ions do not vaporise; use LC or CE",
                    crate::plain::words(&s.class)
                ),
            });
        }
    }
    let ionised: Vec<usize> = sites
        .iter()
        .filter(|s| s.ionised_in_input && matches!(s.kind, SiteKind::Acid | SiteKind::Base))
        .flat_map(|s| s.atoms.iter().copied())
        .collect();
    if !ionised.is_empty() {
        flags.push(GcFlag {
            issue: GcIssue::IonisedForm,
            severity: Severity::Caution,
            atoms: ionised,
            derivatisation: None,
            reason: "given as a salt / ionised form: inject the neutral form (free base or free acid after extraction), salts do not vaporise"
                .into(),
        });
    }
    let acid = sites
        .iter()
        .filter(|s| s.kind == SiteKind::Acid && s.pka.is_some_and(|p| p < 5.5))
        .flat_map(|s| s.atoms.iter().copied())
        .collect::<Vec<_>>();
    let base = sites
        .iter()
        .filter(|s| s.kind == SiteKind::Base && s.pka.is_some_and(|p| p > 8.0))
        .flat_map(|s| s.atoms.iter().copied())
        .collect::<Vec<_>>();
    if !acid.is_empty() && !base.is_empty() {
        let mut atoms = acid;
        atoms.extend(base);
        flags.push(GcFlag {
            issue: GcIssue::Zwitterion,
            severity: Severity::NeedsDerivatisation,
            atoms,
            derivatisation: Some(Derivatisation::EsterificationAndAcylation),
            reason: "acid and strong base: exists as a zwitterion (salt-like, non-volatile); esterify and acylate, or silylate both"
                .into(),
        });
    }
}

fn is_hydroxyl(v: &GraphView<'_>, o: usize) -> bool {
    v.z(o) == 8
        && v.h(o) >= 1
        && v.degree(o) == 1
        && v.heavy(o)
            .all(|(c, ord)| ord == BondOrder::Single && v.z(c) == 6 && !v.double_to(c, 8))
}

fn hydroxyl_flags(v: &GraphView<'_>, flags: &mut Vec<GcFlag>) {
    let hydroxyls: Vec<usize> = (0..v.len()).filter(|&o| is_hydroxyl(v, o)).collect();
    let sugar_ring = v.graph().rings.iter().any(|ring| {
        ring.iter()
            .filter(|&&a| a < v.len())
            .filter(|&&a| {
                v.heavy(a)
                    .any(|(o, _)| !ring.contains(&o) && is_hydroxyl(v, o))
            })
            .count()
            >= MANY_HYDROXYLS
    });
    if hydroxyls.len() >= MANY_HYDROXYLS || sugar_ring {
        let what = if sugar_ring {
            "sugar-like ring with three or more OH"
        } else {
            "three or more hydroxyls"
        };
        flags.push(GcFlag {
            issue: GcIssue::ManyHydroxyls,
            severity: Severity::NeedsDerivatisation,
            atoms: hydroxyls.clone(),
            derivatisation: Some(Derivatisation::Silylation),
            reason: format!(
                "{what} ({} OH): strong H-bonding, decomposes rather than boils; silylate all OH",
                hydroxyls.len()
            ),
        });
    }
}

fn amide_flags(v: &GraphView<'_>, flags: &mut Vec<GcFlag>) {
    for c in 0..v.len() {
        if v.z(c) != 6 || v.aromatic(c) || !v.double_to(c, 8) {
            continue;
        }
        let ns: Vec<usize> = v
            .heavy(c)
            .filter(|&(n, o)| o == BondOrder::Single && v.z(n) == 7 && !v.aromatic(n))
            .map(|(n, _)| n)
            .collect();
        if ns.len() >= 2 {
            let mut atoms = vec![c];
            atoms.extend(&ns);
            flags.push(GcFlag {
                issue: GcIssue::Urea,
                severity: Severity::Caution,
                atoms,
                derivatisation: Some(Derivatisation::Silylation),
                reason: "urea: often thermally labile in a hot injector (may decompose); prefer cool on-column injection, alkylation/silylation, or LC"
                    .into(),
            });
        } else if ns.len() == 1 && v.h(ns[0]) == 2 {
            flags.push(GcFlag {
                issue: GcIssue::PrimaryAmide,
                severity: Severity::Caution,
                atoms: vec![c, ns[0]],
                derivatisation: Some(Derivatisation::Silylation),
                reason: "primary amide: strong H-bond donor, tails on non-polar phases; silylation improves peak shape".into(),
            });
        }
    }
}

fn amine_flags(sites: &[IonisableSite], flags: &mut Vec<GcFlag>) {
    let atoms: Vec<usize> = sites
        .iter()
        .filter(|s| {
            matches!(
                s.class,
                GroupClass::PrimaryAmine | GroupClass::SecondaryAmine
            )
        })
        .flat_map(|s| s.atoms.iter().copied())
        .collect();
    if !atoms.is_empty() {
        flags.push(GcFlag {
            issue: GcIssue::Amine,
            severity: Severity::Caution,
            atoms,
            derivatisation: Some(Derivatisation::Acylation),
            reason: "primary/secondary amine: adsorbs on active sites and tails; use a base-deactivated column or acylate".into(),
        });
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;

    fn assess(smiles: &str) -> GcAssessment {
        assess_gc(&parse_smiles(smiles).expect("parses").graph, None).expect("valid graph")
    }

    fn issues(a: &GcAssessment) -> Vec<GcIssue> {
        a.flags.iter().map(|f| f.issue).collect()
    }

    #[test]
    fn classes_by_band() {
        // Experimental Tb from memory (CRC Handbook-type values).
        assert_eq!(
            volatility_class(341.9).expect("valid"),
            VolatilityClass::VeryVolatile
        ); // n-hexane
        assert_eq!(
            volatility_class(454.9).expect("valid"),
            VolatilityClass::Volatile
        ); // phenol
        assert_eq!(
            volatility_class(560.0).expect("valid"),
            VolatilityClass::SemiVolatile
        ); // hexadecane
        assert_eq!(
            volatility_class(700.0).expect("valid"),
            VolatilityClass::NonVolatile
        );
        assert!(volatility_class(f64::NAN).is_err());
        assert!(volatility_class(-3.0).is_err());
    }

    #[test]
    fn simple_solvents_are_suitable() {
        for smi in ["CCCCCC", "CCOC(C)=O", "Clc1ccccc1", "CC(C)=O"] {
            let a = assess(smi);
            assert_eq!(a.verdict, GcVerdict::Suitable, "{smi}: {a:?}");
        }
    }

    #[test]
    fn acids_and_sugars_need_derivatisation() {
        let a = assess("CCCCCCCC(=O)O");
        assert_eq!(a.verdict, GcVerdict::SuitableAfterDerivatisation);
        assert!(issues(&a).contains(&GcIssue::CarboxylicAcid));
        let g = assess("OCC(O)CO");
        assert!(issues(&g).contains(&GcIssue::ManyHydroxyls));
        let z = assess("CC(N)C(=O)O");
        assert!(issues(&z).contains(&GcIssue::Zwitterion));
        assert_eq!(z.verdict, GcVerdict::SuitableAfterDerivatisation);
    }

    #[test]
    fn charges_and_size_are_unsuitable() {
        assert_eq!(assess("C[N+](C)(C)CCO").verdict, GcVerdict::Unsuitable);
        // Erythromycin-size molecule (invented test of the mass rule: a C40 alkane chain with many ethers).
        let big = format!("C{}", "COC".repeat(15));
        let a = assess(&big);
        assert!(a.molar_mass_g_mol.unwrap_or(0.0) > 600.0);
        assert_eq!(a.verdict, GcVerdict::Unsuitable);
    }

    #[test]
    fn experimental_tb_is_used() {
        let g = parse_smiles("CCO").expect("parses").graph;
        let a = assess_gc(&g, Some(351.4)).expect("valid");
        assert_eq!(a.tb_source, TbSource::Experimental);
        assert_eq!(a.volatility_class, Some(VolatilityClass::VeryVolatile));
        assert!(assess_gc(&g, Some(f64::NAN)).is_err());
    }
}
