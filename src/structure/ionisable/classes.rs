//! The data tables of the typical-value pKa method: group-class values and spreads, Hammett
//! substituent constants and reaction constants, aliphatic-amine decrements.

use super::*;

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

pub(super) fn kind_of(class: GroupClass) -> SiteKind {
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
pub(super) enum Substituent {
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
    /// The substituent in plain words, as a pKa estimate's path shows it.
    pub(super) fn words(self) -> &'static str {
        use Substituent::*;
        match self {
            Nitro => "nitro",
            Cyano => "cyano",
            Trifluoromethyl => "trifluoromethyl",
            Fluoro => "fluoro",
            Chloro => "chloro",
            Bromo => "bromo",
            Iodo => "iodo",
            Alkyl => "alkyl",
            Alkoxy => "alkoxy",
            Hydroxy => "hydroxy",
            Amino => "amino",
            Acylamino => "acylamino",
            Acyl => "acyl",
            Ester => "ester",
            Carboxamide => "carboxamide",
            Sulfonyl => "sulfonyl",
            Alkylthio => "alkylthio",
        }
    }

    pub(super) fn sigma(self) -> (f64, f64, f64) {
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
    pub(super) fn pyridine_ortho_shift(self) -> f64 {
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
    pub(super) fn benzoic_ortho_shift(self) -> f64 {
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
pub(super) const RHO_BENZOIC: f64 = 1.00;
pub(super) const RHO_PHENOL: f64 = 2.23;
pub(super) const RHO_ANILINIUM: f64 = 2.89;
pub(super) const RHO_PYRIDINIUM: f64 = 5.9;

/// Extra spread when an ortho substituent is present (Hammett treats ortho poorly;
/// common practice, no source).
pub(super) const ORTHO_EXTRA_SPREAD: f64 = 0.5;

// ---------------------------------------------------------------------------------------------
// Aliphatic amine decrements, from memory in the style of Perrin et al. 1981.
// ---------------------------------------------------------------------------------------------

/// Per aryl or vinyl group on a carbon α to the amine N (benzylamine 9.3 vs 10.6).
pub(super) const AMINE_ALPHA_ARYL: f64 = -1.1;
/// Per alkynyl group on a carbon α to the amine N (propargylamine 8.15 vs 10.7).
pub(super) const AMINE_ALPHA_ALKYNYL: f64 = -2.5;
/// Per nitrile on a carbon β to the amine N (3-aminopropionitrile 7.7 vs propylamine 10.6).
pub(super) const AMINE_BETA_NITRILE: f64 = -2.9;
/// Per carbonyl on a carbon β to the amine N (β-alanine esters, Mannich bases; about 9.1).
pub(super) const AMINE_BETA_CARBONYL: f64 = -1.2;
/// Per carbonyl (ketone, amide, ester) on a carbon α to the amine N (glycinamide 8.0).
pub(super) const AMINE_ALPHA_CARBONYL: f64 = -2.2;
/// α-Carboxylic acid (amino-acid amine 9.6-9.8 vs 10.6).
pub(super) const AMINE_ALPHA_CARBOXYL: f64 = -0.9;
/// Per nitrile on a carbon α to the amine N (aminoacetonitrile 5.3).
pub(super) const AMINE_ALPHA_NITRILE: f64 = -5.0;
/// Per sulfonyl on a carbon α to the amine N.
pub(super) const AMINE_ALPHA_SULFONYL: f64 = -3.0;
/// Per O, N or S on a carbon β to the amine N, N-C-C-X (2-methoxyethylamine 9.4,
/// morpholine 8.4 vs piperidine 11.1 over two paths).
pub(super) const AMINE_BETA_HETEROATOM: f64 = -1.3;
/// Per O, N or S directly on a carbon α to the amine N (aminals, N-C-O); author's judgement.
pub(super) const AMINE_ALPHA_HETEROATOM: f64 = -2.0;
/// Per F or Cl on a carbon β to the amine N (2-fluoroethylamine 9.0, 2,2,2-trifluoroethylamine 5.7).
pub(super) const AMINE_BETA_HALOGEN: f64 = -1.7;
/// Largest total decrement applied (keeps stacked corrections physical; common practice, no source).
pub(super) const AMINE_MAX_DECREMENT: f64 = -6.0;
/// Extra spread per correction applied (the decrements are not exactly additive; author's judgement).
pub(super) const SPREAD_PER_CORRECTION: f64 = 0.15;
