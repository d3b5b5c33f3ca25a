//! Ionisable groups found on a [`MolGraph`], each with a typical aqueous pKa and a spread.
//!
//! This is a **typical-value method**: every site gets the pKa of its group class (values from
//! memory of standard textbook and handbook tables; each constant says so beside it), corrected
//! only where a correction has a well-known published form:
//! - Hammett σ·ρ for substituents on benzene rings bearing a carboxylic acid, phenol or aniline,
//!   and on pyridine rings (σ constants and ρ values from memory of the standard compilation,
//!   Hansch, Leo & Taft, Chem. Rev. 91 (1991) 165, not re-checked against it);
//! - additive α/β-substituent decrements for aliphatic amines, in the style of Perrin, Dempsey &
//!   Serjeant, "pKa Prediction for Organic Acids and Bases" (Chapman & Hall 1981); the
//!   decrement values are from memory.
//!
//! Pre-ionised input (carboxylates, protonated amines, pyridinium) is read through the
//! neutralised view of [`GraphView`], so `CC(=O)[O-]` and `CC(=O)O` give the same site.
//! Quaternary ammonium, sulfonium and phosphonium centres are permanent cations.
//!
//! Experimental values from the knowledge base replace estimates through
//! [`apply_experimental`]; the matching rule is documented there.

use serde::{Deserialize, Serialize};

use super::graph::{BondOrder, MolGraph};
use super::query::{GraphError, GraphView};

/// Ionisable group classes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GroupClass {
    /// Aliphatic carboxylic acid R-COOH.
    CarboxylicAcid,
    /// Carboxylic acid on an aromatic ring (benzoic-acid type).
    AromaticCarboxylicAcid,
    /// α-Amino acid carboxyl (zwitterion-forming).
    AminoAcidCarboxyl,
    /// Sulfonic acid or sulfuric monoester.
    SulfonicAcid,
    /// First acidic OH of a phosphonic / phosphoric / phosphinic acid.
    PhosphorusAcidFirst,
    /// Second acidic OH of a phosphonic / phosphoric acid.
    PhosphorusAcidSecond,
    /// 5-Substituted 1H-tetrazole.
    Tetrazole,
    /// Acyl sulfonamide (and sulfonylurea) N-H.
    AcylSulfonamide,
    /// Imide, ureide (barbiturate, hydantoin, uracil) N-H flanked by two carbonyls.
    Imide,
    /// Lactam-type N-H in an aromatic ring between C=O and C=N (pyrimidinone, quinazolinone).
    AromaticLactam,
    /// Enol conjugated to a carbonyl (1,3-dione enol, 4-hydroxycoumarin, tetronic acid).
    VinylogousAcid,
    /// Sulfonamide N-H carrying an aryl or heteroaryl group.
    SulfonamideNAryl,
    /// Primary or N-alkyl sulfonamide N-H.
    Sulfonamide,
    /// Hydroxamic acid.
    HydroxamicAcid,
    /// Phenol (hydroxyl on an aromatic ring).
    Phenol,
    /// Aliphatic thiol.
    Thiol,
    /// Aromatic thiol (thiophenol).
    AromaticThiol,
    /// Primary aliphatic amine.
    PrimaryAmine,
    /// Secondary aliphatic amine.
    SecondaryAmine,
    /// Tertiary aliphatic amine.
    TertiaryAmine,
    /// Amidine.
    Amidine,
    /// Guanidine.
    Guanidine,
    /// Acyl- or aryl-substituted guanidine (weaker).
    AcylGuanidine,
    /// Pyridine-like ring nitrogen in a six-membered aromatic ring with no other ring N.
    PyridineNitrogen,
    /// Ring nitrogen of a diazine (pyrimidine, pyrazine, pyridazine) or triazine.
    DiazineNitrogen,
    /// Imidazole-like ring nitrogen (1,3-relation to a pyrrole-type N).
    ImidazoleNitrogen,
    /// Benzimidazole-like ring nitrogen.
    BenzimidazoleNitrogen,
    /// Other azole ring nitrogen (pyrazole, triazole, oxazole, thiazole): weakly basic.
    WeakAzoleNitrogen,
    /// Aniline (amine N on an aromatic carbon).
    Aniline,
    /// Diarylamine: very weak base.
    Diarylamine,
    /// Quaternary ammonium or N-alkylated aromatic N (permanent cation).
    QuaternaryAmmonium,
    /// Sulfonium (permanent cation).
    Sulfonium,
    /// Phosphonium (permanent cation).
    Phosphonium,
    /// Tetracoordinate boron anion (permanent anion).
    Borate,
}

/// Whether a site gives up or takes up a proton, or carries a fixed charge.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum SiteKind {
    /// HA ⇌ A⁻ + H⁺.
    Acid,
    /// BH⁺ ⇌ B + H⁺ (pKa of the conjugate acid).
    Base,
    /// Fixed positive charge at every pH.
    PermanentCation,
    /// Fixed negative charge at every pH.
    PermanentAnion,
}

/// Acid or base, as a knowledge-base pKa record states it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum AcidBase {
    /// An acidic pKa.
    Acid,
    /// A basic pKa (of the conjugate acid).
    Base,
}

/// Where a site's pKa came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum PkaSource {
    /// Typical class value, with the corrections applied (human-readable path).
    Estimated {
        /// The class value and corrections, e.g. "phenol 10.0; Hammett 4-NO2 -2.8".
        path: String,
    },
    /// Experimental value from the knowledge base.
    Experimental,
    /// Permanent charge: no pKa.
    Permanent,
}

/// One ionisable site.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct IonisableSite {
    /// Group class.
    pub class: GroupClass,
    /// Acid, base or permanent charge.
    pub kind: SiteKind,
    /// Aqueous pKa at 25 °C (conjugate acid for bases); `None` for permanent charges.
    pub pka: Option<f64>,
    /// Typical spread of the class (± pKa units, about one standard deviation).
    pub spread_pka: f64,
    /// Atoms of the group (sorted indices into the graph).
    pub atoms: Vec<usize>,
    /// True when the input SMILES already showed this site in its ionised form.
    pub ionised_in_input: bool,
    /// Where the pKa came from.
    pub pka_source: PkaSource,
}

/// Errors from ionisable-group detection and merging.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum IonisableError {
    /// The molecular graph is malformed.
    #[error(transparent)]
    Graph(#[from] GraphError),
    /// An experimental pKa is not a finite number in the aqueous range.
    #[error(
        "experimental pKa {value} is outside -5..=20 or not a number; check the knowledge-base record"
    )]
    ExperimentalOutOfRange {
        /// The value given.
        value: f64,
    },
}

/// The result of [`apply_experimental`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExperimentalMerge {
    /// Sites with experimental values in place of the matched estimates.
    pub sites: Vec<IonisableSite>,
    /// Experimental values that found no site (e.g. a group the detector does not know).
    pub unmatched: Vec<(f64, Option<AcidBase>)>,
}

/// Spread given to a site whose pKa was replaced by an experimental value: a typical
/// inter-laboratory reproducibility of potentiometric pKa values (common practice, no source).
pub const EXPERIMENTAL_SPREAD_PKA: f64 = 0.2;

// ---------------------------------------------------------------------------------------------
// Class values. Every value is a typical aqueous pKa at 25 °C, from memory of standard tables
// (e.g. the CRC Handbook "Dissociation constants of organic acids and bases" and Perrin et al.
// 1981); the spread is the author's judgement of the class's scatter in drug-like molecules.
// The doc file docs/ionisation-volatility.md repeats this table.
// ---------------------------------------------------------------------------------------------

