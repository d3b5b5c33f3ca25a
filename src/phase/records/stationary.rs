//! Stationary phases: mode, chemistry class, interactions, IC exchanger type, and the model
//! parameters of RP (hydrophobic-subtraction style) and GC (McReynolds-type constants) phases.

use serde::Serialize;

use super::super::PhaseError;
use super::super::tsv::Row;
use super::parse_id;

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
