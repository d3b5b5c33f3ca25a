//! Mobile phases and carriers: LC solvents, buffers and additives, IC eluents, GC carrier gases.

use serde::Serialize;

use super::super::PhaseError;
use super::super::tsv::Row;
use super::parse_id;
use super::stationary::{IcExchanger, PhaseMode};

/// Accessors `fn field(&self) -> &str` for `String` fields of the same name, with their docs;
/// the records of this file share most of them (id, name, formula, hazards, notes, source).
macro_rules! text_accessors {
    ($($(#[$doc:meta])* $field:ident),+ $(,)?) => {
        $(
            $(#[$doc])*
            pub fn $field(&self) -> &str {
                &self.$field
            }
        )+
    };
}

/// Whether a solvent can be used with mass-spectrometric detection.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum MsCompatibility {
    /// Compatible.
    Yes,
    /// Usable with care (see notes).
    Limited,
    /// Not compatible.
    No,
}

impl MsCompatibility {
    fn parse(text: &str) -> Option<Self> {
        match text {
            "yes" => Some(Self::Yes),
            "limited" => Some(Self::Limited),
            "no" => Some(Self::No),
            _ => None,
        }
    }
}

/// An LC solvent (organic modifier or water).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Solvent {
    id: String,
    name: String,
    formula: String,
    uv_cutoff_nm: f64,
    viscosity_mpa_s_25c: f64,
    eps0_silica: Option<f64>,
    rp_strength: f64,
    polarity_index: f64,
    boiling_point_c: f64,
    flash_point_c: Option<f64>,
    hazards: String,
    ms_compatible: MsCompatibility,
    notes: String,
    source: String,
}

impl Solvent {
    pub(crate) const COLUMNS: [&'static str; 14] = [
        "id",
        "name",
        "formula",
        "uv_cutoff_nm",
        "viscosity_mpa_s_25c",
        "eps0_silica",
        "rp_strength",
        "polarity_index",
        "boiling_point_c",
        "flash_point_c",
        "hazards",
        "ms_compatible",
        "notes",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let ms_text = row.text("ms_compatible")?;
        Ok(Self {
            id: parse_id(row)?,
            name: row.text("name")?.to_string(),
            formula: row.text("formula")?.to_string(),
            // Plausible ranges (common practice, no source): UV cutoffs 180-400 nm, viscosities
            // 0.1-5 mPa s, Snyder eps0 on silica 0-1, RP strength 0-6, P' 0-11.
            uv_cutoff_nm: row.number_in("uv_cutoff_nm", 180.0, 400.0)?,
            viscosity_mpa_s_25c: row.number_in("viscosity_mpa_s_25c", 0.1, 5.0)?,
            eps0_silica: row.opt_number_in("eps0_silica", 0.0, 1.0)?,
            rp_strength: row.number_in("rp_strength", 0.0, 6.0)?,
            polarity_index: row.number_in("polarity_index", 0.0, 11.0)?,
            boiling_point_c: row.number_in("boiling_point_c", 20.0, 250.0)?,
            flash_point_c: row.opt_number_in("flash_point_c", -60.0, 200.0)?,
            hazards: row.text("hazards")?.to_string(),
            ms_compatible: MsCompatibility::parse(ms_text)
                .ok_or_else(|| row.bad("ms_compatible", ms_text, "must be yes, limited or no"))?,
            notes: row.text("notes")?.to_string(),
            source: row.text("source")?.to_string(),
        })
    }

    text_accessors! {
        /// Stable id (`acetonitrile`, `water`, ...).
        id,
        /// Name.
        name,
        /// Formula.
        formula,
    }
    /// UV cutoff wavelength.
    pub fn uv_cutoff_nm(&self) -> f64 {
        self.uv_cutoff_nm
    }
    /// Dynamic viscosity at 25 C.
    pub fn viscosity_mpa_s_25c(&self) -> f64 {
        self.viscosity_mpa_s_25c
    }
    /// Snyder eluotropic strength on silica (dimensionless), where defined.
    pub fn eps0_silica(&self) -> Option<f64> {
        self.eps0_silica
    }
    /// Reversed-phase solvent strength S (water = 0, dimensionless).
    pub fn rp_strength(&self) -> f64 {
        self.rp_strength
    }
    /// Snyder polarity index P'.
    pub fn polarity_index(&self) -> f64 {
        self.polarity_index
    }
    /// Normal boiling point.
    pub fn boiling_point_c(&self) -> f64 {
        self.boiling_point_c
    }
    /// Closed-cup flash point (`None` for non-flammable water).
    pub fn flash_point_c(&self) -> Option<f64> {
        self.flash_point_c
    }
    text_accessors! {
        /// GHS-style hazards in words.
        hazards,
    }
    /// MS compatibility.
    pub fn ms_compatible(&self) -> MsCompatibility {
        self.ms_compatible
    }
    text_accessors! {
        /// Practical notes.
        notes,
        /// Where the values come from.
        source,
    }
}

/// What a buffer or additive row is used as.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum BufferRole {
    /// A buffer used within pKa +/- 1.
    Buffer,
    /// An acid added to set a low pH (little capacity at that pH).
    AcidAdditive,
    /// A base added to set a high pH.
    BaseAdditive,
    /// An ion-pairing additive.
    IonPair,
}