/// (typical pKa, spread) for a class; from memory, see the module docs.
pub fn class_value(class: GroupClass) -> (Option<f64>, f64) {
    use GroupClass::*;
    let (pka, spread) = match class {
        CarboxylicAcid => (4.8, 0.5),         // acetic 4.76, propanoic 4.87
        AromaticCarboxylicAcid => (4.2, 0.5), // benzoic 4.20 (Hammett reference)
        AminoAcidCarboxyl => (2.3, 0.4),      // glycine 2.35, alanine 2.34
        SulfonicAcid => (-1.0, 1.0),          // methanesulfonic -1.9, benzenesulfonic -2.8 .. -0.6
        PhosphorusAcidFirst => (2.0, 0.7),    // phosphoric 2.15, methylphosphonic 2.4
        PhosphorusAcidSecond => (7.0, 0.7),   // phosphoric 7.2, methylphosphonic 7.7
        Tetrazole => (4.9, 0.6),              // 5-phenyltetrazole 4.5, 5-methyl 5.5
        AcylSulfonamide => (4.5, 1.0),        // N-acylbenzenesulfonamides 4-5, sulfonylureas 5-6
        Imide => (9.0, 1.0),                  // succinimide 9.6, phthalimide 8.3, barbital 7.9
        AromaticLactam => (8.8, 1.0),         // 4(3H)-pyrimidinone 8.6, quinazolin-4(3H)-one 9.8
        VinylogousAcid => (4.6, 1.0), // dimedone 5.2, 4-hydroxycoumarin 4.1, tetronic acid 3.8
        SulfonamideNAryl => (7.5, 1.5), // sulfa drugs 5-8.5, N-phenyl 8.3
        Sulfonamide => (10.0, 0.8),   // benzenesulfonamide 10.1
        HydroxamicAcid => (8.8, 0.7), // acetohydroxamic 8.7-9.0
        Phenol => (10.0, 0.6),        // phenol 9.99 (Hammett reference)
        Thiol => (10.3, 0.8),         // ethanethiol 10.6, cysteine SH 8.3
        AromaticThiol => (6.6, 0.8),  // thiophenol 6.6
        PrimaryAmine => (10.6, 0.6),  // ethylamine 10.7, butylamine 10.6
        SecondaryAmine => (11.0, 0.6), // diethylamine 11.0, piperidine 11.1
        TertiaryAmine => (9.8, 0.7), // triethylamine 10.7, N-methylpiperidine 10.1, trimethylamine 9.8
        Amidine => (12.0, 1.0),      // acetamidine 12.4, benzamidine 11.6
        Guanidine => (13.0, 1.0),    // guanidine 13.6, arginine side chain 12.5
        AcylGuanidine => (8.0, 1.0), // acetylguanidine 8.3, amiloride 8.7
        PyridineNitrogen => (5.2, 0.7), // pyridine 5.23, quinoline 4.9, isoquinoline 5.4
        DiazineNitrogen => (1.5, 1.0), // pyrimidine 1.3, pyrazine 0.65, pyridazine 2.3
        ImidazoleNitrogen => (7.0, 0.8), // imidazole 6.95, N-methylimidazole 7.0, histidine 6.0
        BenzimidazoleNitrogen => (5.5, 0.7), // benzimidazole 5.5
        WeakAzoleNitrogen => (2.0, 1.2), // pyrazole 2.5, 1,2,4-triazole 2.2, thiazole 2.5, oxazole 0.8
        Aniline => (4.6, 0.6),           // aniline 4.60 (Hammett reference)
        Diarylamine => (0.8, 0.8),       // diphenylamine 0.8
        QuaternaryAmmonium | Sulfonium | Phosphonium | Borate => return (None, 0.0),
    };
    (Some(pka), spread)
}

fn kind_of(class: GroupClass) -> SiteKind {
    use GroupClass::*;
    match class {
        CarboxylicAcid
        | AromaticCarboxylicAcid
        | AminoAcidCarboxyl
        | SulfonicAcid
        | PhosphorusAcidFirst
        | PhosphorusAcidSecond
        | Tetrazole
        | AcylSulfonamide
        | Imide
        | AromaticLactam
        | VinylogousAcid
        | SulfonamideNAryl
        | Sulfonamide
        | HydroxamicAcid
        | Phenol
        | Thiol
        | AromaticThiol => SiteKind::Acid,
        QuaternaryAmmonium | Sulfonium | Phosphonium => SiteKind::PermanentCation,
        Borate => SiteKind::PermanentAnion,
        _ => SiteKind::Base,
    }
}

// ---------------------------------------------------------------------------------------------
// Hammett substituent constants, from memory (values as in Hansch, Leo & Taft 1991, not
// re-checked): (sigma_meta, sigma_para, sigma_para_minus). sigma_para_minus is used for
// phenols and anilines, whose reaction centre conjugates with para pi-acceptors.
// ---------------------------------------------------------------------------------------------

#[derive(Debug, Clone, Copy, PartialEq)]
enum Substituent {
    Nitro,
    Cyano,
    Trifluoromethyl,
    Fluoro,
    Chloro,
    Bromo,
    Iodo,
    Alkyl,
    Alkoxy,
    Hydroxy,
    Amino,
    Acylamino,
    Acyl,
    Ester,
    Carboxamide,
    Sulfonyl,
    Alkylthio,
}

impl Substituent {
    fn sigma(self) -> (f64, f64, f64) {
        use Substituent::*;
        match self {
            Nitro => (0.71, 0.78, 1.27),
            Cyano => (0.56, 0.66, 1.00),
            Trifluoromethyl => (0.43, 0.54, 0.65),
            Fluoro => (0.34, 0.06, 0.06),
            Chloro => (0.37, 0.23, 0.23),
            Bromo => (0.39, 0.23, 0.23),
            Iodo => (0.35, 0.18, 0.18),
            Alkyl => (-0.07, -0.17, -0.17),
            Alkoxy => (0.12, -0.27, -0.27),
            Hydroxy => (0.12, -0.37, -0.37),
            Amino => (-0.16, -0.66, -0.66),
            Acylamino => (0.21, 0.00, 0.00),
            Acyl => (0.38, 0.50, 0.84),
            Ester => (0.37, 0.45, 0.75),
            Carboxamide => (0.28, 0.36, 0.61),
            Sulfonyl => (0.60, 0.72, 1.13),
            Alkylthio => (0.15, 0.00, 0.06),
        }
    }

    /// Shift of pyridine's pKa for a substituent at the 2-position, where Hammett constants do
    /// not apply; from memory of parent values (2-picoline 6.0, 2-aminopyridine 6.9,
    /// 2-chloropyridine 0.7, 2-methoxypyridine 3.3, 2-cyanopyridine -0.3, 2-acetylpyridine 2.6).
    fn pyridine_ortho_shift(self) -> f64 {
        use Substituent::*;
        match self {
            Alkyl => 0.8,
            Amino => 1.7,
            Chloro | Bromo | Iodo => -4.5,
            Fluoro => -5.6,
            Alkoxy | Hydroxy => -1.9,
            Cyano | Nitro => -5.5,
            Trifluoromethyl | Sulfonyl => -4.5,
            Acyl | Ester | Carboxamide => -2.6,
            Acylamino => -1.0,
            Alkylthio => -1.5,
        }
    }

    /// Shift of benzoic acid's pKa for an ortho substituent (the "ortho effect", mostly
    /// acid-strengthening); from memory of parent values (2-methyl 3.9, 2-chloro 2.9,
    /// 2-nitro 2.2, 2-hydroxy 3.0, 2-methoxy 4.1, 2-fluoro 3.3).
    fn benzoic_ortho_shift(self) -> f64 {
        use Substituent::*;
        match self {
            Alkyl => -0.3,
            Fluoro => -0.9,
            Chloro | Bromo | Iodo => -1.3,
            Nitro => -2.0,
            Hydroxy => -1.2,
            Alkoxy => -0.1,
            Amino => 0.8,
            _ => -0.8,
        }
    }
}

/// Reaction constants ρ, from memory: benzoic acids 1.00 (definition), phenols 2.23,
/// anilinium 2.89, pyridinium 5.9.
const RHO_BENZOIC: f64 = 1.00;
const RHO_PHENOL: f64 = 2.23;
const RHO_ANILINIUM: f64 = 2.89;
const RHO_PYRIDINIUM: f64 = 5.9;

/// Extra spread when an ortho substituent is present (Hammett treats ortho poorly;
/// common practice, no source).
const ORTHO_EXTRA_SPREAD: f64 = 0.5;

// ---------------------------------------------------------------------------------------------
// Aliphatic amine decrements, from memory in the style of Perrin et al. 1981.
// ---------------------------------------------------------------------------------------------

/// Per aryl or vinyl group on a carbon α to the amine N (benzylamine 9.3 vs 10.6).
const AMINE_ALPHA_ARYL: f64 = -1.1;
/// Per alkynyl group on a carbon α to the amine N (propargylamine 8.15 vs 10.7).
const AMINE_ALPHA_ALKYNYL: f64 = -2.5;
/// Per nitrile on a carbon β to the amine N (3-aminopropionitrile 7.7 vs propylamine 10.6).
const AMINE_BETA_NITRILE: f64 = -2.9;
/// Per carbonyl on a carbon β to the amine N (β-alanine esters, Mannich bases; about 9.1).
const AMINE_BETA_CARBONYL: f64 = -1.2;
/// Per carbonyl (ketone, amide, ester) on a carbon α to the amine N (glycinamide 8.0).
const AMINE_ALPHA_CARBONYL: f64 = -2.2;
/// α-Carboxylic acid (amino-acid amine 9.6-9.8 vs 10.6).
const AMINE_ALPHA_CARBOXYL: f64 = -0.9;
/// Per nitrile on a carbon α to the amine N (aminoacetonitrile 5.3).
const AMINE_ALPHA_NITRILE: f64 = -5.0;
/// Per sulfonyl on a carbon α to the amine N.
const AMINE_ALPHA_SULFONYL: f64 = -3.0;
/// Per O, N or S on a carbon β to the amine N, N-C-C-X (2-methoxyethylamine 9.4,
/// morpholine 8.4 vs piperidine 11.1 over two paths).
const AMINE_BETA_HETEROATOM: f64 = -1.3;
/// Per O, N or S directly on a carbon α to the amine N (aminals, N-C-O); author's judgement.
const AMINE_ALPHA_HETEROATOM: f64 = -2.0;
/// Per F or Cl on a carbon β to the amine N (2-fluoroethylamine 9.0, 2,2,2-trifluoroethylamine 5.7).
const AMINE_BETA_HALOGEN: f64 = -1.7;
/// Largest total decrement applied (keeps stacked corrections physical; common practice, no source).
const AMINE_MAX_DECREMENT: f64 = -6.0;
/// Extra spread per correction applied (the decrements are not exactly additive; author's judgement).
const SPREAD_PER_CORRECTION: f64 = 0.15;

