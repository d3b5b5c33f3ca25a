//! Typed records of the phase catalogue. Fields are private; records are built only from
//! validated table rows (`from_row`), so every value a caller sees has passed the range checks.

use serde::Serialize;

use super::PhaseError;
use super::tsv::Row;

/// Separation mode a stationary phase is used in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PhaseMode {
    /// Reversed-phase liquid chromatography.
    Rp,
    /// Hydrophilic-interaction liquid chromatography.
    Hilic,
    /// Anion-exchange ion chromatography.
    IcAnion,
    /// Cation-exchange ion chromatography.
    IcCation,
    /// Ion-exclusion chromatography.
    IonExclusion,
    /// Gas chromatography.
    Gc,
}

impl PhaseMode {
    /// Every mode, in catalogue order.
    pub const ALL: [PhaseMode; 6] = [
        PhaseMode::Rp,
        PhaseMode::Hilic,
        PhaseMode::IcAnion,
        PhaseMode::IcCation,
        PhaseMode::IonExclusion,
        PhaseMode::Gc,
    ];

    /// The spelling used in the data files (`rp`, `hilic`, `ic-anion`, ...).
    pub fn as_str(self) -> &'static str {
        match self {
            PhaseMode::Rp => "rp",
            PhaseMode::Hilic => "hilic",
            PhaseMode::IcAnion => "ic-anion",
            PhaseMode::IcCation => "ic-cation",
            PhaseMode::IonExclusion => "ion-exclusion",
            PhaseMode::Gc => "gc",
        }
    }

    /// Parses the data-file spelling.
    pub fn parse(text: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|mode| mode.as_str() == text)
    }

    /// Liquid-phase modes have pH limits; GC has none.
    pub fn is_liquid(self) -> bool {
        self != PhaseMode::Gc
    }
}

impl std::fmt::Display for PhaseMode {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Generic chemistry class, spelled as in the retention training data (`systems.tsv`, `chem_class`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub enum ChemClass {
    /// Octadecyl.
    #[serde(rename = "C18")]
    C18,
    /// Octyl.
    #[serde(rename = "C8")]
    C8,
    /// Cyanopropyl.
    #[serde(rename = "cyano")]
    Cyano,
    /// Phenyl-type (phenyl, phenyl-hexyl, biphenyl).
    #[serde(rename = "phenyl")]
    Phenyl,
    /// Pentafluorophenyl.
    #[serde(rename = "pentafluorophenyl")]
    Pentafluorophenyl,
    /// Porous graphitic carbon.
    #[serde(rename = "porous_graphitic_carbon")]
    PorousGraphiticCarbon,
    /// Bare silica.
    #[serde(rename = "bare_silica")]
    BareSilica,
    /// Amide.
    #[serde(rename = "amide")]
    Amide,
    /// Zwitterionic.
    #[serde(rename = "zwitterionic")]
    Zwitterionic,
    /// No matching class in the training data.
    #[serde(rename = "unknown")]
    Unknown,
}

impl ChemClass {
    const ALL: [ChemClass; 10] = [
        ChemClass::C18,
        ChemClass::C8,
        ChemClass::Cyano,
        ChemClass::Phenyl,
        ChemClass::Pentafluorophenyl,
        ChemClass::PorousGraphiticCarbon,
        ChemClass::BareSilica,
        ChemClass::Amide,
        ChemClass::Zwitterionic,
        ChemClass::Unknown,
    ];

    /// The training-data spelling (`C18`, `bare_silica`, ...).
    pub fn as_str(self) -> &'static str {
        match self {
            ChemClass::C18 => "C18",
            ChemClass::C8 => "C8",
            ChemClass::Cyano => "cyano",
            ChemClass::Phenyl => "phenyl",
            ChemClass::Pentafluorophenyl => "pentafluorophenyl",
            ChemClass::PorousGraphiticCarbon => "porous_graphitic_carbon",
            ChemClass::BareSilica => "bare_silica",
            ChemClass::Amide => "amide",
            ChemClass::Zwitterionic => "zwitterionic",
            ChemClass::Unknown => "unknown",
        }
    }

    /// Parses the training-data spelling.
    pub fn parse(text: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|class| class.as_str() == text)
    }
}

