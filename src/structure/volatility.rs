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
use super::joback::{JobackError, JobackOptions, joback_tb, stein_brown, typical_error_k};
use super::query::{GraphError, GraphView};

/// Very volatile below this Tb, K (100 °C).
pub const VERY_VOLATILE_BELOW_K: f64 = 373.15;
/// Volatile below this Tb, K (260 °C).
pub const VOLATILE_BELOW_K: f64 = 533.15;
/// Semi-volatile below this Tb, K (400 °C); non-volatile at or above.
pub const SEMI_VOLATILE_BELOW_K: f64 = 673.15;
/// Estimated Tb above which elution by GC is doubtful, K (about 477 °C). A compound elutes
/// when its vapour pressure at the oven temperature is a small fraction of an atmosphere, so
/// compounds boiling well above the upper column temperature (320–350 °C) still elute: five-
/// and six-ring aromatic hydrocarbons (Tb 490–530 °C) and hexachlorobiphenyls are routine on
/// thin-film low-polarity columns (common practice, no source).
pub const GC_MAX_TB_K: f64 = 750.0;
/// Estimated Tb above which GC needs a high final oven temperature and a thin film, K (about
/// 377 °C; common practice, no source): a caution, not a verdict.
pub const GC_HIGH_TB_K: f64 = 650.0;
/// Number of hydrogens on N and O at which H-bonding makes a molecule adsorb and tail in GC
/// unless the donors are capped (common practice, no source): an NH2 and an NH, or three OH.
pub const MANY_DONOR_HYDROGENS: u32 = 3;
/// A free monocarboxylic acid boiling below this runs as is on an acid-modified polyethylene
/// glycol phase (short-chain fatty acids, C2–C7; common practice, no source), K (about 247 °C).
pub const VOLATILE_ACID_MAX_TB_K: f64 = 520.0;
/// Molar mass above which GC is doubtful, g/mol (common practice, no source).
pub const GC_MAX_MOLAR_MASS_G_MOL: f64 = 600.0;
/// Molar mass of a derivative above which GC is not practical even on a high-temperature
/// column, g/mol (per-trimethylsilyl disaccharides, about 920 g/mol, are about the heaviest run
/// routinely; common practice, no source).
pub const GC_MAX_DERIVATISED_MOLAR_MASS_G_MOL: f64 = 1000.0;
/// Mass added per trimethylsilyl group replacing a hydrogen, g/mol (Si(CH3)3 − H = 72.2).
const SILYL_MASS_G_MOL: f64 = 72.2;
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

impl Derivatisation {
    /// Plain words for reports: what the reaction makes and what it costs (time, conditions,
    /// handling; typical figures, common practice, no source).
    pub fn describe(self) -> &'static str {
        match self {
            Derivatisation::Silylation => {
                "silylation (trimethylsilyl ethers, esters and amines; about 30-60 min at 60-80 °C with a silylating reagent, sample and solvent dry; derivatives hydrolyse, inject the same day)"
            }
            Derivatisation::Esterification => {
                "methylation / esterification (methyl esters; about 10-30 min heating with acidic methanol or another alkylating reagent, then extraction into an organic solvent)"
            }
            Derivatisation::Acylation => {
                "acylation (fluoroacyl amides and esters; about 15-30 min at 60 °C with an anhydride, excess reagent and acid removed before injection; also gives an electron-capture response)"
            }
            Derivatisation::EsterificationAndAcylation => {
                "two steps: esterify the acid, then acylate the amine (about 1-2 h in all), or silylate both groups in one step"
            }
        }
    }
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
    /// Three or more hydrogens on N and O (strong H-bond donor).
    ManyHbondDonors,
    /// Aromatic 1,2-diol (catechol): oxidises and adsorbs.
    Catechol,
    /// Sulfonamide N-H: polar, thermally labile.
    Sulfonamide,
    /// Lactam or imide N-H in an aromatic ring (nucleobases, uracils, xanthines).
    AromaticLactam,
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
    /// No boiling point could be had, so volatility is unknown (never taken as suitable).
    Unknown,
}

impl GcVerdict {
    /// Plain words for reports.
    pub fn label(self) -> &'static str {
        match self {
            GcVerdict::Suitable => "suitable",
            GcVerdict::SuitableAfterDerivatisation => "suitable after derivatisation",
            GcVerdict::Unsuitable => "unsuitable",
            GcVerdict::Unknown => "unknown (no boiling point)",
        }
    }
}