/// Detect the ionisable sites of `graph`, sorted by (first atom, class).
///
/// # Errors
/// [`IonisableError::Graph`] when the graph's indices are inconsistent.
///
/// # Examples
/// ```
/// use phasewise::structure::adapter::parse_smiles;
/// use phasewise::structure::ionisable::{detect_sites, GroupClass};
/// let g = parse_smiles("CC(=O)O").unwrap().graph;
/// let sites = detect_sites(&g).unwrap();
/// assert_eq!(sites.len(), 1);
/// assert_eq!(sites[0].class, GroupClass::CarboxylicAcid);
/// ```
pub fn detect_sites(graph: &MolGraph) -> Result<Vec<IonisableSite>, IonisableError> {
    let v = GraphView::new(graph)?;
    let mut d = Detector {
        v: &v,
        sites: Vec::new(),
    };
    d.run();
    let mut sites = d.sites;
    for s in &mut sites {
        s.atoms.sort_unstable();
        s.atoms.dedup();
    }
    sites.sort_by(|a, b| {
        a.atoms
            .first()
            .cmp(&b.atoms.first())
            .then(a.class.cmp(&b.class))
            .then(a.atoms.cmp(&b.atoms))
    });
    sites.dedup_by(|a, b| a.class == b.class && a.atoms == b.atoms);
    Ok(sites)
}

struct Detector<'v, 'g> {
    v: &'v GraphView<'g>,
    sites: Vec<IonisableSite>,
}

impl Detector<'_, '_> {
    fn push(&mut self, class: GroupClass, atoms: Vec<usize>, shift: f64, path: String, extra: f64) {
        let (pka, spread) = class_value(class);
        let ionised_in_input = atoms.iter().any(|&a| self.v.input_charge(a) != 0);
        let (pka, source) = match pka {
            Some(p) => (
                Some(round2(p + shift)),
                PkaSource::Estimated {
                    path: if path.is_empty() {
                        format!("{class:?} {p:.1}")
                    } else {
                        format!("{class:?} {p:.1}; {path}")
                    },
                },
            ),
            None => (None, PkaSource::Permanent),
        };
        self.sites.push(IonisableSite {
            class,
            kind: kind_of(class),
            pka,
            spread_pka: round2(spread + extra),
            atoms,
            ionised_in_input,
            pka_source: source,
        });
    }

    fn run(&mut self) {
        let v = self.v;
        for i in 0..v.len() {
            match v.z(i) {
                6 => self.carbon(i),
                7 => self.nitrogen(i),
                8 => self.oxygen(i),
                16 => self.sulfur(i),
                15 => self.phosphorus(i),
                5 if v.input_charge(i) < 0 && v.degree(i) + usize::from(v.h(i)) == 4 => {
                    self.push(GroupClass::Borate, vec![i], 0.0, String::new(), 0.0);
                }
                _ => {}
            }
        }
        self.azines();
    }