/// A retention mechanism a phase adds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Interaction {
    /// Hydrophobic (solvophobic) partitioning.
    Hydrophobic,
    /// Dispersion (GC, non-polar).
    Dispersion,
    /// pi-pi / charge-transfer interaction with aromatic or unsaturated analytes.
    PiPi,
    /// Dipole-dipole interaction.
    Dipole,
    /// Shape (steric) selectivity.
    Shape,
    /// Hydrogen bonding.
    HBond,
    /// Ion exchange.
    IonExchange,
    /// Donnan exclusion of ionised analytes.
    IonExclusion,
    /// Surface adsorption (porous-layer GC phases).
    Adsorption,
}

impl Interaction {
    const ALL: [Interaction; 9] = [
        Interaction::Hydrophobic,
        Interaction::Dispersion,
        Interaction::PiPi,
        Interaction::Dipole,
        Interaction::Shape,
        Interaction::HBond,
        Interaction::IonExchange,
        Interaction::IonExclusion,
        Interaction::Adsorption,
    ];

    /// The data-file spelling.
    pub fn as_str(self) -> &'static str {
        match self {
            Interaction::Hydrophobic => "hydrophobic",
            Interaction::Dispersion => "dispersion",
            Interaction::PiPi => "pi-pi",
            Interaction::Dipole => "dipole",
            Interaction::Shape => "shape",
            Interaction::HBond => "h-bond",
            Interaction::IonExchange => "ion-exchange",
            Interaction::IonExclusion => "ion-exclusion",
            Interaction::Adsorption => "adsorption",
        }
    }

    fn parse(text: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|item| item.as_str() == text)
    }
}

/// Functional group of an ion-chromatography phase, which selects the retention data set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum IcExchanger {
    /// Hydroxide-selective anion exchanger.
    AnionHydroxide,
    /// Carbonate-selective anion exchanger.
    AnionCarbonate,
    /// Carboxylate (weak-acid) cation exchanger.
    CationCarboxylate,
    /// Mixed carboxylate-phosphonate cation exchanger.
    CationPhosphonate,
    /// Sulfonated ion-exclusion resin.
    ExclusionSulfonate,
}

impl IcExchanger {
    const ALL: [IcExchanger; 5] = [
        IcExchanger::AnionHydroxide,
        IcExchanger::AnionCarbonate,
        IcExchanger::CationCarboxylate,
        IcExchanger::CationPhosphonate,
        IcExchanger::ExclusionSulfonate,
    ];

    /// The data-file spelling.
    pub fn as_str(self) -> &'static str {
        match self {
            IcExchanger::AnionHydroxide => "anion-hydroxide",
            IcExchanger::AnionCarbonate => "anion-carbonate",
            IcExchanger::CationCarboxylate => "cation-carboxylate",
            IcExchanger::CationPhosphonate => "cation-phosphonate",
            IcExchanger::ExclusionSulfonate => "exclusion-sulfonate",
        }
    }

    /// Parses the data-file spelling.
    pub fn parse(text: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|item| item.as_str() == text)
    }

    /// The mode this exchanger belongs to.
    pub fn mode(self) -> PhaseMode {
        match self {
            IcExchanger::AnionHydroxide | IcExchanger::AnionCarbonate => PhaseMode::IcAnion,
            IcExchanger::CationCarboxylate | IcExchanger::CationPhosphonate => PhaseMode::IcCation,
            IcExchanger::ExclusionSulfonate => PhaseMode::IonExclusion,
        }
    }
}

/// Hydrophobic-subtraction-style column parameters (dimensionless, relative to a type-B C18 with
/// H = 1). Values are class-typical and from memory (see `data/phases.tsv`); only H is given for
/// porous graphitic carbon, where the other terms are not defined.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RpParameters {
    hydrophobicity_h: f64,
    steric_resistance_s: Option<f64>,
    hbond_acidity_a: Option<f64>,
    hbond_basicity_b: Option<f64>,
    cation_exchange_c_ph2_8: Option<f64>,
    cation_exchange_c_ph7_0: Option<f64>,
}