/// Where the boiling point came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum TbSource {
    /// Experimental value supplied by the caller.
    Experimental,
    /// Joback estimate (with the Stein & Brown correction).
    JobackSteinBrown,
    /// Alkane-equivalent boiling point from a retention index predicted on
    /// dimethylpolysiloxane (supplied by the caller; see [`assess_gc_with_tb`]).
    AlkaneEquivalentFromIndex,
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
    assess_gc_inner(graph, experimental_tb_k, None, None)
}

/// [`assess_gc`] without an experimental boiling point, for a graph whose ionisable sites
/// (`detect_sites` succeeded) and Joback group-sum boiling point `tb_joback_k` (K, without the
/// Stein–Brown correction) are already known, as `property::estimate` has them: the same
/// assessment without detecting the sites and assigning the Joback groups a second time.
///
/// # Errors
/// As [`assess_gc`].
pub fn assess_gc_known(
    graph: &MolGraph,
    sites: &[IonisableSite],
    tb_joback_k: f64,
) -> Result<GcAssessment, VolatilityError> {
    assess_gc_inner(graph, None, None, Some((sites, tb_joback_k)))
}

/// [`assess_gc`] with a boiling point estimated elsewhere (`tb_k` with its 1σ `error_k` and its
/// `source`), used instead of the Joback estimate: for the alkane-equivalent boiling point of a
/// predicted retention index, which is what decides elution in GC and which covers elements
/// Joback has no groups for (phosphorus, silicon).
///
/// # Errors
/// As [`assess_gc`]; a non-finite or non-positive `tb_k` is a bad boiling point.
pub fn assess_gc_with_tb(
    graph: &MolGraph,
    tb_k: f64,
    error_k: f64,
    source: TbSource,
) -> Result<GcAssessment, VolatilityError> {
    assess_gc_inner(graph, None, Some((tb_k, error_k, source)), None)
}

