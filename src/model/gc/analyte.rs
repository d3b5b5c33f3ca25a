//! What the GC model needs to know about an analyte.

use serde::Serialize;

use super::GcError;

/// Substitution pattern of a disubstituted benzene ring, which sets a small dipole-like increment
/// on polar phases (p-isomers of symmetric substituents have no dipole; the ortho and meta isomers
/// are retained more on polyethylene glycol: common practice, no source).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum RingSubstitution {
    /// Not a disubstituted benzene, or unknown.
    #[default]
    NotApplicable,
    /// 1,2-disubstituted.
    Ortho,
    /// 1,3-disubstituted.
    Meta,
    /// 1,4-disubstituted.
    Para,
}

/// What the GC model needs to know about an analyte; the structure engine fills it.
/// Counts are of functional groups, not atoms (a carboxylic acid is one `n_carboxylic_acid`, not a
/// carbonyl plus a hydroxyl; an ester is one `n_ester`, not a carbonyl plus an ether).
#[derive(Debug, Clone, PartialEq, Default, Serialize, serde::Deserialize)]
#[serde(default)]
pub struct GcAnalyte {
    /// Normal boiling point.
    pub tb_k: f64,
    /// Standard uncertainty of `tb_k`: the advisor gives 1 K for an experimental value and
    /// Joback's `typical_error_k` (18 K and more) for the group-contribution estimate.
    pub tb_sigma_k: f64,
    /// Molar mass.
    pub molar_mass_g_mol: f64,
    /// Aromatic rings (benzene-like and heteroaromatic).
    pub n_aromatic_rings: u32,
    /// Alcohol or phenol hydroxyl groups.
    pub n_hydroxyl: u32,
    /// Carboxylic acid groups.
    pub n_carboxylic_acid: u32,
    /// Ketone and aldehyde carbonyl groups.
    pub n_carbonyl: u32,
    /// Ether oxygens.
    pub n_ether: u32,
    /// Ester groups.
    pub n_ester: u32,
    /// Nitrile groups.
    pub n_nitrile: u32,
    /// Nitro groups.
    pub n_nitro: u32,
    /// Halogen atoms (F, Cl, Br, I).
    pub n_halogen: u32,
    /// Aliphatic or aromatic amine nitrogens (not pyridine-like).
    pub n_amine: u32,
    /// Pyridine-like aromatic nitrogens (lone pair in the ring plane).
    pub n_pyridine_like: u32,
    /// Pattern of a disubstituted benzene ring.
    pub ring_substitution: RingSubstitution,
    /// `Some(n)` when the analyte is the n-alkane with n carbons (its index is 100 n by definition).
    pub is_n_alkane_carbon_count: Option<u32>,
}

impl GcAnalyte {
    /// Checks the numeric fields.
    ///
    /// # Errors
    /// [`GcError::BadAnalyte`] naming the field.
    pub fn validate(&self) -> Result<(), GcError> {
        // 20-1000 K spans hydrogen to the heaviest analytes a GC elutes (plausibility, no source).
        if !(self.tb_k.is_finite() && (20.0..=1000.0).contains(&self.tb_k)) {
            return Err(GcError::BadAnalyte {
                field: "tb_k",
                value: self.tb_k,
                reason: "must be a boiling point between 20 and 1000 K",
            });
        }
        if !(self.tb_sigma_k.is_finite() && (0.0..=100.0).contains(&self.tb_sigma_k)) {
            return Err(GcError::BadAnalyte {
                field: "tb_sigma_k",
                value: self.tb_sigma_k,
                reason: "must be between 0 and 100 K",
            });
        }
        if !(self.molar_mass_g_mol.is_finite() && (1.0..=2000.0).contains(&self.molar_mass_g_mol)) {
            return Err(GcError::BadAnalyte {
                field: "molar_mass_g_mol",
                value: self.molar_mass_g_mol,
                reason: "must be between 1 and 2000 g/mol",
            });
        }
        if let Some(n) = self.is_n_alkane_carbon_count
            && !(1..=MAX_CARBON).contains(&n)
        {
            return Err(GcError::BadAnalyte {
                field: "is_n_alkane_carbon_count",
                value: f64::from(n),
                reason: "must be between 1 and 60",
            });
        }
        Ok(())
    }

    /// Very volatile analytes (below about 250 K or 45 g/mol) are poorly retained on liquid-film
    /// phases; porous-layer phases or thick films suit them (common practice, no source).
    pub fn is_very_volatile(&self) -> bool {
        self.tb_k < 250.0 || self.molar_mass_g_mol < 45.0
    }
}

/// Largest n-alkane of the ladder.
pub const MAX_CARBON: u32 = 60;