impl RpParameters {
    /// Relative hydrophobicity H (C18 = 1).
    pub fn hydrophobicity_h(&self) -> f64 {
        self.hydrophobicity_h
    }
    /// Steric resistance S*.
    pub fn steric_resistance_s(&self) -> Option<f64> {
        self.steric_resistance_s
    }
    /// Column hydrogen-bond acidity A (acts on basic, H-bond-accepting analytes).
    pub fn hbond_acidity_a(&self) -> Option<f64> {
        self.hbond_acidity_a
    }
    /// Column hydrogen-bond basicity B (acts on acidic, H-bond-donating analytes).
    pub fn hbond_basicity_b(&self) -> Option<f64> {
        self.hbond_basicity_b
    }
    /// Cation-exchange capacity term C at pH 2.8.
    pub fn cation_exchange_c_ph2_8(&self) -> Option<f64> {
        self.cation_exchange_c_ph2_8
    }
    /// Cation-exchange capacity term C at pH 7.0.
    pub fn cation_exchange_c_ph7_0(&self) -> Option<f64> {
        self.cation_exchange_c_ph7_0
    }
}

/// McReynolds-type phase constants: retention-index increments of five probe analytes relative to
/// squalane (McReynolds, J. Chromatogr. Sci. 8 (1970) 685; values in `data/phases.tsv` from memory).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct McReynoldsConstants {
    x_benzene_ri: f64,
    y_butanol_ri: f64,
    z_pentanone_ri: f64,
    u_nitropropane_ri: f64,
    s_pyridine_ri: f64,
}

impl McReynoldsConstants {
    /// x' (benzene): aromatic / polarisability probe.
    pub fn x_benzene_ri(&self) -> f64 {
        self.x_benzene_ri
    }
    /// y' (1-butanol): proton donor/acceptor probe.
    pub fn y_butanol_ri(&self) -> f64 {
        self.y_butanol_ri
    }
    /// z' (2-pentanone): dipole / proton-acceptor probe.
    pub fn z_pentanone_ri(&self) -> f64 {
        self.z_pentanone_ri
    }
    /// u' (1-nitropropane): dipole probe.
    pub fn u_nitropropane_ri(&self) -> f64 {
        self.u_nitropropane_ri
    }
    /// s' (pyridine): basic, proton-acceptor probe.
    pub fn s_pyridine_ri(&self) -> f64 {
        self.s_pyridine_ri
    }
    /// The five constants in the order x', y', z', u', s'.
    pub fn as_array(&self) -> [f64; 5] {
        [
            self.x_benzene_ri,
            self.y_butanol_ri,
            self.z_pentanone_ri,
            self.u_nitropropane_ri,
            self.s_pyridine_ri,
        ]
    }
    /// Sum of the five constants (overall phase polarity).
    pub fn sum_ri(&self) -> f64 {
        self.as_array().iter().sum()
    }
}

/// GC-specific phase parameters.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GcParameters {
    mcreynolds: Option<McReynoldsConstants>,
    typical_film_um: f64,
}

impl GcParameters {
    /// McReynolds-type constants; `None` for porous-layer (adsorption) phases.
    pub fn mcreynolds(&self) -> Option<&McReynoldsConstants> {
        self.mcreynolds.as_ref()
    }
    /// Typical film (or porous-layer) thickness.
    pub fn typical_film_um(&self) -> f64 {
        self.typical_film_um
    }
}

/// A stationary phase, described by generic chemistry only.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StationaryPhase {
    id: String,
    mode: PhaseMode,
    name: String,
    chemistry: String,
    chem_class: Option<ChemClass>,
    ph_min: Option<f64>,
    ph_max: Option<f64>,
    t_max_c: f64,
    interactions: Vec<Interaction>,
    chosen_for: String,
    rp: Option<RpParameters>,
    hilic_water_layer_rel: Option<f64>,
    gc: Option<GcParameters>,
    ic_exchanger: Option<IcExchanger>,
    source: String,
}

const RP_COLUMNS: [&str; 6] = [
    "hsm_h",
    "hsm_s",
    "hsm_a",
    "hsm_b",
    "hsm_c_ph28",
    "hsm_c_ph70",
];
const GC_COLUMNS: [&str; 6] = [
    "gc_x_benzene",
    "gc_y_butanol",
    "gc_z_pentanone",
    "gc_u_nitropropane",
    "gc_s_pyridine",
    "gc_film_um",
];