    /// Carboxylic acids, amidines, guanidines (sites centred on carbon).
    fn carbon(&mut self, c: usize) {
        let v = self.v;
        if v.aromatic(c) || v.charge(c) != 0 {
            return;
        }
        let nbrs: Vec<(usize, BondOrder)> = v.heavy(c).collect();
        // Carboxylic acid: C(=O)OH, C with exactly one =O and one -OH.
        let oxo: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| o == BondOrder::Double && v.z(j) == 8 && v.degree(j) == 1)
            .map(|&(j, _)| j)
            .collect();
        let hydroxy: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| {
                o == BondOrder::Single
                    && v.z(j) == 8
                    && v.degree(j) == 1
                    && v.h(j) == 1
                    && v.charge(j) == 0
            })
            .map(|&(j, _)| j)
            .collect();
        if oxo.len() == 1 && !hydroxy.is_empty() && nbrs.len() + usize::from(v.h(c)) == 3 {
            let other: Vec<usize> = nbrs
                .iter()
                .map(|&(j, _)| j)
                .filter(|&j| j != oxo[0] && j != hydroxy[0])
                .collect();
            // Carbonic/carbamic acid half-esters are treated as carboxylic acids too.
            let r = other.first().copied();
            let atoms = vec![c, oxo[0], hydroxy[0]];
            match r {
                Some(r) if v.aromatic(r) && v.z(r) == 6 => {
                    let (shift, path, extra) = self.hammett(r, RHO_BENZOIC, HammettKind::Benzoic);
                    self.push(
                        GroupClass::AromaticCarboxylicAcid,
                        atoms,
                        shift,
                        path,
                        extra,
                    );
                }
                Some(r)
                    if v.z(r) == 6
                        && (self.carbon_bears_basic_amine(r)
                            || v.heavy(r).any(|(k, _)| v.z(k) == 7 && v.charge(k) > 0)) =>
                {
                    self.push(
                        GroupClass::AminoAcidCarboxyl,
                        atoms,
                        0.0,
                        String::new(),
                        0.0,
                    );
                }
                Some(r) if v.z(r) == 6 => {
                    let (shift, path) = self.alpha_acid_shift(r);
                    let extra = if shift != 0.0 { 0.3 } else { 0.0 };
                    self.push(GroupClass::CarboxylicAcid, atoms, shift, path, extra);
                }
                _ => self.push(GroupClass::CarboxylicAcid, atoms, 0.0, String::new(), 0.3),
            }
            return;
        }
        if !oxo.is_empty() || v.double_to(c, 16) {
            return;
        }
        // Amidine / guanidine: non-aromatic C with one =N and one or two single-bonded N.
        let imino: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| o == BondOrder::Double && v.z(j) == 7 && !v.aromatic(j))
            .map(|&(j, _)| j)
            .collect();
        let amino: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| o == BondOrder::Single && v.z(j) == 7 && !v.aromatic(j))
            .map(|&(j, _)| j)
            .collect();
        if imino.len() != 1 || amino.is_empty() {
            return;
        }
        let ns: Vec<usize> = imino.iter().chain(amino.iter()).copied().collect();
        // The imino N must not carry O (oximes, amidoximes are not strong bases).
        if v.heavy(imino[0]).any(|(j, _)| v.z(j) == 8 || v.z(j) == 16) {
            return;
        }
        let mut acylated = false;
        let mut strongly_deactivated = false;
        let mut aryl = false;
        for &n in &ns {
            for (j, o) in v.heavy(n) {
                if j == c {
                    continue;
                }
                let sulfonyl = v.z(j) == 16 && v.double_to(j, 8);
                let cyano = v.z(j) == 6
                    && v.heavy(j)
                        .any(|(k, ok)| ok == BondOrder::Triple && v.z(k) == 7);
                if sulfonyl || cyano {
                    strongly_deactivated = true;
                } else if v.is_acyl_like(j) {
                    acylated = true;
                } else if v.aromatic(j) {
                    aryl = true;
                } else if v.z(j) == 8 || o == BondOrder::Double {
                    strongly_deactivated = true;
                }
            }
        }
        if strongly_deactivated {
            return; // sulfonyl-, cyano-, hydroxy-amidines: not basic in the aqueous range
        }
        let mut atoms = vec![c];
        atoms.extend(&ns);
        if amino.len() >= 2 {
            if acylated || aryl {
                let path = if acylated { "acyl" } else { "aryl" };
                self.push(GroupClass::AcylGuanidine, atoms, 0.0, path.into(), 0.0);
            } else {
                self.push(GroupClass::Guanidine, atoms, 0.0, String::new(), 0.0);
            }
        } else if acylated {
            // Acylamidines: taken as acylguanidine-like (author's judgement).
            self.push(
                GroupClass::AcylGuanidine,
                atoms,
                0.0,
                "acylamidine".into(),
                0.5,
            );
        } else if aryl {
            // N-aryl amidine about 1.5 lower (from memory, N-phenylbenzamidine ~10.5).
            self.push(GroupClass::Amidine, atoms, -1.5, "N-aryl -1.5".into(), 0.3);
        } else {
            self.push(GroupClass::Amidine, atoms, 0.0, String::new(), 0.0);
        }
    }

    /// True when carbon `r` carries an sp3 amine N (α-amino acid pattern).
    fn carbon_bears_basic_amine(&self, r: usize) -> bool {
        let v = self.v;
        v.heavy(r)
            .any(|(n, o)| o == BondOrder::Single && v.z(n) == 7 && self.amine_degree(n).is_some())
    }

    /// Shift for an aliphatic acid whose α-carbon carries electronegative groups (from memory:
    /// chloroacetic 2.87, methoxyacetic 3.57, phenoxyacetic 3.17, glycolic 3.83, pyruvic 2.5,
    /// hippuric (acylamino) 3.62, (methylthio)acetic 3.66, phenylacetic 4.31).
    fn alpha_acid_shift(&self, r: usize) -> (f64, String) {
        let v = self.v;
        let mut shift: f64 = 0.0;
        let mut parts = Vec::new();
        for (j, o) in v.heavy(r) {
            if o != BondOrder::Single && o != BondOrder::Double {
                continue;
            }
            match v.z(j) {
                9 | 17 | 35 | 53 => {
                    shift -= 1.9;
                    parts.push("alpha-halogen -1.9");
                }
                7 if o == BondOrder::Single && !self.carbon_bears_basic_amine(r) => {
                    shift -= 1.2;
                    parts.push("alpha-N -1.2");
                }
                16 if o == BondOrder::Single => {
                    shift -= 1.1;
                    parts.push("alpha-S -1.1");
                }
                6 if v.aromatic(j) => {
                    shift -= 0.5;
                    parts.push("alpha-aryl -0.5");
                }
                8 if o == BondOrder::Single => {
                    shift -= 1.2;
                    parts.push("alpha-O -1.2");
                }
                8 => {
                    shift -= 2.3;
                    parts.push("alpha-oxo -2.3");
                }
                _ => {}
            }
        }
        shift = shift.max(-4.5);
        (shift, parts.join(", "))
    }

    /// Amine-type nitrogen sites, amide-type N-H acids, quaternary ammonium.
    fn nitrogen(&mut self, n: usize) {
        let v = self.v;
        let q = v.charge(n);
        let deg = v.degree(n);
        let h = usize::from(v.h(n));
        if q > 0 {
            let bonded_to_anion = v.heavy(n).any(|(j, _)| v.input_charge(j) < 0);
            if !bonded_to_anion && h == 0 && (deg == 4 || (v.aromatic(n) && deg == 3)) {
                self.push(
                    GroupClass::QuaternaryAmmonium,
                    vec![n],
                    0.0,
                    String::new(),
                    0.0,
                );
            }
            return;
        }
        if q != 0 {
            return;
        }
        if h >= 1 {
            self.nh_acid(n);
        }
        if v.aromatic(n) {
            return;
        }
        if let Some(carbons) = self.amine_degree(n) {
            let aryl: Vec<usize> = v
                .heavy(n)
                .filter(|&(j, _)| v.aromatic(j))
                .map(|(j, _)| j)
                .collect();
            if aryl.is_empty() {
                self.aliphatic_amine(n, carbons);
            } else if aryl.len() == 1 {
                let r = aryl[0];
                // Amines on heteroaromatic rings (aminopyridines, aminothiazoles) are not the
                // basic centre: the ring N is, and is corrected in `azines`.
                if ring_has_heteroatom(v, r) {
                    return;
                }
                let alkyls = carbons - 1;
                let alkyl_shift = 0.25 * alkyls as f64; // N-methylaniline 4.85, N,N-dimethyl 5.1
                let (shift, path, extra) = self.hammett(r, RHO_ANILINIUM, HammettKind::Aniline);
                let mut path = path;
                if alkyls > 0 {
                    path = join_path(&format!("N-alkyl x{alkyls} +{alkyl_shift:.2}"), &path);
                }
                self.push(
                    GroupClass::Aniline,
                    vec![n],
                    shift + alkyl_shift,
                    path,
                    extra,
                );
            } else {
                self.push(GroupClass::Diarylamine, vec![n], 0.0, String::new(), 0.0);
            }
        }
    }

    /// If `n` is an amine N (sp3, neutral, only carbon neighbours that are not acyl, imidoyl,
    /// vinyl or nitrile carbons), the number of carbon neighbours.
    fn amine_degree(&self, n: usize) -> Option<usize> {
        let v = self.v;
        if v.z(n) != 7 || v.aromatic(n) || v.charge(n) != 0 {
            return None;
        }
        if v.degree(n) + usize::from(v.h(n)) != 3 || v.degree(n) == 0 {
            return None;
        }
        for (j, o) in v.heavy(n) {
            if o != BondOrder::Single || v.z(j) != 6 {
                return None;
            }
            if v.aromatic(j) {
                continue;
            }
            let bad = v
                .heavy(j)
                .any(|(k, ok)| (ok == BondOrder::Double || ok == BondOrder::Triple) && k != n);
            if bad {
                return None; // amide, thioamide, amidine, enamine, cyanamide
            }
        }
        Some(v.degree(n))
    }

    fn aliphatic_amine(&mut self, n: usize, carbons: usize) {
        let v = self.v;
        let class = match carbons {
            1 => GroupClass::PrimaryAmine,
            2 => GroupClass::SecondaryAmine,
            _ => GroupClass::TertiaryAmine,
        };
        let mut shift = 0.0;
        let mut parts: Vec<String> = Vec::new();
        let mut corrections = 0usize;
        for (a, _) in v.heavy(n) {
            for (b, _) in v.heavy(a) {
                if b == n {
                    continue;
                }
                let unsaturated_c = |order: BondOrder| {
                    v.z(b) == 6
                        && !v.aromatic(b)
                        && v.heavy(b).any(|(k, ok)| ok == order && v.z(k) == 6)
                };
                let (delta, label) = if v.aromatic(b) || unsaturated_c(BondOrder::Double) {
                    (AMINE_ALPHA_ARYL, "alpha-aryl/vinyl")
                } else if unsaturated_c(BondOrder::Triple) {
                    (AMINE_ALPHA_ALKYNYL, "alpha-alkynyl")
                } else if v.z(b) == 6 && v.double_to(b, 8) {
                    let is_acid = v
                        .heavy(b)
                        .any(|(k, ok)| ok == BondOrder::Single && v.z(k) == 8 && v.h(k) == 1);
                    if is_acid {
                        (AMINE_ALPHA_CARBOXYL, "alpha-carboxyl")
                    } else {
                        (AMINE_ALPHA_CARBONYL, "alpha-carbonyl")
                    }
                } else if v.z(b) == 6
                    && v.heavy(b)
                        .any(|(k, ok)| ok == BondOrder::Triple && v.z(k) == 7)
                {
                    (AMINE_ALPHA_NITRILE, "alpha-nitrile")
                } else if v.z(b) == 16 && v.double_to(b, 8) {
                    (AMINE_ALPHA_SULFONYL, "alpha-sulfonyl")
                } else if matches!(v.z(b), 7 | 8 | 16) {
                    (AMINE_ALPHA_HETEROATOM, "alpha-heteroatom")
                } else if v.z(b) == 6 && !v.aromatic(a) {
                    // Substituents on the beta carbon (N-C-C-X).
                    for (c, _) in v.heavy(b) {
                        if c == a {
                            continue;
                        }
                        let (delta, label) = match v.z(c) {
                            7 | 8 | 16 => (AMINE_BETA_HETEROATOM, "beta-heteroatom"),
                            9 | 17 => (AMINE_BETA_HALOGEN, "beta-halogen"),
                            6 if v
                                .heavy(c)
                                .any(|(k, ok)| ok == BondOrder::Triple && v.z(k) == 7) =>
                            {
                                (AMINE_BETA_NITRILE, "beta-nitrile")
                            }
                            6 if v.is_acyl_like(c) => (AMINE_BETA_CARBONYL, "beta-carbonyl"),
                            _ => continue,
                        };
                        shift += delta;
                        corrections += 1;
                        parts.push(format!("{label} {delta:+.1}"));
                    }
                    continue;
                } else {
                    continue;
                };
                shift += delta;
                corrections += 1;
                parts.push(format!("{label} {delta:+.1}"));
            }
        }
        let shift = f64::max(shift, AMINE_MAX_DECREMENT);
        let extra = SPREAD_PER_CORRECTION * corrections as f64;
        self.push(class, vec![n], shift, parts.join(", "), extra.min(1.0));
    }

    /// N-H acids: tetrazole, acyl sulfonamide, sulfonamide, imide.
    fn nh_acid(&mut self, n: usize) {
        let v = self.v;
        // Tetrazole: five-membered aromatic ring with four N.
        if v.aromatic(n)
            && let Some(ring) = v.smallest_ring(n)
            && ring.len() == 5
            && ring.iter().filter(|&&a| v.z(a) == 7).count() == 4
            && ring.iter().all(|&a| v.aromatic(a))
        {
            self.push(
                GroupClass::Tetrazole,
                ring.to_vec(),
                0.0,
                String::new(),
                0.0,
            );
            return;
        }
        let mut sulfonyl = None;
        let mut carbonyls = Vec::new();
        let mut aryl = false;
        let mut heteroaryl = false;
        for (j, o) in v.heavy(n) {
            if o != BondOrder::Single && o != BondOrder::Aromatic {
                continue;
            }
            if v.z(j) == 16 && v.doubles_to(j, 8).len() >= 2 {
                sulfonyl = Some(j);
            } else if v.z(j) == 6 && (v.double_to(j, 8) || v.double_to(j, 16)) {
                carbonyls.push(j);
            } else if v.aromatic(j) && !v.aromatic(n) {
                aryl = true;
                heteroaryl |= ring_has_heteroatom(v, j);
            }
        }
        if let Some(s) = sulfonyl {
            let mut atoms = vec![n, s];
            if let Some(&c) = carbonyls.first() {
                atoms.push(c);
                self.push(GroupClass::AcylSulfonamide, atoms, 0.0, String::new(), 0.0);
            } else if heteroaryl {
                // N-heteroaryl sulfonamides (sulfa drugs) about 1 lower than N-phenyl (from memory).
                self.push(
                    GroupClass::SulfonamideNAryl,
                    atoms,
                    -1.0,
                    "N-heteroaryl -1.0".into(),
                    0.0,
                );
            } else if aryl {
                self.push(
                    GroupClass::SulfonamideNAryl,
                    atoms,
                    0.8,
                    "N-phenyl +0.8".into(),
                    0.0,
                );
            } else {
                self.push(GroupClass::Sulfonamide, atoms, 0.0, String::new(), 0.0);
            }
            return;
        }
        if carbonyls.len() >= 2 {
            let mut atoms = vec![n];
            atoms.extend(&carbonyls);
            let (shift, path) = self.imide_shift(n);
            self.push(GroupClass::Imide, atoms, shift, path, 0.0);
            return;
        }
        // Lactam-type N-H of an aromatic ring next to a ring C=O and a ring C=N
        // (4(3H)-pyrimidinone 8.6, quinazolin-4(3H)-one 9.8, from memory).
        if v.aromatic(n)
            && carbonyls.len() == 1
            && v.heavy(n).any(|(k, _)| {
                k != carbonyls[0]
                    && v.z(k) == 6
                    && v.aromatic(k)
                    && v.heavy(k).any(|(m, _)| {
                        m != n && v.z(m) == 7 && v.aromatic(m) && v.h(m) == 0 && v.degree(m) == 2
                    })
            })
        {
            self.push(
                GroupClass::AromaticLactam,
                vec![n, carbonyls[0]],
                0.0,
                String::new(),
                0.0,
            );
        }
    }

    /// Ring-type shift of an imide N-H (from memory: succinimide 9.6, hydantoin 9.1,
    /// phthalimide 8.3, glutarimide 11.4, barbital 7.9, 2,4-thiazolidinedione 6.2, rhodanine 5.6).
    fn imide_shift(&self, n: usize) -> (f64, String) {
        let v = self.v;
        let Some(ring) = v.smallest_ring(n) else {
            return (0.0, String::new());
        };
        let ring_carbonyls = ring.iter().filter(|&&a| exocyclic_oxo(v, a)).count();
        let ring_sulfur = ring.iter().any(|&a| v.z(a) == 16);
        match ring.len() {
            5 if ring_sulfur => (-3.2, "thiazolidinedione-type ring -3.2".into()),
            6 if ring_carbonyls >= 3 => (-1.2, "barbiturate-type ring -1.2".into()),
            6 if ring.iter().all(|&a| !v.aromatic(a)) => {
                (2.0, "saturated six-ring (glutarimide-type) +2.0".into())
            }
            _ => (0.0, String::new()),
        }
    }

    /// Phenols, hydroxamic acids (sites centred on the OH oxygen).
    fn oxygen(&mut self, o: usize) {
        let v = self.v;
        if v.charge(o) != 0 || v.h(o) != 1 || v.degree(o) != 1 {
            return;
        }
        let Some((r, order)) = v.heavy(o).next() else {
            return;
        };
        if order != BondOrder::Single {
            return;
        }
        if v.z(r) == 6 && v.aromatic(r) {
            // Hydroxy on a ring with a ring N next to it is a pyridone-type tautomer: skip.
            if v.heavy(r)
                .any(|(k, _)| v.z(k) == 7 && v.aromatic(k) && v.degree(k) == 2)
            {
                return;
            }
            let (shift, path, extra) = self.hammett(r, RHO_PHENOL, HammettKind::Phenol);
            self.push(GroupClass::Phenol, vec![o], shift, path, extra);
        } else if v.z(r) == 7
            && v.heavy(r)
                .any(|(c, oc)| oc == BondOrder::Single && v.z(c) == 6 && v.double_to(c, 8))
        {
            self.push(
                GroupClass::HydroxamicAcid,
                vec![o, r],
                0.0,
                String::new(),
                0.0,
            );
        } else if v.z(r) == 6 && !v.aromatic(r) {
            // Enol O-H on C=C whose far carbon carries a C=O: HO-C=C-C=O.
            let vinylogous = v.heavy(r).find_map(|(b, ob)| {
                (ob == BondOrder::Double && v.z(b) == 6)
                    .then(|| {
                        v.heavy(b).find(|&(c, oc)| {
                            oc == BondOrder::Single && c != r && v.z(c) == 6 && v.double_to(c, 8)
                        })
                    })
                    .flatten()
                    .map(|(c, _)| (b, c))
            });
            if let Some((b, c)) = vinylogous {
                self.push(
                    GroupClass::VinylogousAcid,
                    vec![o, r, b, c],
                    0.0,
                    String::new(),
                    0.0,
                );
            }
        }
    }

    /// Sulfonic acids (centred on S), thiols, sulfonium.
    fn sulfur(&mut self, s: usize) {
        let v = self.v;
        if v.charge(s) > 0 && v.degree(s) == 3 && v.h(s) == 0 {
            self.push(GroupClass::Sulfonium, vec![s], 0.0, String::new(), 0.0);
            return;
        }
        if v.charge(s) != 0 {
            return;
        }
        let oxo = v.doubles_to(s, 8);
        let hydroxy: Vec<usize> = v
            .heavy(s)
            .filter(|&(j, o)| {
                o == BondOrder::Single && v.z(j) == 8 && v.h(j) == 1 && v.degree(j) == 1
            })
            .map(|(j, _)| j)
            .collect();
        if oxo.len() == 2 && !hydroxy.is_empty() {
            let mut atoms = vec![s, hydroxy[0]];
            atoms.extend(&oxo);
            self.push(GroupClass::SulfonicAcid, atoms, 0.0, String::new(), 0.0);
            return;
        }
        if v.h(s) == 1
            && v.degree(s) == 1
            && let Some((r, o)) = v.heavy(s).next()
            && o == BondOrder::Single
            && v.z(r) == 6
            && !v.is_acyl_like(r)
        {
            let class = if v.aromatic(r) {
                GroupClass::AromaticThiol
            } else {
                GroupClass::Thiol
            };
            self.push(class, vec![s], 0.0, String::new(), 0.0);
        }
    }

    /// Phosphonic, phosphoric, phosphinic acids; phosphonium.
    fn phosphorus(&mut self, p: usize) {
        let v = self.v;
        if v.charge(p) > 0 && v.degree(p) == 4 && v.h(p) == 0 {
            self.push(GroupClass::Phosphonium, vec![p], 0.0, String::new(), 0.0);
            return;
        }
        if v.charge(p) != 0 || !v.double_to(p, 8) {
            return;
        }
        let mut hydroxy: Vec<usize> = v
            .heavy(p)
            .filter(|&(j, o)| {
                o == BondOrder::Single && v.z(j) == 8 && v.h(j) == 1 && v.degree(j) == 1
            })
            .map(|(j, _)| j)
            .collect();
        hydroxy.sort_unstable();
        if let Some(&first) = hydroxy.first() {
            self.push(
                GroupClass::PhosphorusAcidFirst,
                vec![p, first],
                0.0,
                String::new(),
                0.0,
            );
        }
        if let Some(&second) = hydroxy.get(1) {
            self.push(
                GroupClass::PhosphorusAcidSecond,
                vec![p, second],
                0.0,
                String::new(),
                0.0,
            );
        }
    }

    /// Basic aromatic ring nitrogens: one site per aromatic ring with pyridine-type N.
    fn azines(&mut self) {
        let v = self.v;
        let g = v.graph();
        let mut used: Vec<bool> = vec![false; v.len()];
        let mut rings: Vec<&Vec<usize>> = g.rings.iter().collect();
        rings.sort_by_key(|r| (r.len() != 5 && r.len() != 6, r.iter().min().copied()));
        for ring in rings {
            if ring.iter().any(|&a| a >= v.len()) || !ring.iter().all(|&a| v.aromatic(a)) {
                continue;
            }
            // Pyridine-type N: aromatic, two ring neighbours, no H, neutral, not next to a ring
            // carbon carrying exocyclic =O/=S (pyridone, lactam-type).
            let basic: Vec<usize> = ring
                .iter()
                .copied()
                .filter(|&a| {
                    v.z(a) == 7
                        && v.charge(a) == 0
                        && v.h(a) == 0
                        && v.degree(a) == 2
                        && !used[a]
                        && !v.heavy(a).any(|(k, _)| exocyclic_oxo(v, k))
                })
                .collect();
            if basic.is_empty() {
                continue;
            }
            let all_n: Vec<usize> = ring.iter().copied().filter(|&a| v.z(a) == 7).collect();
            let pyrrole_n: Vec<usize> = all_n
                .iter()
                .copied()
                .filter(|&a| !basic.contains(&a) && v.degree(a) + usize::from(v.h(a)) == 3)
                .collect();
            let chalcogen = ring.iter().any(|&a| matches!(v.z(a), 8 | 16));
            let site_n = basic[0];
            let mut atoms = basic.clone();
            let (class, mut shift, mut path, mut extra);
            if ring.len() == 6 {
                if all_n.len() == 1 {
                    class = GroupClass::PyridineNitrogen;
                    let (s, p, e) = self.pyridine_substituents(ring, site_n);
                    shift = s;
                    path = p;
                    extra = e;
                } else {
                    class = GroupClass::DiazineNitrogen;
                    // The pyridine substituent rules applied from each basic N; the most basic
                    // N is the site (checks, from memory: 2-aminopyrimidine 3.5 -> 3.0,
                    // 4-aminopyrimidine 5.7 -> 5.4, 2,4-diaminopyrimidine 7.4 -> 6.9).
                    let mut best = (f64::NEG_INFINITY, String::new(), 0.0);
                    for &b in &basic {
                        let candidate = self.pyridine_substituents(ring, b);
                        if candidate.0 > best.0 {
                            best = candidate;
                        }
                    }
                    shift = best.0;
                    path = best.1;
                    extra = best.2 + 0.3;
                    if all_n.len() >= 3 {
                        // Triazines are far weaker than diazines (s-triazine barely basic,
                        // atrazine 1.7, melamine 5.0; from memory).
                        shift -= 2.5;
                        path = join_path("three ring N -2.5", &path);
                    }
                }
            } else if ring.len() == 5 {
                // Adjacent to a pyrrole-type N or to ring O/S (isoxazole-type): essentially not basic.
                if all_n.len() >= 4 {
                    continue; // tetrazoles: acidic, not basic
                }
                let adjacent_to_chalcogen = v
                    .heavy(site_n)
                    .any(|(k, _)| matches!(v.z(k), 8 | 16) && ring.contains(&k));
                if adjacent_to_chalcogen {
                    continue;
                }
                let adjacent_to_pyrrole = v.heavy(site_n).any(|(k, _)| pyrrole_n.contains(&k));
                if basic.len() == 1 && pyrrole_n.len() == 1 && !chalcogen && !adjacent_to_pyrrole {
                    // Rings fused to this one (sharing a bond).
                    let partners: Vec<&Vec<usize>> = g
                        .rings
                        .iter()
                        .filter(|r| {
                            r.as_slice() != ring.as_slice()
                                && r.iter().filter(|a| ring.contains(a)).count() >= 2
                        })
                        .collect();
                    // Fused to an electron-poor ring (purines, xanthines: caffeine 0.6,
                    // adenine 4.2, from memory) the imidazole N is only weakly basic.
                    let poor_partner = partners.iter().any(|r| {
                        r.iter()
                            .any(|&a| !ring.contains(&a) && (v.z(a) != 6 || exocyclic_oxo(v, a)))
                    });
                    class = if poor_partner {
                        GroupClass::WeakAzoleNitrogen
                    } else if !partners.is_empty() {
                        GroupClass::BenzimidazoleNitrogen
                    } else {
                        GroupClass::ImidazoleNitrogen
                    };
                    shift = 0.0;
                    path = String::new();
                    extra = 0.0;
                } else {
                    class = GroupClass::WeakAzoleNitrogen;
                    shift = 0.0;
                    path = String::new();
                    extra = 0.0;
                }
                // 2-Amino on the carbon between two ring heteroatoms (2-aminothiazole 5.4,
                // 2-aminoimidazole 8.5): +3.0 (from memory).
                let amino_c2 = ring.iter().any(|&c| {
                    v.z(c) == 6
                        && v.heavy(c)
                            .filter(|(k, _)| ring.contains(k) && v.z(*k) != 6)
                            .count()
                            == 2
                        && v.heavy(c).any(|(k, o)| {
                            !ring.contains(&k) && o == BondOrder::Single && self.amine_like_n(k)
                        })
                });
                if amino_c2 {
                    shift += 3.0;
                    path = "2-amino +3.0".into();
                    extra += 0.5;
                }
            } else {
                continue;
            }
            for &a in &atoms {
                used[a] = true;
            }
            atoms.extend(pyrrole_n);
            self.push(class, atoms, shift, path, extra);
        }
    }

    /// Exocyclic N that donates like an amino group (NH2, NHR, NR2 on carbon, not acylated).
    fn amine_like_n(&self, k: usize) -> bool {
        let v = self.v;
        v.z(k) == 7
            && !v.aromatic(k)
            && v.charge(k) == 0
            && v.degree(k) + usize::from(v.h(k)) == 3
            && v.heavy(k)
                .all(|(j, o)| o == BondOrder::Single && v.z(j) == 6 && !v.is_acyl_like(j))
    }

    fn pyridine_substituents(&self, ring: &[usize], n: usize) -> (f64, String, f64) {
        let v = self.v;
        let mut shift = 0.0;
        let mut parts = Vec::new();
        let mut extra = 0.0;
        for (atom, sub, _) in ring_substituents(v, ring) {
            let Some(dist) = ring_distance(ring, n, atom) else {
                continue;
            };
            let (sm, sp, _) = sub.sigma();
            let delta = match dist {
                1 => {
                    extra += ORTHO_EXTRA_SPREAD;
                    sub.pyridine_ortho_shift()
                }
                2 => -RHO_PYRIDINIUM * sm,
                3 => -RHO_PYRIDINIUM * sp,
                _ => continue,
            };
            shift += delta;
            if delta != 0.0 {
                parts.push(format!("{}-{sub:?} {delta:+.2}", dist + 1));
            }
        }
        let shift = shift.clamp(-7.0, 5.0);
        (shift, parts.join(", "), extra)
    }

    /// Hammett correction for a reaction centre attached at ring atom `ipso`.
    fn hammett(&self, ipso: usize, rho: f64, kind: HammettKind) -> (f64, String, f64) {
        let v = self.v;
        let Some(ring) = v
            .graph()
            .rings
            .iter()
            .filter(|r| {
                r.len() == 6 && r.contains(&ipso) && r.iter().all(|&a| a < v.len() && v.aromatic(a))
            })
            .min_by_key(|r| r.iter().min().copied())
        else {
            return (0.0, String::new(), 0.3);
        };
        let mut shift = 0.0;
        let mut extra = 0.0;
        let mut parts = Vec::new();
        let hetero = ring.iter().any(|&a| v.z(a) != 6);
        if hetero {
            // Heteroaromatic ring: Hammett constants for benzene do not apply; widen the spread.
            extra += 1.0;
        }
        for (atom, sub, centre) in ring_substituents(v, ring) {
            if centre == Some(ipso) {
                continue;
            }
            let Some(dist) = ring_distance(ring, ipso, atom) else {
                continue;
            };
            let (sm, sp, spm) = sub.sigma();
            let sigma_para = match kind {
                HammettKind::Benzoic => sp,
                HammettKind::Phenol | HammettKind::Aniline => spm,
            };
            let delta = match (dist, kind) {
                (0, _) => continue,
                (1, HammettKind::Benzoic) => {
                    extra += ORTHO_EXTRA_SPREAD;
                    sub.benzoic_ortho_shift()
                }
                // Ortho taken as para (common practice, no source) with a wider spread.
                (1, _) => {
                    extra += ORTHO_EXTRA_SPREAD;
                    -rho * sigma_para
                }
                (2, _) => -rho * sm,
                (3, _) => -rho * sigma_para,
                _ => continue,
            };
            shift += delta;
            let position = match dist {
                1 => "o",
                2 => "m",
                _ => "p",
            };
            if delta != 0.0 {
                parts.push(format!("{position}-{sub:?} {delta:+.2}"));
            }
        }
        let shift = shift.clamp(-6.0, 4.0);
        (shift, parts.join(", "), extra)
    }
}