impl BufferRole {
    fn parse(text: &str) -> Option<Self> {
        match text {
            "buffer" => Some(Self::Buffer),
            "acid_additive" => Some(Self::AcidAdditive),
            "base_additive" => Some(Self::BaseAdditive),
            "ion_pair" => Some(Self::IonPair),
            _ => None,
        }
    }
}

/// Typical concentration of a buffer or additive.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TypicalConcentration {
    /// Millimolar.
    Mm(f64),
    /// Percent volume per volume.
    PctVV(f64),
}

/// A buffer pair or additive at one pKa.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Buffer {
    id: String,
    name: String,
    species: String,
    role: BufferRole,
    pka_25c: f64,
    uv_cutoff_nm: f64,
    volatile: bool,
    typical_concentration: TypicalConcentration,
    notes: String,
    source: String,
}

impl Buffer {
    pub(crate) const COLUMNS: [&'static str; 11] = [
        "id",
        "name",
        "species",
        "role",
        "pka_25c",
        "uv_cutoff_nm",
        "volatile",
        "typical_conc_mm",
        "typical_conc_pct_v_v",
        "notes",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let role_text = row.text("role")?;
        let volatile_text = row.text("volatile")?;
        let volatile = match volatile_text {
            "yes" => true,
            "no" => false,
            other => return Err(row.bad("volatile", other, "must be yes or no")),
        };
        // Plausible ranges (common practice, no source): 0.1-200 mM, 0.001-5 % v/v.
        let typical_concentration = match (
            row.opt_number_in("typical_conc_mm", 0.1, 200.0)?,
            row.opt_number_in("typical_conc_pct_v_v", 0.001, 5.0)?,
        ) {
            (Some(mm), None) => TypicalConcentration::Mm(mm),
            (None, Some(pct)) => TypicalConcentration::PctVV(pct),
            _ => {
                return Err(row.bad(
                    "typical_conc_mm",
                    row.cell("typical_conc_mm"),
                    "give exactly one of typical_conc_mm and typical_conc_pct_v_v",
                ));
            }
        };
        Ok(Self {
            id: parse_id(row)?,
            name: row.text("name")?.to_string(),
            species: row.text("species")?.to_string(),
            role: BufferRole::parse(role_text).ok_or_else(|| {
                row.bad(
                    "role",
                    role_text,
                    "must be buffer, acid_additive, base_additive or ion_pair",
                )
            })?,
            pka_25c: row.number_in("pka_25c", -2.0, 14.0)?,
            uv_cutoff_nm: row.number_in("uv_cutoff_nm", 180.0, 400.0)?,
            volatile,
            typical_concentration,
            notes: row.text("notes")?.to_string(),
            source: row.text("source")?.to_string(),
        })
    }

