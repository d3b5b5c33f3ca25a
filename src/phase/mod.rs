//! The phase catalogue: stationary phases, LC solvents, buffers and additives, ion-chromatography
//! eluents, GC carrier gases and the ions of the usual IC panels. The tables live as reviewable
//! TSV files in `data/` (each row with its source), are embedded in the binary with
//! `include_str!`, and are validated once when first loaded: every error names the file, the line
//! and the column. A lab's list of available phases narrows the catalogue with
//! [`Catalogue::restrict`]. Generic chemistry names only; no product names.

mod records;
mod tsv;

use std::sync::OnceLock;

use serde::Serialize;

pub use records::{
    Buffer, BufferRole, CarrierGas, ChemClass, GcParameters, IcEluent, IcExchanger, IcIon,
    Interaction, IonPanel, McReynoldsConstants, MsCompatibility, PhaseMode, RpParameters, Solvent,
    StationaryPhase, TypicalConcentration,
};
use tsv::Table;

/// Errors from loading or querying the phase catalogue.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PhaseError {
    /// The header row is missing or malformed.
    #[error(
        "{file}, line {line}: bad header: {reason}; the first non-comment line must name the columns"
    )]
    BadHeader {
        /// Data file.
        file: &'static str,
        /// 1-based line (0 when no header exists).
        line: usize,
        /// What is wrong.
        reason: String,
    },
    /// A required column is absent.
    #[error(
        "{file}: column `{column}` is missing from the header; add it (it may be left empty where optional)"
    )]
    MissingColumn {
        /// Data file.
        file: &'static str,
        /// Missing column.
        column: String,
    },
    /// A row has more cells than the header.
    #[error(
        "{file}, line {line}: {found} cells but the header has {expected}; check for stray tabs"
    )]
    TooManyCells {
        /// Data file.
        file: &'static str,
        /// 1-based line.
        line: usize,
        /// Cells found.
        found: usize,
        /// Cells expected.
        expected: usize,
    },
    /// A cell holds an invalid value.
    #[error("{file}, line {line}, column `{column}`: value `{value}` {reason}")]
    BadValue {
        /// Data file.
        file: &'static str,
        /// 1-based line.
        line: usize,
        /// Column name.
        column: String,
        /// Offending value.
        value: String,
        /// What is wrong and what is expected.
        reason: String,
    },
    /// The same id appears twice in one table.
    #[error(
        "{file}, line {line}: id `{id}` is already used on line {first_line}; ids must be unique"
    )]
    DuplicateId {
        /// Data file.
        file: &'static str,
        /// 1-based line of the repeat.
        line: usize,
        /// 1-based line of the first use.
        first_line: usize,
        /// Repeated id.
        id: String,
    },
    /// Rows of two tables do not fit together.
    #[error("{file}, line {line}: {reason}")]
    Inconsistent {
        /// Data file.
        file: &'static str,
        /// 1-based line.
        line: usize,
        /// What does not fit.
        reason: String,
    },
    /// One or more ids are not in the catalogue.
    #[error("unknown {kind} {}; {}", describe_unknown(.unknown), list_hint(.kind))]
    UnknownIds {
        /// What was looked up (`phase`, `solvent`, ...).
        kind: &'static str,
        /// Each unknown id with its closest known ids.
        unknown: Vec<UnknownId>,
    },
    /// `restrict` was given no ids.
    #[error("the list of available phases is empty; give at least one phase id")]
    EmptyRestriction,
}

/// An unknown id with "did you mean" suggestions.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct UnknownId {
    /// The id as given.
    pub id: String,
    /// Closest known ids, best first (may be empty).
    pub did_you_mean: Vec<String>,
}

/// Where the known ids of a kind are listed.
fn list_hint(kind: &str) -> &'static str {
    match kind {
        "phase" => "`phasewise phases` lists the known phase ids",
        "solvent" => "the known solvent ids are in data/solvents.tsv (docs/phases.md)",
        "buffer" => "the known buffer ids are in data/buffers.tsv (docs/phases.md)",
        "IC eluent" => "the known eluent ids are in data/ic_eluents.tsv (docs/phases.md)",
        _ => "the known ids are in the catalogue's data files (docs/phases.md)",
    }
}