#[derive(Debug, Clone, Copy, PartialEq)]
enum HammettKind {
    Benzoic,
    Phenol,
    Aniline,
}

/// Join two correction descriptions, skipping empty ones.
fn join_path(first: &str, rest: &str) -> String {
    match (first.is_empty(), rest.is_empty()) {
        (_, true) => first.to_string(),
        (true, false) => rest.to_string(),
        (false, false) => format!("{first}, {rest}"),
    }
}

fn round2(x: f64) -> f64 {
    (x * 100.0).round() / 100.0
}

/// True when ring atom `k` carries an exocyclic =O or =S.
fn exocyclic_oxo(v: &GraphView<'_>, k: usize) -> bool {
    v.z(k) == 6
        && v.heavy(k)
            .any(|(j, o)| o == BondOrder::Double && matches!(v.z(j), 8 | 16) && v.degree(j) == 1)
}

/// True when the aromatic ring of atom `r` (smallest ring containing it) has a non-carbon atom.
fn ring_has_heteroatom(v: &GraphView<'_>, r: usize) -> bool {
    v.smallest_ring(r)
        .is_some_and(|ring| ring.iter().any(|&a| a < v.len() && v.z(a) != 6))
}

/// Shortest distance along the ring between two ring atoms (0..=3 for a 6-ring).
fn ring_distance(ring: &[usize], a: usize, b: usize) -> Option<usize> {
    let ia = ring.iter().position(|&x| x == a)?;
    let ib = ring.iter().position(|&x| x == b)?;
    let d = ia.abs_diff(ib);
    Some(d.min(ring.len() - d))
}