impl StationaryPhase {
    pub(crate) const COLUMNS: [&'static str; 25] = [
        "id",
        "mode",
        "name",
        "chemistry",
        "chem_class",
        "ph_min",
        "ph_max",
        "t_max_c",
        "interactions",
        "chosen_for",
        "hsm_h",
        "hsm_s",
        "hsm_a",
        "hsm_b",
        "hsm_c_ph28",
        "hsm_c_ph70",
        "hilic_water_layer_rel",
        "gc_x_benzene",
        "gc_y_butanol",
        "gc_z_pentanone",
        "gc_u_nitropropane",
        "gc_s_pyridine",
        "gc_film_um",
        "ic_exchanger",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let id = parse_id(row)?;
        let mode_text = row.text("mode")?;
        let mode = PhaseMode::parse(mode_text).ok_or_else(|| {
            row.bad(
                "mode",
                mode_text,
                "is not one of rp, hilic, ic-anion, ic-cation, ion-exclusion, gc",
            )
        })?;
        let mut interactions = Vec::new();
        for item in row.list("interactions") {
            let interaction = Interaction::parse(item).ok_or_else(|| {
                row.bad(
                    "interactions",
                    item,
                    "is not a known interaction (hydrophobic, dispersion, pi-pi, dipole, shape, h-bond, ion-exchange, ion-exclusion, adsorption)",
                )
            })?;
            interactions.push(interaction);
        }
        if interactions.is_empty() {
            return Err(row.bad("interactions", "", "needs at least one interaction"));
        }
        // Plausible limits (common practice, no source): LC columns 20-200 C, GC phases 150-400 C.
        let t_max_c = if mode.is_liquid() {
            row.number_in("t_max_c", 20.0, 200.0)?
        } else {
            row.number_in("t_max_c", 150.0, 400.0)?
        };
        let (ph_min, ph_max) = if mode.is_liquid() {
            let low = row.number_in("ph_min", 0.0, 14.0)?;
            let high = row.number_in("ph_max", 0.0, 14.0)?;
            if high - low < 2.0 {
                return Err(row.bad(
                    "ph_max",
                    row.cell("ph_max"),
                    "must exceed ph_min by at least 2 pH units",
                ));
            }
            (Some(low), Some(high))
        } else {
            row.require_empty(&["ph_min", "ph_max"], "for GC phases")?;
            (None, None)
        };
        let chem_class = match row.opt_text("chem_class") {
            Some(text) => Some(ChemClass::parse(text).ok_or_else(|| {
                row.bad(
                    "chem_class",
                    text,
                    "is not a training-data class (C18, C8, cyano, phenyl, pentafluorophenyl, porous_graphitic_carbon, bare_silica, amide, zwitterionic, unknown)",
                )
            })?),
            None => None,
        };
        let mut rp = None;
        let mut hilic_water_layer_rel = None;
        let mut gc = None;
        let mut ic_exchanger = None;
        match mode {
            PhaseMode::Rp | PhaseMode::Hilic => {
                if chem_class.is_none() {
                    return Err(row.bad("chem_class", "", "is required for LC phases"));
                }
                row.require_empty(&GC_COLUMNS, "for LC phases")?;
                row.require_empty(&["ic_exchanger"], "for RP and HILIC phases")?;
                if mode == PhaseMode::Rp {
                    row.require_empty(&["hilic_water_layer_rel"], "for RP phases")?;
                    rp = Some(RpParameters {
                        hydrophobicity_h: row.number_in("hsm_h", 0.1, 2.0)?,
                        steric_resistance_s: row.opt_number_in("hsm_s", -0.5, 0.5)?,
                        hbond_acidity_a: row.opt_number_in("hsm_a", -1.0, 1.0)?,
                        hbond_basicity_b: row.opt_number_in("hsm_b", -0.5, 0.5)?,
                        cation_exchange_c_ph2_8: row.opt_number_in("hsm_c_ph28", -1.0, 3.0)?,
                        cation_exchange_c_ph7_0: row.opt_number_in("hsm_c_ph70", -1.0, 3.0)?,
                    });
                } else {
                    row.require_empty(&RP_COLUMNS, "for HILIC phases")?;
                    hilic_water_layer_rel =
                        Some(row.number_in("hilic_water_layer_rel", 0.3, 3.0)?);
                }
            }
            PhaseMode::IcAnion | PhaseMode::IcCation | PhaseMode::IonExclusion => {
                row.require_empty(&RP_COLUMNS, "for IC phases")?;
                row.require_empty(&GC_COLUMNS, "for IC phases")?;
                row.require_empty(&["chem_class", "hilic_water_layer_rel"], "for IC phases")?;
                let text = row.text("ic_exchanger")?;
                let exchanger = IcExchanger::parse(text).ok_or_else(|| {
                    row.bad("ic_exchanger", text, "is not a known exchanger type")
                })?;
                if exchanger.mode() != mode {
                    return Err(row.bad(
                        "ic_exchanger",
                        text,
                        format!("does not belong to mode {mode}"),
                    ));
                }
                ic_exchanger = Some(exchanger);
            }
            PhaseMode::Gc => {
                row.require_empty(&RP_COLUMNS, "for GC phases")?;
                row.require_empty(
                    &["chem_class", "hilic_water_layer_rel", "ic_exchanger"],
                    "for GC phases",
                )?;
                // McReynolds constants: all five or none (porous-layer phases); 0-1000 covers the
                // published range from squalane-like to the most polar liquid phases (from memory).
                let values = [
                    row.opt_number_in("gc_x_benzene", 0.0, 1000.0)?,
                    row.opt_number_in("gc_y_butanol", 0.0, 1000.0)?,
                    row.opt_number_in("gc_z_pentanone", 0.0, 1000.0)?,
                    row.opt_number_in("gc_u_nitropropane", 0.0, 1000.0)?,
                    row.opt_number_in("gc_s_pyridine", 0.0, 1000.0)?,
                ];
                let mcreynolds = match values {
                    [Some(x), Some(y), Some(z), Some(u), Some(s)] => Some(McReynoldsConstants {
                        x_benzene_ri: x,
                        y_butanol_ri: y,
                        z_pentanone_ri: z,
                        u_nitropropane_ri: u,
                        s_pyridine_ri: s,
                    }),
                    [None, None, None, None, None] => {
                        if !interactions.contains(&Interaction::Adsorption) {
                            return Err(row.bad(
                                "gc_x_benzene",
                                "",
                                "McReynolds constants are required unless the phase is an adsorption (porous-layer) phase",
                            ));
                        }
                        None
                    }
                    _ => {
                        return Err(row.bad(
                            "gc_x_benzene",
                            row.cell("gc_x_benzene"),
                            "give all five McReynolds constants or none",
                        ));
                    }
                };
                gc = Some(GcParameters {
                    mcreynolds,
                    typical_film_um: row.number_in("gc_film_um", 0.05, 50.0)?,
                });
            }
        }
        Ok(Self {
            id,
            mode,
            name: row.text("name")?.to_string(),
            chemistry: row.text("chemistry")?.to_string(),
            chem_class,
            ph_min,
            ph_max,
            t_max_c,
            interactions,
            chosen_for: row.text("chosen_for")?.to_string(),
            rp,
            hilic_water_layer_rel,
            gc,
            ic_exchanger,
            source: row.text("source")?.to_string(),
        })
    }