fn describe_unknown(unknown: &[UnknownId]) -> String {
    unknown
        .iter()
        .map(|item| {
            if item.did_you_mean.is_empty() {
                format!("`{}`", item.id)
            } else {
                format!(
                    "`{}` (did you mean {}?)",
                    item.id,
                    item.did_you_mean.join(", ")
                )
            }
        })
        .collect::<Vec<_>>()
        .join(", ")
}

/// Edit distance with adjacent transpositions (optimal string alignment, as `strsim::osa_distance`;
/// the main crate may swap in `strsim`): `rp-c81` is one edit from `rp-c18`.
pub fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let width = b.len() + 1;
    let mut table = vec![0usize; (a.len() + 1) * width];
    for (i, cell) in table.iter_mut().step_by(width).enumerate() {
        *cell = i;
    }
    for (j, cell) in table.iter_mut().take(width).enumerate() {
        *cell = j;
    }
    for i in 1..=a.len() {
        for j in 1..=b.len() {
            let cost = usize::from(a[i - 1] != b[j - 1]);
            let mut best = (table[(i - 1) * width + j] + 1)
                .min(table[i * width + j - 1] + 1)
                .min(table[(i - 1) * width + j - 1] + cost);
            if i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1] {
                best = best.min(table[(i - 2) * width + j - 2] + 1);
            }
            table[i * width + j] = best;
        }
    }
    table[a.len() * width + b.len()]
}

/// Up to three known ids close to `query`: small edit distance (at most a third of the longer
/// name, and at least 2), or one containing the other. Sorted by distance, then id.
pub fn suggest<'a>(query: &str, known: impl IntoIterator<Item = &'a str>) -> Vec<String> {
    let query = query.trim().to_lowercase();
    let mut scored: Vec<(usize, &str)> = known
        .into_iter()
        .filter_map(|candidate| {
            let distance = edit_distance(&query, candidate);
            let limit = (query.chars().count().max(candidate.chars().count()) / 3).max(2);
            let contains =
                query.len() >= 3 && (candidate.contains(&query) || query.contains(candidate));
            (distance <= limit || contains).then_some((distance, candidate))
        })
        .collect();
    scored.sort();
    scored
        .into_iter()
        .take(3)
        .map(|(_, id)| id.to_string())
        .collect()
}

/// The text of each data file, so tests and users can load alternatives.
#[derive(Debug, Clone, Copy)]
pub struct CatalogueSources<'a> {
    /// `phases.tsv`.
    pub phases: &'a str,
    /// `solvents.tsv`.
    pub solvents: &'a str,
    /// `buffers.tsv`.
    pub buffers: &'a str,
    /// `ic_eluents.tsv`.
    pub ic_eluents: &'a str,
    /// `carrier_gases.tsv`.
    pub carrier_gases: &'a str,
    /// `ic_ions.tsv`.
    pub ic_ions: &'a str,
}

impl CatalogueSources<'static> {
    /// The data files embedded in the binary.
    pub const BUILTIN: CatalogueSources<'static> = CatalogueSources {
        phases: include_str!("../../data/phases.tsv"),
        solvents: include_str!("../../data/solvents.tsv"),
        buffers: include_str!("../../data/buffers.tsv"),
        ic_eluents: include_str!("../../data/ic_eluents.tsv"),
        carrier_gases: include_str!("../../data/carrier_gases.tsv"),
        ic_ions: include_str!("../../data/ic_ions.tsv"),
    };
}

/// Row counts, for `--version` style summaries.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct CatalogueCounts {
    /// Stationary phases.
    pub phases: usize,
    /// Solvents.
    pub solvents: usize,
    /// Buffer rows.
    pub buffers: usize,
    /// IC eluents.
    pub ic_eluents: usize,
    /// Carrier gases.
    pub carrier_gases: usize,
    /// IC ions.
    pub ic_ions: usize,
}