/// Substituents on ring atoms: (ring atom, substituent class, Some(ring atom) when the
/// substituent is itself a reaction centre we skip for that atom).
fn ring_substituents(
    v: &GraphView<'_>,
    ring: &[usize],
) -> Vec<(usize, Substituent, Option<usize>)> {
    let mut out = Vec::new();
    for &r in ring {
        if r >= v.len() {
            continue;
        }
        for (s, o) in v.heavy(r) {
            if ring.contains(&s) || o != BondOrder::Single {
                continue;
            }
            // Ring-fusion atoms belong to another aromatic ring sharing this bond: not substituents.
            if v.aromatic(s) && v.in_ring(s) && v.heavy(s).any(|(k, _)| ring.contains(&k) && k != r)
            {
                continue;
            }
            if let Some(sub) = classify_substituent(v, s, r) {
                out.push((r, sub, Some(r)));
            }
        }
    }
    out
}

/// Classify the substituent whose first atom is `s`, attached to ring atom `r`.
fn classify_substituent(v: &GraphView<'_>, s: usize, r: usize) -> Option<Substituent> {
    use Substituent::*;
    let others: Vec<(usize, BondOrder)> = v.heavy(s).filter(|&(j, _)| j != r).collect();
    Some(match v.z(s) {
        9 => Fluoro,
        17 => Chloro,
        35 => Bromo,
        53 => Iodo,
        7 => {
            let o_count = others.iter().filter(|&&(j, _)| v.z(j) == 8).count();
            if o_count >= 2 {
                Nitro
            } else if v.aromatic(s) {
                return None;
            } else if others.iter().any(|&(j, _)| v.is_acyl_like(j)) {
                Acylamino
            } else if others
                .iter()
                .all(|&(j, o)| o == BondOrder::Single && v.z(j) == 6)
            {
                Amino
            } else {
                return None;
            }
        }
        8 => {
            if v.h(s) >= 1 {
                Hydroxy
            } else if others.iter().any(|&(j, _)| v.is_acyl_like(j)) {
                Acylamino // acyloxy: sigma close to acylamino (OAc 0.39/0.31); rough
            } else {
                Alkoxy
            }
        }
        16 => {
            if v.doubles_to(s, 8).len() >= 2 {
                Sulfonyl
            } else if v.doubles_to(s, 8).is_empty() {
                Alkylthio
            } else {
                Sulfonyl
            }
        }
        6 if v.aromatic(s) => return None,
        6 => {
            let f = others.iter().filter(|&&(j, _)| v.z(j) == 9).count();
            if f == 3 {
                Trifluoromethyl
            } else if others
                .iter()
                .any(|&(j, o)| o == BondOrder::Triple && v.z(j) == 7)
            {
                Cyano
            } else if v.double_to(s, 8) {
                if others
                    .iter()
                    .any(|&(j, o)| o == BondOrder::Single && v.z(j) == 8)
                {
                    Ester
                } else if others
                    .iter()
                    .any(|&(j, o)| o == BondOrder::Single && v.z(j) == 7)
                {
                    Carboxamide
                } else {
                    Acyl
                }
            } else {
                Alkyl
            }
        }
        _ => return None,
    })
}