    /// Stable short id (`rp-c18`, `gc-wax`, ...).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Separation mode.
    pub fn mode(&self) -> PhaseMode {
        self.mode
    }
    /// Generic name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Chemistry description.
    pub fn chemistry(&self) -> &str {
        &self.chemistry
    }
    /// Training-data chemistry class (LC phases only).
    pub fn chem_class(&self) -> Option<ChemClass> {
        self.chem_class
    }
    /// Lowest recommended mobile-phase pH (LC only; common practice, check the column's documentation).
    pub fn ph_min(&self) -> Option<f64> {
        self.ph_min
    }
    /// Highest recommended mobile-phase pH (LC only).
    pub fn ph_max(&self) -> Option<f64> {
        self.ph_max
    }
    /// Maximum operating temperature.
    pub fn t_max_c(&self) -> f64 {
        self.t_max_c
    }
    /// Retention mechanisms the phase adds.
    pub fn interactions(&self) -> &[Interaction] {
        &self.interactions
    }
    /// What the phase is typically chosen for.
    pub fn chosen_for(&self) -> &str {
        &self.chosen_for
    }
    /// Hydrophobic-subtraction-style parameters (RP only).
    pub fn rp(&self) -> Option<&RpParameters> {
        self.rp.as_ref()
    }
    /// Relative water-layer strength (HILIC only; bare silica = 1).
    pub fn hilic_water_layer_rel(&self) -> Option<f64> {
        self.hilic_water_layer_rel
    }
    /// GC parameters (GC only).
    pub fn gc(&self) -> Option<&GcParameters> {
        self.gc.as_ref()
    }
    /// Ion-exchange functional group (IC and ion-exclusion only).
    pub fn ic_exchanger(&self) -> Option<IcExchanger> {
        self.ic_exchanger
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
    }
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