fn assess_gc_inner(
    graph: &MolGraph,
    experimental_tb_k: Option<f64>,
    estimated: Option<(f64, f64, TbSource)>,
    known: Option<(&[IonisableSite], f64)>,
) -> Result<GcAssessment, VolatilityError> {
    let v = GraphView::new(graph)?;
    let detected;
    let sites: &[IonisableSite] = match known {
        Some((s, _)) => s,
        None => {
            detected = detect_sites(graph)?;
            &detected
        }
    };
    let mut flags = Vec::new();

    let (tb_k, tb_error_k, tb_source, tb_note) = match (experimental_tb_k, estimated) {
        (None, Some((t, e, source))) => {
            volatility_class(t)?;
            (Some(t), Some(e.max(0.0)), source, None)
        }
        (experimental_tb_k, _) => match experimental_tb_k {
            Some(t) => {
                volatility_class(t)?;
                (Some(t), Some(0.0), TbSource::Experimental, None)
            }
            None if known.is_some() => {
                let tb = stein_brown(known.map_or(0.0, |k| k.1));
                (
                    Some(tb),
                    Some(typical_error_k(tb)),
                    TbSource::JobackSteinBrown,
                    None,
                )
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
        },
    };
    let what = if tb_source == TbSource::AlkaneEquivalentFromIndex {
        "alkane-equivalent boiling point (from the predicted retention index)"
    } else {
        "boiling point"
    };
    let molar_mass_g_mol = v.molar_mass_g_mol();

    let donor_h: u32 = (0..v.len())
        .filter(|&i| matches!(v.z(i), 7 | 8))
        .map(|i| u32::from(v.h(i)))
        .sum();
    acid_flags(sites, tb_k, donor_h, &mut flags);
    charge_flags(sites, &mut flags);
    hydroxyl_flags(&v, &mut flags);
    amide_flags(&v, &mut flags);
    amine_flags(sites, &mut flags);
    polarity_flags(&v, sites, &mut flags);

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
    // derivatisation adds mass: a trimethylsilyl group per capped donor atom (+72 g/mol each)
    // takes heavy polyols and polyamines (aminoglycosides, glycosides, cardiac glycosides)
    // beyond what elutes even from a high-temperature column, while per-silylated mono- and
    // disaccharides (up to about 920 g/mol) still do (common practice, no source)
    let donor_atoms = (0..v.len())
        .filter(|&i| matches!(v.z(i), 7 | 8 | 16) && v.h(i) > 0)
        .count();
    let needs_derivatisation = flags
        .iter()
        .any(|f| f.severity == Severity::NeedsDerivatisation)
        || tb_k.is_some_and(|t| t > GC_MAX_TB_K);
    if let Some(m) = molar_mass_g_mol
        && m <= GC_MAX_MOLAR_MASS_G_MOL
        && derivatisable
        && needs_derivatisation
    {
        let derivatised = m + SILYL_MASS_G_MOL * donor_atoms as f64;
        if derivatised > GC_MAX_DERIVATISED_MOLAR_MASS_G_MOL {
            flags.push(GcFlag {
                issue: GcIssue::HighMolarMass,
                severity: Severity::Unsuitable,
                atoms: Vec::new(),
                derivatisation: None,
                reason: format!(
                    "silylated at its {donor_atoms} H-bond donor atoms it would weigh about {derivatised:.0} g/mol, above about {GC_MAX_DERIVATISED_MOLAR_MASS_G_MOL:.0} g/mol: too involatile for GC even after derivatisation"
                ),
            });
        }
    }
    match tb_k {
        Some(t) if t > GC_HIGH_TB_K && t <= GC_MAX_TB_K => flags.push(GcFlag {
            issue: GcIssue::HighBoilingPoint,
            severity: Severity::Caution,
            atoms: Vec::new(),
            derivatisation: None,
            reason: format!(
                "{what} {t:.0} K ({:.0} °C): elutes only near the top of the oven program; use a thin film (0.1-0.25 µm) and a final temperature of 300-330 °C",
                t - 273.15
            ),
        }),
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
                    "{what} {t:.0} K ({:.0} °C) is above about {GC_MAX_TB_K:.0} K, beyond typical upper column temperatures{extra}",
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
    } else if tb_k.is_none() {
        // unknown is unknown: without a boiling point nothing says the analyte is volatile
        GcVerdict::Unknown
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

/// Lowest pKa of a free carboxylic acid that runs underivatised on an acid-modified
/// polyethylene glycol phase (formic acid 3.75 and the fatty acids above; chloroacetic acid
/// 2.9 and pyruvic acid 2.5 below). Common practice, no source.
const WEAK_ACID_MIN_PKA: f64 = 3.0;

fn acid_flags(sites: &[IonisableSite], tb_k: Option<f64>, donor_h: u32, flags: &mut Vec<GcFlag>) {
    let has_strong_base = sites
        .iter()
        .any(|s| s.kind == SiteKind::Base && s.pka.is_some_and(|p| p > 8.0));
    // a short-chain monocarboxylic acid with no other ionisable group runs as is on an
    // acid-modified polyethylene glycol phase (volatile fatty acids; common practice, no source)
    let carboxyls = sites
        .iter()
        .filter(|s| {
            matches!(
                s.class,
                GroupClass::CarboxylicAcid | GroupClass::AromaticCarboxylicAcid
            )
        })
        .count();
    // a weak acid only (pKa at least 3): halogenated acetic acids and keto acids are strong
    // enough to adsorb irreversibly, and trichloroacetic acid decarboxylates in a hot inlet;
    // they are methylated first (common practice for haloacetic acids, from memory)
    let volatile_monoacid = carboxyls == 1
        && sites.len() == 1
        && donor_h == 1
        && sites[0].pka.is_some_and(|k| k >= WEAK_ACID_MIN_PKA)
        && tb_k.is_some_and(|t| t < VOLATILE_ACID_MAX_TB_K);
    for s in sites {
        if volatile_monoacid && s.class == GroupClass::CarboxylicAcid {
            flags.push(GcFlag {
                issue: GcIssue::CarboxylicAcid,
                severity: Severity::Caution,
                atoms: s.atoms.clone(),
                derivatisation: Some(Derivatisation::Esterification),
                reason: "free short-chain carboxylic acid: runs as is on an acid-modified polyethylene glycol phase (it tails on other phases); or esterify".into(),
            });
            continue;
        }
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
                    "permanent charge ({}): ions do not vaporise; use LC, IC or capillary electrophoresis",
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
                severity: Severity::NeedsDerivatisation,
                atoms,
                derivatisation: Some(Derivatisation::Silylation),
                reason: "urea: thermally labile, decomposes in a hot injector (to an isocyanate and an amine); alkylate or silylate, use cool on-column injection, or prefer LC"
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

/// Polarity and lability flags from structure: many H-bond donors, catechols, sulfonamides and
/// aromatic lactams (nucleobases). Common practice, no source.
fn polarity_flags(v: &GraphView<'_>, sites: &[IonisableSite], flags: &mut Vec<GcFlag>) {
    let donors: Vec<usize> = (0..v.len())
        .filter(|&i| matches!(v.z(i), 7 | 8) && v.h(i) > 0)
        .collect();
    let donor_h: u32 = donors.iter().map(|&i| u32::from(v.h(i))).sum();
    let already = |issue: GcIssue, flags: &[GcFlag]| flags.iter().any(|f| f.issue == issue);
    if donor_h >= MANY_DONOR_HYDROGENS
        && !already(GcIssue::ManyHydroxyls, flags)
        && !already(GcIssue::Zwitterion, flags)
    {
        flags.push(GcFlag {
            issue: GcIssue::ManyHbondDonors,
            severity: Severity::NeedsDerivatisation,
            atoms: donors,
            derivatisation: Some(Derivatisation::Silylation),
            reason: format!(
                "{donor_h} hydrogens on N and O: strong H-bonding, adsorbs and tails or does not elute; silylate (or acylate the amines)"
            ),
        });
    }
    // catechol: two OH on adjacent aromatic carbons
    let aromatic_oh = |c: usize| {
        v.aromatic(c)
            && v.z(c) == 6
            && v.heavy(c)
                .any(|(o, ord)| ord == BondOrder::Single && v.z(o) == 8 && v.h(o) > 0)
    };
    let catechol: Vec<usize> = (0..v.len())
        .filter(|&c| aromatic_oh(c) && v.heavy(c).any(|(n, _)| n != c && aromatic_oh(n)))
        .collect();
    if !catechol.is_empty() {
        flags.push(GcFlag {
            issue: GcIssue::Catechol,
            severity: Severity::NeedsDerivatisation,
            atoms: catechol,
            derivatisation: Some(Derivatisation::Acylation),
            reason: "catechol (aromatic 1,2-diol): oxidises and adsorbs in a hot inlet; acylate or silylate".into(),
        });
    }
    // lactam N-H in an aromatic ring, from the graph (uracils, thymine, guanine, xanthines):
    // an aromatic N with H next to an aromatic carbon that carries an exocyclic C=O
    let lactam: Vec<usize> = (0..v.len())
        .filter(|&n| {
            v.z(n) == 7
                && v.aromatic(n)
                && v.h(n) > 0
                && v.heavy(n)
                    .any(|(c, _)| v.z(c) == 6 && v.aromatic(c) && v.double_to(c, 8))
        })
        .collect();
    if !lactam.is_empty() {
        flags.push(GcFlag {
            issue: GcIssue::AromaticLactam,
            severity: Severity::NeedsDerivatisation,
            atoms: lactam,
            derivatisation: Some(Derivatisation::Silylation),
            reason: "lactam N-H in an aromatic ring (nucleobase-like): strong H-bonding, high melting and poorly volatile; silylate".into(),
        });
    }
    for s in sites {
        let (issue, derivatisation, reason) = match s.class {
            GroupClass::Sulfonamide
            | GroupClass::SulfonamideNAryl
            | GroupClass::AcylSulfonamide => (
                GcIssue::Sulfonamide,
                Derivatisation::Esterification,
                "sulfonamide N-H: polar and thermally labile; methylate, or prefer LC",
            ),
            GroupClass::AromaticLactam => (
                GcIssue::AromaticLactam,
                Derivatisation::Silylation,
                "lactam N-H in an aromatic ring (nucleobase-like): strong H-bonding, high melting and poorly volatile; silylate",
            ),
            _ => continue,
        };
        if flags.iter().any(|f| f.issue == issue) {
            continue;
        }
        flags.push(GcFlag {
            issue,
            severity: Severity::NeedsDerivatisation,
            atoms: s.atoms.clone(),
            derivatisation: Some(derivatisation),
            reason: reason.into(),
        });
    }
}

#[cfg(test)]
mod tests;

#[cfg(test)]
mod polarity_tests;