/// Replace estimates by experimental pKa values from the knowledge base.
///
/// Rule: typed values are matched by rank. Acidic values, sorted ascending, replace the acid
/// sites' estimates taken from the most acidic (lowest estimated pKa) upwards; basic values,
/// sorted descending, replace the base sites' estimates from the most basic (highest) down.
/// An untyped value replaces the estimate nearest to it among the sites not yet replaced
/// (ties: lower site index). Values that find no site are returned in `unmatched`. Replaced
/// sites get [`PkaSource::Experimental`] and spread [`EXPERIMENTAL_SPREAD_PKA`]. The result is
/// re-sorted as [`detect_sites`] sorts.
///
/// # Errors
/// [`IonisableError::ExperimentalOutOfRange`] for a non-finite value or one outside -5..=20.
pub fn apply_experimental(
    sites: &[IonisableSite],
    experimental: &[(f64, Option<AcidBase>)],
) -> Result<ExperimentalMerge, IonisableError> {
    for &(value, _) in experimental {
        if !value.is_finite() || !(-5.0..=20.0).contains(&value) {
            return Err(IonisableError::ExperimentalOutOfRange { value });
        }
    }
    let mut out: Vec<IonisableSite> = sites.to_vec();
    let mut replaced = vec![false; out.len()];
    let mut unmatched = Vec::new();
    let set = |site: &mut IonisableSite, value: f64| {
        site.pka = Some(value);
        site.spread_pka = EXPERIMENTAL_SPREAD_PKA;
        site.pka_source = PkaSource::Experimental;
    };
    for (kind, ascending) in [(AcidBase::Acid, true), (AcidBase::Base, false)] {
        let site_kind = match kind {
            AcidBase::Acid => SiteKind::Acid,
            AcidBase::Base => SiteKind::Base,
        };
        let mut values: Vec<f64> = experimental
            .iter()
            .filter(|(_, k)| *k == Some(kind))
            .map(|(v, _)| *v)
            .collect();
        let mut idx: Vec<usize> = (0..out.len())
            .filter(|&i| out[i].kind == site_kind && out[i].pka.is_some())
            .collect();
        let key = |i: &usize| out[*i].pka.unwrap_or(f64::NAN);
        if ascending {
            values.sort_by(f64::total_cmp);
            idx.sort_by(|a, b| key(a).total_cmp(&key(b)).then(a.cmp(b)));
        } else {
            values.sort_by(|a, b| b.total_cmp(a));
            idx.sort_by(|a, b| key(b).total_cmp(&key(a)).then(a.cmp(b)));
        }
        let mut it = idx.into_iter();
        for value in values {
            match it.next() {
                Some(i) => {
                    set(&mut out[i], value);
                    replaced[i] = true;
                }
                None => unmatched.push((value, Some(kind))),
            }
        }
    }
    for &(value, kind) in experimental.iter().filter(|(_, k)| k.is_none()) {
        let best = (0..out.len())
            .filter(|&i| !replaced[i])
            .filter_map(|i| out[i].pka.map(|p| (i, (p - value).abs())))
            .min_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)));
        match best {
            Some((i, _)) => {
                set(&mut out[i], value);
                replaced[i] = true;
            }
            None => unmatched.push((value, kind)),
        }
    }
    Ok(ExperimentalMerge {
        sites: out,
        unmatched,
    })
}