    /// Stable id (`acetonitrile`, `water`, ...).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Formula.
    pub fn formula(&self) -> &str {
        &self.formula
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
    /// GHS-style hazards in words.
    pub fn hazards(&self) -> &str {
        &self.hazards
    }
    /// MS compatibility.
    pub fn ms_compatible(&self) -> MsCompatibility {
        self.ms_compatible
    }
    /// Practical notes.
    pub fn notes(&self) -> &str {
        &self.notes
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
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

    /// Stable id (`phosphate-2`, `formic-acid`, ...).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Acid/base pair.
    pub fn species(&self) -> &str {
        &self.species
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
    /// Notes (precipitation, pH limits, MS behaviour).
    pub fn notes(&self) -> &str {
        &self.notes
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
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

    /// Stable id (`koh`, `msa`, ...).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Mode (ic-anion, ic-cation, ion-exclusion).
    pub fn mode(&self) -> PhaseMode {
        self.mode
    }
    /// The competing (eluting) ion.
    pub fn competing_ion(&self) -> &str {
        &self.competing_ion
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
    /// Suppression (text).
    pub fn suppression(&self) -> &str {
        &self.suppression
    }
    /// Typical background conductivity after suppression.
    pub fn suppressed_background_us_cm(&self) -> Option<f64> {
        self.suppressed_background_us_cm
    }
    /// Exchanger types this eluent is used with.
    pub fn compatible_exchangers(&self) -> &[IcExchanger] {
        &self.compatible_exchangers
    }
    /// Hazards in words.
    pub fn hazards(&self) -> &str {
        &self.hazards
    }
    /// Notes.
    pub fn notes(&self) -> &str {
        &self.notes
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
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

    /// Stable id (`helium`, `hydrogen`, `nitrogen`).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Formula.
    pub fn formula(&self) -> &str {
        &self.formula
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
    /// Hazards and handling in words (flammability, cylinders, leak checks).
    pub fn hazards(&self) -> &str {
        &self.hazards
    }
    /// Notes.
    pub fn notes(&self) -> &str {
        &self.notes
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
    }
}

/// Whether an ion belongs to the anion or the cation panel.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum IonPanel {
    /// Anion.
    Anion,
    /// Cation.
    Cation,
}

/// An ion with its relative retention on the generic IC phases.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IcIon {
    id: String,
    name: String,
    synonyms: Vec<String>,
    panel: IonPanel,
    charge: i8,
    formula: String,
    smiles: String,
    inchikey: Option<String>,
    hydrated_radius_pm: Option<f64>,
    rr_hydroxide: Option<f64>,
    rr_carbonate: Option<f64>,
    rr_carboxylate: Option<f64>,
    source: String,
}

impl IcIon {
    pub(crate) const COLUMNS: [&'static str; 13] = [
        "id",
        "name",
        "synonyms",
        "panel",
        "charge",
        "formula",
        "smiles",
        "inchikey",
        "hydrated_radius_pm",
        "rr_hydroxide",
        "rr_carbonate",
        "rr_carboxylate",
        "source",
    ];

    pub(crate) fn from_row(row: &Row<'_>) -> Result<Self, PhaseError> {
        let panel_text = row.text("panel")?;
        let panel = match panel_text {
            "anion" => IonPanel::Anion,
            "cation" => IonPanel::Cation,
            other => return Err(row.bad("panel", other, "must be anion or cation")),
        };
        let charge = row.number_in("charge", -3.0, 3.0)?;
        let sign_ok = match panel {
            IonPanel::Anion => charge < 0.0,
            IonPanel::Cation => charge > 0.0,
        };
        if charge.fract() != 0.0 || !sign_ok {
            return Err(row.bad(
                "charge",
                row.cell("charge"),
                "must be a non-zero whole number whose sign matches the panel",
            ));
        }
        // Relative retentions 0.05-50 relative to the reference ion (plausible range, no source).
        let rr_hydroxide = row.opt_number_in("rr_hydroxide", 0.05, 50.0)?;
        let rr_carbonate = row.opt_number_in("rr_carbonate", 0.05, 50.0)?;
        let rr_carboxylate = row.opt_number_in("rr_carboxylate", 0.05, 50.0)?;
        match panel {
            IonPanel::Anion => {
                row.require_empty(&["rr_carboxylate"], "for anions")?;
                if rr_hydroxide.is_none() && rr_carbonate.is_none() {
                    return Err(row.bad(
                        "rr_hydroxide",
                        "",
                        "an anion needs rr_hydroxide or rr_carbonate",
                    ));
                }
            }
            IonPanel::Cation => {
                row.require_empty(&["rr_hydroxide", "rr_carbonate"], "for cations")?;
                if rr_carboxylate.is_none() {
                    return Err(row.bad("rr_carboxylate", "", "a cation needs rr_carboxylate"));
                }
            }
        }
        let smiles = row.text("smiles")?;
        if smiles.contains(char::is_whitespace) {
            return Err(row.bad("smiles", smiles, "must not contain spaces"));
        }
        let inchikey = row.opt_text("inchikey");
        if let Some(key) = inchikey
            && !is_inchikey_shaped(key)
        {
            return Err(row.bad(
                "inchikey",
                key,
                "is not shaped like an InChIKey (14-10-1 upper-case letters)",
            ));
        }
        Ok(Self {
            id: parse_id(row)?,
            name: row.text("name")?.to_string(),
            synonyms: row
                .list("synonyms")
                .into_iter()
                .map(str::to_string)
                .collect(),
            panel,
            // Checked above to be a whole number in -3..=3.
            charge: charge as i8,
            formula: row.text("formula")?.to_string(),
            smiles: smiles.to_string(),
            inchikey: inchikey.map(str::to_string),
            hydrated_radius_pm: row.opt_number_in("hydrated_radius_pm", 200.0, 600.0)?,
            rr_hydroxide,
            rr_carbonate,
            rr_carboxylate,
            source: row.text("source")?.to_string(),
        })
    }

    /// Stable id (`chloride`, `sodium`, ...).
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Name.
    pub fn name(&self) -> &str {
        &self.name
    }
    /// Synonyms and formula spellings used for matching.
    pub fn synonyms(&self) -> &[String] {
        &self.synonyms
    }
    /// Anion or cation panel.
    pub fn panel(&self) -> IonPanel {
        self.panel
    }
    /// Charge of the listed species.
    pub fn charge(&self) -> i8 {
        self.charge
    }
    /// Formula of the listed species.
    pub fn formula(&self) -> &str {
        &self.formula
    }
    /// SMILES of the listed species.
    pub fn smiles(&self) -> &str {
        &self.smiles
    }
    /// InChIKey where certain (none are filled yet).
    pub fn inchikey(&self) -> Option<&str> {
        self.inchikey.as_deref()
    }
    /// Hydrated radius.
    pub fn hydrated_radius_pm(&self) -> Option<f64> {
        self.hydrated_radius_pm
    }
    /// Relative retention vs chloride on a hydroxide-selective anion exchanger.
    pub fn rr_hydroxide(&self) -> Option<f64> {
        self.rr_hydroxide
    }
    /// Relative retention vs chloride on a carbonate-selective anion exchanger.
    pub fn rr_carbonate(&self) -> Option<f64> {
        self.rr_carbonate
    }
    /// Relative retention vs sodium on a carboxylate cation exchanger.
    pub fn rr_carboxylate(&self) -> Option<f64> {
        self.rr_carboxylate
    }
    /// Where the values come from.
    pub fn source(&self) -> &str {
        &self.source
    }
    /// True when `query` equals the id, name or a synonym (case-insensitive).
    pub fn matches(&self, query: &str) -> bool {
        let query = query.trim();
        self.id.eq_ignore_ascii_case(query)
            || self.name.eq_ignore_ascii_case(query)
            || self.synonyms.iter().any(|s| s.eq_ignore_ascii_case(query))
    }
}

fn is_inchikey_shaped(key: &str) -> bool {
    let parts: Vec<&str> = key.split('-').collect();
    parts.len() == 3
        && parts[0].len() == 14
        && parts[1].len() == 10
        && parts[2].len() == 1
        && parts
            .iter()
            .all(|p| p.chars().all(|c| c.is_ascii_uppercase()))
}

/// Ids are short, lower-case ASCII with digits and hyphens, so they are stable in files and CLIs.
fn parse_id(row: &Row<'_>) -> Result<String, PhaseError> {
    let id = row.text("id")?;
    let ok = id.len() <= 40
        && id
            .chars()
            .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
        && !id.starts_with('-')
        && !id.ends_with('-');
    if ok {
        Ok(id.to_string())
    } else {
        Err(row.bad(
            "id",
            id,
            "must be at most 40 characters of lower-case letters, digits and inner hyphens",
        ))
    }
}