    text_accessors! {
        /// Stable id (`phosphate-2`, `formic-acid`, ...).
        id,
        /// Name.
        name,
        /// Acid/base pair.
        species,
    }
    /// Role (buffer, additive, ion pair).
    pub fn role(&self) -> BufferRole {
        self.role
    }
    /// pKa at 25 C in water.
    pub fn pka_25c(&self) -> f64 {
        self.pka_25c
    }
    /// Useful buffering range pKa +/- 1 (common practice, no source), as (low, high) pH.
    pub fn useful_ph_range(&self) -> (f64, f64) {
        (self.pka_25c - 1.0, self.pka_25c + 1.0)
    }
    /// UV cutoff at the typical concentration.
    pub fn uv_cutoff_nm(&self) -> f64 {
        self.uv_cutoff_nm
    }
    /// Volatile, hence usable with MS and evaporative detectors.
    pub fn volatile(&self) -> bool {
        self.volatile
    }
    /// Typical concentration.
    pub fn typical_concentration(&self) -> TypicalConcentration {
        self.typical_concentration
    }
    /// Typical concentration in mM, when given in mM.
    pub fn typical_conc_mm(&self) -> Option<f64> {
        match self.typical_concentration {
            TypicalConcentration::Mm(value) => Some(value),
            TypicalConcentration::PctVV(_) => None,
        }
    }
    /// Typical concentration in % v/v, when given in % v/v.
    pub fn typical_conc_pct_v_v(&self) -> Option<f64> {
        match self.typical_concentration {
            TypicalConcentration::PctVV(value) => Some(value),
            TypicalConcentration::Mm(_) => None,
        }
    }
    text_accessors! {
        /// Notes (precipitation, pH limits, MS behaviour).
        notes,
        /// Where the values come from.
        source,
    }
}

/// An ion-chromatography eluent.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IcEluent {
    id: String,
    name: String,
    mode: PhaseMode,
    competing_ion: String,
    eluent_charge: u8,
    typical_conc_min_mm: f64,
    typical_conc_max_mm: f64,
    reference_conc_mm: f64,
    suppression: String,
    suppressed_background_us_cm: Option<f64>,
    compatible_exchangers: Vec<IcExchanger>,
    hazards: String,
    notes: String,
    source: String,
}

impl IcEluent {
    pub(crate) const COLUMNS: [&'static str; 14] = [
        "id",
        "name",
        "mode",
        "competing_ion",
        "eluent_charge",
        "typical_conc_min_mm",
        "typical_conc_max_mm",
        "reference_conc_mm",
        "suppression",
        "suppressed_background_us_cm",
        "compatible_exchangers",
        "hazards",
        "notes",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let mode_text = row.text("mode")?;
        let mode = match PhaseMode::parse(mode_text) {
            Some(mode @ (PhaseMode::IcAnion | PhaseMode::IcCation | PhaseMode::IonExclusion)) => {
                mode
            }
            _ => {
                return Err(row.bad(
                    "mode",
                    mode_text,
                    "must be ic-anion, ic-cation or ion-exclusion",
                ));
            }
        };
        let charge = row.number_in("eluent_charge", 1.0, 3.0)?;
        if charge.fract() != 0.0 {
            return Err(row.bad(
                "eluent_charge",
                row.cell("eluent_charge"),
                "must be 1, 2 or 3",
            ));
        }
        let low = row.number_in("typical_conc_min_mm", 0.01, 500.0)?;
        let high = row.number_in("typical_conc_max_mm", 0.01, 500.0)?;
        let reference = row.number_in("reference_conc_mm", 0.01, 500.0)?;
        if !(low < high && low <= reference && reference <= high) {
            return Err(row.bad(
                "reference_conc_mm",
                row.cell("reference_conc_mm"),
                "needs typical_conc_min_mm < typical_conc_max_mm and the reference between them",
            ));
        }
        let mut compatible_exchangers = Vec::new();
        for item in row.list("compatible_exchangers") {
            let exchanger = IcExchanger::parse(item).ok_or_else(|| {
                row.bad("compatible_exchangers", item, "is not a known exchanger")
            })?;
            if exchanger.mode() != mode {
                return Err(row.bad(
                    "compatible_exchangers",
                    item,
                    format!("does not belong to mode {mode}"),
                ));
            }
            compatible_exchangers.push(exchanger);
        }
        if compatible_exchangers.is_empty() {
            return Err(row.bad("compatible_exchangers", "", "needs at least one exchanger"));
        }
        Ok(Self {
            id: parse_id(row)?,
            name: row.text("name")?.to_string(),
            mode,
            competing_ion: row.text("competing_ion")?.to_string(),
            // Checked above to be 1, 2 or 3, so the cast is exact.
            eluent_charge: charge as u8,
            typical_conc_min_mm: low,
            typical_conc_max_mm: high,
            reference_conc_mm: reference,
            suppression: row.text("suppression")?.to_string(),
            suppressed_background_us_cm: row.opt_number_in(
                "suppressed_background_us_cm",
                0.0,
                100.0,
            )?,
            compatible_exchangers,
            hazards: row.text("hazards")?.to_string(),
            notes: row.text("notes")?.to_string(),
            source: row.text("source")?.to_string(),
        })
    }