/// The most acidic acid site (lowest pKa), if any.
pub fn most_acidic(sites: &[IonisableSite]) -> Option<&IonisableSite> {
    sites
        .iter()
        .filter(|s| s.kind == SiteKind::Acid && s.pka.is_some())
        .min_by(|a, b| {
            a.pka
                .unwrap_or(f64::NAN)
                .total_cmp(&b.pka.unwrap_or(f64::NAN))
        })
}

/// The most basic base site (highest conjugate-acid pKa), if any.
pub fn most_basic(sites: &[IonisableSite]) -> Option<&IonisableSite> {
    sites
        .iter()
        .filter(|s| s.kind == SiteKind::Base && s.pka.is_some())
        .max_by(|a, b| {
            a.pka
                .unwrap_or(f64::NAN)
                .total_cmp(&b.pka.unwrap_or(f64::NAN))
                .then(b.atoms.cmp(&a.atoms))
        })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;

    fn sites(smiles: &str) -> Vec<IonisableSite> {
        let g = parse_smiles(smiles).expect("test SMILES parses").graph;
        detect_sites(&g).expect("valid graph")
    }

    fn classes(smiles: &str) -> Vec<GroupClass> {
        sites(smiles).iter().map(|s| s.class).collect()
    }

    fn only(smiles: &str) -> IonisableSite {
        let s = sites(smiles);
        assert_eq!(s.len(), 1, "{smiles}: {s:?}");
        s[0].clone()
    }

    // Reference values in these tests: CRC Handbook-type parent pKa values, from memory.
    #[test]
    fn acids_are_detected_with_class_values() {
        assert_eq!(only("CC(=O)O").class, GroupClass::CarboxylicAcid);
        assert_eq!(only("OC(=O)c1ccccc1").pka, Some(4.2));
        assert_eq!(only("CS(=O)(=O)O").class, GroupClass::SulfonicAcid);
        assert_eq!(only("Oc1ccccc1").pka, Some(10.0));
        assert_eq!(only("CCS").class, GroupClass::Thiol);
        assert_eq!(only("Cc1nnn[nH]1").class, GroupClass::Tetrazole);
        assert_eq!(only("O=C1CCC(=O)N1").class, GroupClass::Imide);
        assert_eq!(
            only("CC(=O)NS(=O)(=O)c1ccccc1").class,
            GroupClass::AcylSulfonamide
        );
        assert_eq!(only("NS(=O)(=O)c1ccccc1").class, GroupClass::Sulfonamide);
        assert_eq!(
            classes("CP(=O)(O)O"),
            vec![
                GroupClass::PhosphorusAcidFirst,
                GroupClass::PhosphorusAcidSecond
            ]
        );
    }

    #[test]
    fn pre_ionised_forms_are_the_same_site() {
        let neutral = only("CC(=O)O");
        let ionised = only("CC(=O)[O-]");
        assert_eq!(neutral.class, ionised.class);
        assert_eq!(neutral.pka, ionised.pka);
        assert!(ionised.ionised_in_input && !neutral.ionised_in_input);
        assert_eq!(only("CC[NH3+]").class, GroupClass::PrimaryAmine);
        assert_eq!(only("c1cc[nH+]cc1").class, GroupClass::PyridineNitrogen);
    }

    #[test]
    fn amines_but_not_amides() {
        assert_eq!(only("CCN").pka, Some(10.6));
        assert_eq!(only("CCNCC").class, GroupClass::SecondaryAmine);
        assert_eq!(only("CCN(CC)CC").class, GroupClass::TertiaryAmine);
        assert!(sites("CC(=O)N").is_empty(), "acetamide is not basic");
        assert!(sites("CC(=O)NC").is_empty());
        assert_eq!(only("Nc1ccccc1").class, GroupClass::Aniline);
        assert_eq!(only("Nc1ccccc1").pka, Some(4.6));
        // Morpholine 8.4 (from memory): two beta-O paths.
        let m = only("C1COCCN1");
        assert!((m.pka.unwrap_or(0.0) - 8.4).abs() < 0.3, "{m:?}");
    }

    #[test]
    fn amidines_guanidines_azines() {
        assert_eq!(only("CC(=N)N").class, GroupClass::Amidine);
        assert_eq!(only("NC(=N)N").class, GroupClass::Guanidine);
        assert_eq!(only("c1ccncc1").pka, Some(5.2));
        assert_eq!(only("c1c[nH]cn1").class, GroupClass::ImidazoleNitrogen);
        assert_eq!(
            only("c1ccc2[nH]cnc2c1").class,
            GroupClass::BenzimidazoleNitrogen
        );
        assert_eq!(only("c1cncnc1").class, GroupClass::DiazineNitrogen);
        assert!(sites("c1cc[nH]c1").is_empty(), "pyrrole is not basic");
        // 4-Aminopyridine 9.2 (from memory).
        let p = only("Nc1ccncc1");
        assert!((p.pka.unwrap_or(0.0) - 9.2).abs() < 0.5, "{p:?}");
    }

    #[test]
    fn hammett_corrections_move_the_right_way() {
        // 4-Nitrophenol 7.15 (from memory).
        let p = only("Oc1ccc(cc1)[N+](=O)[O-]");
        assert!((p.pka.unwrap_or(0.0) - 7.15).abs() < 0.3, "{p:?}");
        // 4-Nitrobenzoic acid 3.44.
        let b = only("OC(=O)c1ccc(cc1)[N+](=O)[O-]");
        assert!((b.pka.unwrap_or(0.0) - 3.44).abs() < 0.2, "{b:?}");
        // 4-Chloroaniline 4.0.
        let a = only("Nc1ccc(Cl)cc1");
        assert!((a.pka.unwrap_or(0.0) - 4.0).abs() < 0.3, "{a:?}");
    }

    #[test]
    fn permanent_charges() {
        let q = only("C[N+](C)(C)C");
        assert_eq!(q.kind, SiteKind::PermanentCation);
        assert_eq!(q.pka, None);
        assert_eq!(only("C[S+](C)C").class, GroupClass::Sulfonium);
        assert!(
            sites("C[N+](C)(C)[O-]").is_empty(),
            "N-oxide is not a permanent charge"
        );
        assert!(sites("C[N+](=O)[O-]").is_empty(), "nitro is not ionisable");
    }

    #[test]
    fn zwitterion_amino_acid() {
        let s = sites("NCC(=O)O");
        assert_eq!(s.len(), 2);
        assert!(s.iter().any(|x| x.class == GroupClass::AminoAcidCarboxyl));
        assert!(s.iter().any(|x| x.class == GroupClass::PrimaryAmine));
        assert_eq!(sites("[NH3+]CC(=O)[O-]").len(), 2);
    }

    #[test]
    fn experimental_values_win_by_rank() {
        let s = sites("NCC(=O)O");
        let merged = apply_experimental(
            &s,
            &[(2.35, Some(AcidBase::Acid)), (9.78, Some(AcidBase::Base))],
        )
        .expect("valid values");
        assert!(merged.unmatched.is_empty());
        let acid = most_acidic(&merged.sites).expect("acid");
        assert_eq!(acid.pka, Some(2.35));
        assert_eq!(acid.pka_source, PkaSource::Experimental);
        assert_eq!(most_basic(&merged.sites).and_then(|b| b.pka), Some(9.78));
        // Untyped: nearest estimate.
        let m = apply_experimental(&s, &[(9.0, None)]).expect("valid");
        assert_eq!(most_basic(&m.sites).and_then(|b| b.pka), Some(9.0));
        // No acid site for a second acid value.
        let m = apply_experimental(
            &s,
            &[(2.0, Some(AcidBase::Acid)), (3.0, Some(AcidBase::Acid))],
        )
        .expect("valid");
        assert_eq!(m.unmatched, vec![(3.0, Some(AcidBase::Acid))]);
        assert!(apply_experimental(&s, &[(f64::NAN, None)]).is_err());
        assert!(apply_experimental(&s, &[(25.0, None)]).is_err());
    }

    #[test]
    fn malformed_graph_is_an_error_not_a_panic() {
        let mut g = parse_smiles("CCO").expect("parses").graph;
        g.neighbours[0].push((99, 0));
        assert!(detect_sites(&g).is_err());
    }

    #[test]
    fn output_is_sorted_and_deterministic() {
        let a = sites("NCCc1ccc(O)c(O)c1");
        let b = sites("NCCc1ccc(O)c(O)c1");
        assert_eq!(a, b);
        let firsts: Vec<_> = a.iter().map(|s| s.atoms[0]).collect();
        let mut sorted = firsts.clone();
        sorted.sort_unstable();
        assert_eq!(firsts, sorted);
    }
}