/// The validated catalogue.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Catalogue {
    phases: Vec<StationaryPhase>,
    solvents: Vec<Solvent>,
    buffers: Vec<Buffer>,
    ic_eluents: Vec<IcEluent>,
    carrier_gases: Vec<CarrierGas>,
    ic_ions: Vec<IcIon>,
}

fn load<T>(
    file: &'static str,
    text: &str,
    columns: &[&str],
    parse: impl Fn(&tsv::Row<'_>) -> Result<T, PhaseError>,
    id_of: impl Fn(&T) -> &str,
) -> Result<Vec<T>, PhaseError> {
    let table = Table::parse(file, text, columns)?;
    let mut records: Vec<T> = Vec::with_capacity(table.rows().len());
    let mut lines: Vec<usize> = Vec::with_capacity(table.rows().len());
    for row in table.rows() {
        let record = parse(row)?;
        if let Some(position) = records.iter().position(|r| id_of(r) == id_of(&record)) {
            return Err(PhaseError::DuplicateId {
                file: row.file(),
                line: row.line(),
                first_line: lines[position],
                id: id_of(&record).to_string(),
            });
        }
        records.push(record);
        lines.push(row.line());
    }
    if records.is_empty() {
        return Err(PhaseError::BadHeader {
            file,
            line: 0,
            reason: "the table has no data rows".to_string(),
        });
    }
    Ok(records)
}

impl Catalogue {
    /// The built-in catalogue, parsed and validated on first use and cached.
    ///
    /// # Errors
    /// A [`PhaseError`] naming file, line and column if an embedded table is invalid (the
    /// whole-table tests make this unreachable in a released build).
    pub fn builtin() -> Result<&'static Catalogue, PhaseError> {
        static BUILTIN: OnceLock<Result<Catalogue, PhaseError>> = OnceLock::new();
        BUILTIN
            .get_or_init(|| Catalogue::from_sources(&CatalogueSources::BUILTIN))
            .as_ref()
            .map_err(Clone::clone)
    }

    /// Parses and validates a full set of tables (e.g. a user's edited copies).
    ///
    /// # Errors
    /// A [`PhaseError`] naming file, line and column of the first invalid value, a duplicate id,
    /// or an IC eluent whose exchanger types match no phase.
    pub fn from_sources(sources: &CatalogueSources<'_>) -> Result<Catalogue, PhaseError> {
        let phases = load(
            "phases.tsv",
            sources.phases,
            &StationaryPhase::COLUMNS,
            StationaryPhase::from_row,
            StationaryPhase::id,
        )?;
        let solvents = load(
            "solvents.tsv",
            sources.solvents,
            &Solvent::COLUMNS,
            Solvent::from_row,
            Solvent::id,
        )?;
        let buffers = load(
            "buffers.tsv",
            sources.buffers,
            &Buffer::COLUMNS,
            Buffer::from_row,
            Buffer::id,
        )?;
        let ic_eluents = load(
            "ic_eluents.tsv",
            sources.ic_eluents,
            &IcEluent::COLUMNS,
            IcEluent::from_row,
            IcEluent::id,
        )?;
        let carrier_gases = load(
            "carrier_gases.tsv",
            sources.carrier_gases,
            &CarrierGas::COLUMNS,
            CarrierGas::from_row,
            CarrierGas::id,
        )?;
        let ic_ions = load(
            "ic_ions.tsv",
            sources.ic_ions,
            &IcIon::COLUMNS,
            IcIon::from_row,
            IcIon::id,
        )?;
        let catalogue = Catalogue {
            phases,
            solvents,
            buffers,
            ic_eluents,
            carrier_gases,
            ic_ions,
        };
        catalogue.check_cross_references(sources)?;
        Ok(catalogue)
    }

    /// Every IC eluent must serve at least one exchanger present among the phases, and every IC
    /// phase must have at least one eluent.
    fn check_cross_references(&self, sources: &CatalogueSources<'_>) -> Result<(), PhaseError> {
        let exchangers: Vec<IcExchanger> = self
            .phases
            .iter()
            .filter_map(StationaryPhase::ic_exchanger)
            .collect();
        if let Some(eluent) = self.ic_eluents.iter().find(|e| {
            !e.compatible_exchangers()
                .iter()
                .any(|x| exchangers.contains(x))
        }) {
            return Err(PhaseError::Inconsistent {
                file: "ic_eluents.tsv",
                line: line_of(sources.ic_eluents, eluent.id()),
                reason: format!(
                    "eluent `{}` lists no exchanger type used by any phase in phases.tsv",
                    eluent.id()
                ),
            });
        }
        if let Some(phase) = self.phases.iter().find(|p| {
            p.ic_exchanger().is_some_and(|x| {
                !self
                    .ic_eluents
                    .iter()
                    .any(|e| e.compatible_exchangers().contains(&x))
            })
        }) {
            return Err(PhaseError::Inconsistent {
                file: "phases.tsv",
                line: line_of(sources.phases, phase.id()),
                reason: format!("IC phase `{}` has no eluent in ic_eluents.tsv", phase.id()),
            });
        }
        Ok(())
    }

    /// Row counts per table.
    pub fn counts(&self) -> CatalogueCounts {
        CatalogueCounts {
            phases: self.phases.len(),
            solvents: self.solvents.len(),
            buffers: self.buffers.len(),
            ic_eluents: self.ic_eluents.len(),
            carrier_gases: self.carrier_gases.len(),
            ic_ions: self.ic_ions.len(),
        }
    }

    /// All stationary phases, in file order.
    pub fn phases(&self) -> &[StationaryPhase] {
        &self.phases
    }

    /// Phases of one mode, in file order.
    pub fn phases_by_mode(&self, mode: PhaseMode) -> impl Iterator<Item = &StationaryPhase> {
        self.phases.iter().filter(move |p| p.mode() == mode)
    }

    /// The phase with this id.
    ///
    /// # Errors
    /// [`PhaseError::UnknownIds`] with suggestions when the id is not known.
    ///
    /// # Examples
    /// ```
    /// let catalogue = phasewise::phase::Catalogue::builtin().unwrap();
    /// assert_eq!(catalogue.phase("gc-wax").unwrap().name(), "polyethylene glycol");
    /// assert!(catalogue.phase("gc-wx").unwrap_err().to_string().contains("gc-wax"));
    /// ```
    pub fn phase(&self, id: &str) -> Result<&StationaryPhase, PhaseError> {
        find_by_id(&self.phases, id, StationaryPhase::id, "phase")
    }

    /// All solvents.
    pub fn solvents(&self) -> &[Solvent] {
        &self.solvents
    }

    /// The solvent with this id.
    ///
    /// # Errors
    /// [`PhaseError::UnknownIds`] with suggestions.
    pub fn solvent(&self, id: &str) -> Result<&Solvent, PhaseError> {
        find_by_id(&self.solvents, id, Solvent::id, "solvent")
    }

    /// All buffer rows (one per pKa).
    pub fn buffers(&self) -> &[Buffer] {
        &self.buffers
    }

    /// The buffer row with this id.
    ///
    /// # Errors
    /// [`PhaseError::UnknownIds`] with suggestions.
    pub fn buffer(&self, id: &str) -> Result<&Buffer, PhaseError> {
        find_by_id(&self.buffers, id, Buffer::id, "buffer")
    }

    /// Buffer rows whose useful range (pKa +/- 1) contains `ph`, sorted by |pKa - pH| then id.
    pub fn buffers_for_ph(&self, ph: f64) -> Vec<&Buffer> {
        let mut found: Vec<&Buffer> = self
            .buffers
            .iter()
            .filter(|b| b.role() == BufferRole::Buffer)
            .filter(|b| {
                let (low, high) = b.useful_ph_range();
                ph >= low && ph <= high
            })
            .collect();
        found.sort_by(|a, b| {
            (a.pka_25c() - ph)
                .abs()
                .total_cmp(&(b.pka_25c() - ph).abs())
                .then_with(|| a.id().cmp(b.id()))
        });
        found
    }

    /// All IC eluents.
    pub fn ic_eluents(&self) -> &[IcEluent] {
        &self.ic_eluents
    }

    /// The IC eluent with this id.
    ///
    /// # Errors
    /// [`PhaseError::UnknownIds`] with suggestions.
    pub fn ic_eluent(&self, id: &str) -> Result<&IcEluent, PhaseError> {
        find_by_id(&self.ic_eluents, id, IcEluent::id, "IC eluent")
    }

    /// All carrier gases.
    pub fn carrier_gases(&self) -> &[CarrierGas] {
        &self.carrier_gases
    }

    /// The carrier gas with this id.
    ///
    /// # Errors
    /// [`PhaseError::UnknownIds`] with suggestions.
    pub fn carrier_gas(&self, id: &str) -> Result<&CarrierGas, PhaseError> {
        find_by_id(&self.carrier_gases, id, CarrierGas::id, "carrier gas")
    }

    /// All IC ions.
    pub fn ic_ions(&self) -> &[IcIon] {
        &self.ic_ions
    }

    /// The ion whose id, name or synonym matches `query` (case-insensitive).
    ///
    /// # Errors
    /// [`PhaseError::UnknownIds`] with suggestions among ion ids.
    pub fn ic_ion(&self, query: &str) -> Result<&IcIon, PhaseError> {
        self.ic_ions
            .iter()
            .find(|ion| ion.matches(query))
            .ok_or_else(|| PhaseError::UnknownIds {
                kind: "ion",
                unknown: vec![UnknownId {
                    id: query.to_string(),
                    did_you_mean: suggest(query, self.ic_ions.iter().map(IcIon::id)),
                }],
            })
    }

    /// A copy of the catalogue keeping only the listed phases (a lab's available columns), in
    /// catalogue order; the other tables are kept whole. Repeated ids are accepted once.
    ///
    /// # Errors
    /// [`PhaseError::EmptyRestriction`] for an empty list; [`PhaseError::UnknownIds`] listing
    /// every unknown id with suggestions.
    ///
    /// # Examples
    /// ```
    /// let catalogue = phasewise::phase::Catalogue::builtin().unwrap();
    /// let lab = catalogue.restrict(&["rp-c18", "gc-dimethyl"]).unwrap();
    /// assert_eq!(lab.phases().len(), 2);
    /// assert!(catalogue.restrict(&["rp-c81"]).is_err());
    /// ```
    pub fn restrict<S: AsRef<str>>(&self, ids: &[S]) -> Result<Catalogue, PhaseError> {
        if ids.is_empty() {
            return Err(PhaseError::EmptyRestriction);
        }
        let unknown: Vec<UnknownId> = ids
            .iter()
            .map(AsRef::as_ref)
            .filter(|id| !self.phases.iter().any(|p| p.id() == id.trim()))
            .map(|id| UnknownId {
                id: id.to_string(),
                did_you_mean: suggest(id, self.phases.iter().map(StationaryPhase::id)),
            })
            .collect();
        if !unknown.is_empty() {
            return Err(PhaseError::UnknownIds {
                kind: "phase",
                unknown,
            });
        }
        let mut restricted = self.clone();
        restricted
            .phases
            .retain(|p| ids.iter().any(|id| id.as_ref().trim() == p.id()));
        Ok(restricted)
    }
}

fn find_by_id<'a, T>(
    items: &'a [T],
    id: &str,
    id_of: impl Fn(&T) -> &str,
    kind: &'static str,
) -> Result<&'a T, PhaseError> {
    let wanted = id.trim();
    items
        .iter()
        .find(|item| id_of(item) == wanted)
        .ok_or_else(|| PhaseError::UnknownIds {
            kind,
            unknown: vec![UnknownId {
                id: id.to_string(),
                did_you_mean: suggest(id, items.iter().map(&id_of)),
            }],
        })
}

/// 1-based line of the row whose first cell is `id` (0 if not found).
fn line_of(text: &str, id: &str) -> usize {
    text.lines()
        .position(|line| line.split('\t').next().map(str::trim) == Some(id))
        .map_or(0, |index| index + 1)
}

#[cfg(test)]
mod tests;