    text_accessors! {
        /// Stable id (`koh`, `msa`, ...).
        id,
        /// Name.
        name,
    }
    /// Mode (ic-anion, ic-cation, ion-exclusion).
    pub fn mode(&self) -> PhaseMode {
        self.mode
    }
    text_accessors! {
        /// The competing (eluting) ion.
        competing_ion,
    }
    /// Charge magnitude y of the competing ion.
    pub fn eluent_charge(&self) -> u8 {
        self.eluent_charge
    }
    /// Lower end of the typical concentration range.
    pub fn typical_conc_min_mm(&self) -> f64 {
        self.typical_conc_min_mm
    }
    /// Upper end of the typical concentration range.
    pub fn typical_conc_max_mm(&self) -> f64 {
        self.typical_conc_max_mm
    }
    /// Concentration at which the relative retentions in `ic_ions.tsv` apply.
    pub fn reference_conc_mm(&self) -> f64 {
        self.reference_conc_mm
    }
    text_accessors! {
        /// Suppression (text).
        suppression,
    }
    /// Typical background conductivity after suppression.
    pub fn suppressed_background_us_cm(&self) -> Option<f64> {
        self.suppressed_background_us_cm
    }
    /// Exchanger types this eluent is used with.
    pub fn compatible_exchangers(&self) -> &[IcExchanger] {
        &self.compatible_exchangers
    }
    text_accessors! {
        /// Hazards in words.
        hazards,
        /// Notes.
        notes,
        /// Where the values come from.
        source,
    }
}

/// A GC carrier gas.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CarrierGas {
    id: String,
    name: String,
    formula: String,
    u_opt_min_cm_s: f64,
    u_opt_max_cm_s: f64,
    viscosity_upa_s_25c: f64,
    hazards: String,
    notes: String,
    source: String,
}

impl CarrierGas {
    pub(crate) const COLUMNS: [&'static str; 9] = [
        "id",
        "name",
        "formula",
        "u_opt_min_cm_s",
        "u_opt_max_cm_s",
        "viscosity_upa_s_25c",
        "hazards",
        "notes",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let low = row.number_in("u_opt_min_cm_s", 1.0, 150.0)?;
        let high = row.number_in("u_opt_max_cm_s", 1.0, 150.0)?;
        if low >= high {
            return Err(row.bad(
                "u_opt_max_cm_s",
                row.cell("u_opt_max_cm_s"),
                "must be larger than u_opt_min_cm_s",
            ));
        }
        Ok(Self {
            id: parse_id(row)?,
            name: row.text("name")?.to_string(),
            formula: row.text("formula")?.to_string(),
            u_opt_min_cm_s: low,
            u_opt_max_cm_s: high,
            viscosity_upa_s_25c: row.number_in("viscosity_upa_s_25c", 5.0, 40.0)?,
            hazards: row.text("hazards")?.to_string(),
            notes: row.text("notes")?.to_string(),
            source: row.text("source")?.to_string(),
        })
    }

    text_accessors! {
        /// Stable id (`helium`, `hydrogen`, `nitrogen`).
        id,
        /// Name.
        name,
        /// Formula.
        formula,
    }
    /// Lower end of the optimum average linear velocity.
    pub fn u_opt_min_cm_s(&self) -> f64 {
        self.u_opt_min_cm_s
    }
    /// Upper end of the optimum average linear velocity.
    pub fn u_opt_max_cm_s(&self) -> f64 {
        self.u_opt_max_cm_s
    }
    /// Gas viscosity at 25 C.
    pub fn viscosity_upa_s_25c(&self) -> f64 {
        self.viscosity_upa_s_25c
    }
    text_accessors! {
        /// Hazards and handling in words (flammability, cylinders, leak checks).
        hazards,
        /// Notes.
        notes,
        /// Where the values come from.
        source,
    }
}
