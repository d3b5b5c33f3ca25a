//! Resolving what the user typed into an [`Analyte`]: exact name or synonym (normalised),
//! CAS number, InChIKey, PubChem CID or SMILES; the user overlay first, then the shipped
//! base. An unknown name is never replaced by a fuzzy match: it comes back unresolved with
//! up to five suggestions ranked by string similarity.

use std::collections::HashMap;

use rusqlite::{Connection, OptionalExtension, params};

use super::identifier::{Query, classify, could_be_smiles};
use super::normalise::normalise_name;
use super::structure_match::{find_shipped, find_shipped_tautomer, is_salt_of, query_key};
use super::{Kb, KbError};
use crate::property::{Analyte, Origin, Property, PropertyKind};

/// `matched_by` of a name found only without its stereo descriptor.
pub const STEREO_DROPPED: &str =
    "name without its stereo descriptor (the base does not hold that stereoisomer under this name)";

/// `matched_by` of a name without stereo descriptor held only by a stereoisomer record.
pub const STEREO_ISOMER_NAME: &str =
    "name without stereo descriptor (the base holds this compound under a stereoisomer's name)";

/// `matched_by` of a name without stereo descriptor that found the compound's record without
/// stereo through a racemate's name (`mandelic acid` -> `dl-mandelic acid`).
pub const RACEMATE_NAME: &str = "name without stereo descriptor (the base holds this compound without stereo, under a racemate's name)";

/// Most suggestions offered for an unresolved query.
pub const MAX_SUGGESTIONS: usize = 5;

// The plain records live in `property` so that the advisor and reports need not import the
// knowledge base; re-exported here so `kb::resolve::{Suggestion, Unresolved}` keep working.
pub use crate::property::unresolved::{Suggestion, Unresolved};

/// Outcome of resolving one query.
#[derive(Debug, Clone, PartialEq)]
pub enum Resolution {
    /// Found in a knowledge base.
    Found(Box<Analyte>),
    /// Not in a knowledge base, but a SMILES string that the caller may describe from
    /// structure alone.
    StructureOnly {
        /// The query.
        query: String,
        /// The SMILES string.
        smiles: String,
    },
    /// Not found.
    Unresolved(Unresolved),
}

struct CompoundRow {
    id: i64,
    inchikey: Option<String>,
    name: String,
    smiles: Option<String>,
    formula: Option<String>,
    mw: Option<f64>,
    cid: Option<i64>,
    cas: Option<String>,
}

const COMPOUND_COLUMNS: &str =
    "id, inchikey, preferred_name, smiles, formula, molar_mass_g_mol, cid, cas";

fn compound_from_row(r: &rusqlite::Row<'_>) -> rusqlite::Result<CompoundRow> {
    Ok(CompoundRow {
        id: r.get(0)?,
        inchikey: r.get(1)?,
        name: r.get(2)?,
        smiles: r.get(3)?,
        formula: r.get(4)?,
        mw: r.get(5)?,
        cid: r.get(6)?,
        cas: r.get(7)?,
    })
}

/// Find a compound id in one database. Returns the row and how it matched.
fn find(conn: &Connection, q: &Query) -> rusqlite::Result<Option<(CompoundRow, &'static str)>> {
    let by = |sql: &str, p: &dyn rusqlite::ToSql| -> rusqlite::Result<Option<CompoundRow>> {
        conn.prepare_cached(&format!("SELECT {COMPOUND_COLUMNS} FROM compound WHERE {sql} ORDER BY cid IS NULL, cid, id LIMIT 1"))?
            .query_row([p], compound_from_row)
            .optional()
    };
    Ok(match q {
        Query::Cas(c) => by("cas = ?1", c)?.map(|r| (r, "cas")),
        Query::InchiKey(k) => by("inchikey = ?1", k)?.map(|r| (r, "inchikey")),
        Query::Cid(n) => by("cid = ?1", n)?.map(|r| (r, "cid")),
        Query::Smiles(s) => by("smiles = ?1", s)?.map(|r| (r, "smiles")),
        Query::Name(n) => {
            let norm = normalise_name(n);
            if norm.is_empty() {
                return Ok(None);
            }
            let hit = best_by_name(conn, &norm)?;
            // A stereo descriptor the base does not hold: the compound under its stereo-free
            // name, said so (the caller sees `matched_by`).
            match hit {
                Some(h) => Some(h),
                None => {
                    let free = super::normalise::normalise_name_stereo_free(n);
                    if free == norm || free.is_empty() {
                        None
                    } else {
                        conn.prepare_cached(
                            "SELECT c.id, c.inchikey, c.preferred_name, c.smiles, c.formula, c.molar_mass_g_mol, c.cid, c.cas
                             FROM name n JOIN compound c ON c.id = n.compound_id
                             WHERE n.norm = ?1 ORDER BY n.rank, c.cid IS NULL, c.cid, c.id LIMIT 1",
                        )?
                        .query_row([&free], |r| Ok((compound_from_row(r)?, STEREO_DROPPED)))
                        .optional()?
                    }
                }
            }
        }
    })
}

/// The record a normalised name finds in one database, with how it matched.
///
/// Order: the best-ranked name; a stereoisomer's name without its descriptor (rank 3) ranks
/// as a preferred name, as every name did before descriptors were kept, so a name without
/// descriptor finds what it did; but a record that holds the name exactly as its preferred
/// name beats one that holds it only with a descriptor stripped (`fructose` is the fructose
/// record, not a stereo-less record that some source also calls `l-(+)-fructose`). Among
/// records that hold the name only with a descriptor stripped, one with its stereo beats a
/// stereo-less one (`mannitol` is d-mannitol, not `hexitol`, any hexane-hexol), then the
/// lowest CID, the isomer most sources deposited first; the record's own name says which
/// isomer it is.
///
/// Then two rules on what the name without descriptor means when that choice is a
/// stereoisomer (common practice, no source):
/// - an α-amino acid named without descriptor is the L-isomer (the proteinogenic series),
///   whatever the CIDs say;
/// - a compound with a single possible stereo element (one stereocentre or one stereogenic
///   double bond) named without descriptor is its racemate or an unspecified isomer: the
///   record of the same skeleton without stereo is used when one holds the name (exactly,
///   or with a racemate's descriptor, `dl-mandelic acid`), at any rank for a choice that
///   held the name only without its descriptor, at an equal or better rank otherwise
///   (`propylene glycol`, a synonym of the stereo-less propane-1,2-diol, is not the (R)-isomer
///   whose name `(r)-propylene glycol` it also matches). A trivial name of a compound with two
///   or more stereo elements denotes one diastereomer, which a stereo-less record cannot be.
fn best_by_name(
    conn: &Connection,
    norm: &str,
) -> rusqlite::Result<Option<(CompoundRow, &'static str)>> {
    let has_keys: bool = conn
        .prepare_cached(
            "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'structure_key'",
        )?
        .exists([])?;
    let skeleton = if has_keys {
        "(SELECT k.skeleton FROM structure_key k WHERE k.compound_id = c.id)"
    } else {
        "NULL"
    };
    let rows: Vec<(CompoundRow, i64, Option<String>)> = conn
        .prepare_cached(&format!(
            "SELECT c.id, c.inchikey, c.preferred_name, c.smiles, c.formula, c.molar_mass_g_mol, c.cid, c.cas, n.rank, {skeleton}
             FROM name n JOIN compound c ON c.id = n.compound_id
             WHERE n.norm = ?1 ORDER BY CASE n.rank WHEN 3 THEN 0 ELSE n.rank END, n.rank = 3, n.rank = 3 AND instr(coalesce(c.smiles, ''), '@') = 0, c.cid IS NULL, c.cid, c.id LIMIT 64"
        ))?
        .query_map([norm], |r| Ok((compound_from_row(r)?, r.get(8)?, r.get(9)?)))?
        .collect::<Result<_, _>>()?;
    let how = |rank: i64| match rank {
        0 => "name",
        3 => STEREO_ISOMER_NAME,
        _ => "synonym",
    };
    let mut rows = rows.into_iter();
    let Some((first, rank, skeleton)) = rows.next() else {
        return Ok(None);
    };
    let has_stereo = |r: &CompoundRow| r.smiles.as_deref().is_some_and(|s| s.contains('@'));
    if !has_stereo(&first) {
        return Ok(Some((first, how(rank))));
    }
    let smiles = first.smiles.clone().unwrap_or_default();
    let Ok(parsed) = crate::structure::parse_smiles(&smiles) else {
        return Ok(Some((first, how(rank))));
    };
    if rank == 3 && is_alpha_amino_acid(&parsed.graph) {
        return Ok(Some((l_amino_acid_instead(conn, norm, first)?, how(rank))));
    }
    let (Some(skeleton), 1) = (
        skeleton,
        crate::structure::canon::possible_stereo_elements(&parsed.graph),
    ) else {
        return Ok(Some((first, how(rank))));
    };
    let effective = |r: i64| if r == 3 { 0 } else { r };
    let stereo_less = rows.find(|(r, rk, sk)| {
        !has_stereo(r)
            && sk.as_deref() == Some(skeleton.as_str())
            && (rank == 3 || (*rk != 3 && effective(*rk) <= effective(rank)))
    });
    Ok(Some(match stereo_less {
        Some((r, 3, _)) => (r, RACEMATE_NAME),
        Some((r, rk, _)) => (r, how(rk)),
        None => (first, how(rank)),
    }))
}

/// For a name held only by stereoisomers' names (rank 3) whose choice is a `d-` α-amino
/// acid, the `l-` record holding the same name, when there is one; else `row` unchanged.
fn l_amino_acid_instead(
    conn: &Connection,
    norm: &str,
    row: CompoundRow,
) -> rusqlite::Result<CompoundRow> {
    let lower = row.name.to_lowercase();
    let Some(rest) = lower.strip_prefix("d-") else {
        return Ok(row);
    };
    let l = conn
        .prepare_cached(&format!(
            "SELECT {COMPOUND_COLUMNS} FROM compound c WHERE c.id IN
             (SELECT compound_id FROM name WHERE norm = ?1 AND rank = 3)
             AND lower(c.preferred_name) = ?2 ORDER BY c.cid IS NULL, c.cid, c.id LIMIT 1"
        ))?
        .query_row(params![norm, format!("l-{rest}")], compound_from_row)
        .optional()?;
    Ok(l.unwrap_or(row))
}

/// Whether a structure is an α-amino acid: a saturated carbon bearing an amine nitrogen and a
/// carboxylic acid (or carboxylate) carbon.
fn is_alpha_amino_acid(g: &crate::structure::graph::MolGraph) -> bool {
    use crate::structure::graph::BondOrder;
    let carboxyl = |c: usize| {
        g.atoms[c].atomic_number == 6 && {
            let os: Vec<BondOrder> = g.neighbours[c]
                .iter()
                .filter(|&&(j, _)| g.atoms[j].atomic_number == 8)
                .map(|&(_, b)| g.bonds[b].order)
                .collect();
            os.len() == 2 && os.contains(&BondOrder::Double)
        }
    };
    (0..g.atoms.len()).any(|a| {
        g.atoms[a].atomic_number == 6
            && !g.atoms[a].aromatic
            && g.neighbours[a].iter().any(|&(j, b)| {
                g.atoms[j].atomic_number == 7 && g.bonds[b].order == BondOrder::Single
            })
            && g.neighbours[a].iter().any(|&(j, _)| carboxyl(j))
    })
}

/// InChIKey and SMILES of a compound.
pub(crate) type KeyAndSmiles = (Option<String>, Option<String>);

/// InChIKey and SMILES of the compound a query finds in one database.
pub(crate) fn find_row(
    conn: &Connection,
    q: &Query,
) -> rusqlite::Result<Option<(KeyAndSmiles, &'static str)>> {
    Ok(find(conn, q)?.map(|(r, how)| ((r.inchikey, r.smiles), how)))
}

fn properties_of(conn: &Connection, id: i64, origin: Origin) -> rusqlite::Result<Vec<Property>> {
    let mut st = conn.prepare_cached(
        "SELECT property, value, unit, kind, source, licence, detail FROM property
         WHERE compound_id = ?1 ORDER BY id",
    )?;
    let rows = st.query_map([id], |r| {
        let kind: String = r.get(3)?;
        let kind = PropertyKind::parse(&kind).unwrap_or(PropertyKind::Estimated);
        let licence: String = r.get(5)?;
        Ok(Property {
            property: r.get(0)?,
            value: r.get(1)?,
            unit: r.get(2)?,
            kind,
            source: r.get(4)?,
            // structure estimates stored beside a user compound were computed by phasewise,
            // not supplied by the user: they must not carry the user's rank
            origin: if origin == Origin::User && is_computed(kind, &licence) {
                Origin::Computed
            } else {
                origin
            },
            licence,
            detail: r.get(6)?,
        })
    })?;
    rows.collect()
}

/// Whether a stored row is one of phasewise's own structure estimates.
pub(crate) fn is_computed(kind: PropertyKind, licence: &str) -> bool {
    kind == PropertyKind::Estimated && licence == crate::property::estimate::LICENCE_COMPUTED
}

/// Drop overlay rows computed by phasewise that repeat a shipped row (same property, method
/// and value): overlays written before 0.1.1 stored the structure estimates of shipped
/// compounds a second time.
fn drop_repeated_estimates(props: &mut Vec<Property>) {
    let shipped: Vec<(String, String, f64)> = props
        .iter()
        .filter(|p| p.origin == Origin::Shipped && p.kind == PropertyKind::Estimated)
        .map(|p| (p.property.clone(), p.source.clone(), p.value))
        .collect();
    props.retain(|p| {
        p.origin != Origin::Computed
            || !shipped.iter().any(|(n, s, v)| {
                *n == p.property && *s == p.source && (v - p.value).abs() <= 1e-9 * v.abs().max(1.0)
            })
    });
}

impl Kb {
    /// Resolve one query.
    ///
    /// # Errors
    /// Malformed identifiers ([`KbError::BadIdentifier`]) are returned as
    /// [`Resolution::Unresolved`] with the reason; only database failures are errors.
    pub fn resolve(&self, raw: &str) -> Result<Resolution, KbError> {
        let r = self.resolve_raw(raw)?;
        self.standardise(r)
    }

    /// [`Kb::resolve`] without the standardisation of salts and stereo-less records.
    pub(crate) fn resolve_raw(&self, raw: &str) -> Result<Resolution, KbError> {
        let q = match classify(raw) {
            Ok(q) => q,
            Err(KbError::BadIdentifier { why, .. }) => {
                return Ok(Resolution::Unresolved(Unresolved {
                    query: raw.to_string(),
                    reason: why,
                    suggestions: Vec::new(),
                    candidates: Vec::new(),
                }));
            }
            Err(e) => return Err(e),
        };
        if let Query::Name(n) = &q {
            if let Some(r) = self.resolve_labelled(raw)? {
                return Ok(r);
            }
            // Text written in SMILES-only syntax (brackets, `=`, `#`, `@`, `/`) that parses
            // is a structure first: its letters, read as a name, can match a formula-like
            // synonym of another compound (`[O-][N+](=O)[O-]`, nitrate, reads `onooo`, a
            // synonym of peroxynitrite).
            if n.contains(['[', '=', '#', '@', '/', '\\']) && crate::structure::is_valid_smiles(n) {
                if let Some(a) = self.find_anywhere(raw, &Query::Smiles(n.clone()))? {
                    return Ok(Resolution::Found(Box::new(a)));
                }
                if let Some(a) = self.find_by_structure(raw, n)? {
                    return Ok(Resolution::Found(Box::new(a)));
                }
            }
            if let Some(r @ Resolution::Found(_)) = self.resolve_ion(raw)? {
                return Ok(r);
            }
            if let Some(r) = self.decide_name(raw, n)? {
                return Ok(r);
            }
        }
        if let Some(a) = self.find_anywhere(raw, &q)? {
            return Ok(Resolution::Found(Box::new(a)));
        }
        // A name that was not found may be a SMILES string.
        if let Query::Name(n) = &q
            && could_be_smiles(n)
        {
            if let Some(a) = self.find_anywhere(raw, &Query::Smiles(n.clone()))? {
                return Ok(Resolution::Found(Box::new(a)));
            }
            if let Some(a) = self.find_by_structure(raw, n)? {
                return Ok(Resolution::Found(Box::new(a)));
            }
            if crate::structure::is_valid_smiles(n) {
                return Ok(Resolution::StructureOnly {
                    query: raw.to_string(),
                    smiles: n.clone(),
                });
            }
        }
        if let Query::Smiles(s) = &q {
            if let Some(a) = self.find_by_structure(raw, s)? {
                return Ok(Resolution::Found(Box::new(a)));
            }
            return Ok(match crate::structure::check_smiles(s) {
                Ok(()) => Resolution::StructureOnly {
                    query: raw.to_string(),
                    smiles: s.clone(),
                },
                Err(why) => Resolution::Unresolved(Unresolved {
                    query: raw.to_string(),
                    reason: format!("not a valid SMILES string: {why}"),
                    suggestions: Vec::new(),
                    candidates: Vec::new(),
                }),
            });
        }
        // a drug name whose base holds only its salts (`amikacin` -> `amikacin sulfate`): the
        // salt record is found and standardised to its parent structure (issue 13)
        if let Query::Name(n) = &q
            && let Some(a) = self.find_salt_of(raw, n)?
        {
            return Ok(Resolution::Found(Box::new(a)));
        }
        let reason = match &q {
            Query::Name(_) => "no compound with this name or synonym".to_string(),
            Query::Cas(_) => "no compound with this CAS number".to_string(),
            Query::InchiKey(_) => "no compound with this InChIKey".to_string(),
            Query::Cid(_) => "no compound with this PubChem CID".to_string(),
            Query::Smiles(_) => "no compound with this SMILES".to_string(),
        };
        let suggestions = match &q {
            Query::Name(n) => self.suggest(n)?,
            _ => Vec::new(),
        };
        Ok(Resolution::Unresolved(Unresolved {
            query: raw.to_string(),
            reason,
            suggestions,
            candidates: Vec::new(),
        }))
    }

    /// The salt record of a name the base holds only as salts: `name` followed by one of the
    /// usual pharmaceutical counter-ion words (sulfate, hydrochloride, sodium, ...), a record
    /// whose SMILES has more than one fragment. The standardisation then makes its parent the
    /// analyte and says so. `None` when no such salt record exists.
    fn find_salt_of(&self, raw: &str, name: &str) -> Result<Option<Analyte>, KbError> {
        // the counter-ions of drugs, and of quaternary ammonium analytes (`mepiquat chloride`,
        // `paraquat dichloride`, `diquat dibromide`, `difenzoquat methyl sulfate`)
        const SALT_WORDS: [&str; 27] = [
            "chloride",
            "dichloride",
            "bromide",
            "dibromide",
            "iodide",
            "methyl sulfate",
            "metilsulfate",
            "nitrate",
            "hydroiodide",
            "sulfate",
            "sulphate",
            "hydrochloride",
            "sodium",
            "potassium",
            "calcium",
            "hydrobromide",
            "mesylate",
            "maleate",
            "tartrate",
            "citrate",
            "phosphate",
            "fumarate",
            "besylate",
            "succinate",
            "acetate",
            "hcl",
            "sodium salt",
        ];
        let base = name.trim();
        if base.is_empty() || base.split_whitespace().count() > 3 {
            return Ok(None);
        }
        for w in SALT_WORDS {
            let salt_name = format!("{base} {w}");
            if let Some(a) = self.find_anywhere(raw, &Query::Name(salt_name.clone()))?
                && a.smiles.as_deref().is_some_and(|s| s.contains('.'))
                && normalise_name(&a.name) == normalise_name(&salt_name)
            {
                return Ok(Some(a));
            }
        }
        Ok(None)
    }

    /// `label=SMILES` (or `label=CAS`, `label=CID`, `label=InChIKey`): the right-hand side
    /// is resolved and the label kept as the query. `None` when `raw` is not of this form (a
    /// valid SMILES with `=` bonds stays a SMILES).
    fn resolve_labelled(&self, raw: &str) -> Result<Option<Resolution>, KbError> {
        let Some((label, rhs)) = raw.split_once('=') else {
            return Ok(None);
        };
        let (label, rhs) = (label.trim(), rhs.trim());
        if label.is_empty() || rhs.is_empty() || crate::structure::is_valid_smiles(raw.trim()) {
            return Ok(None);
        }
        // a label closes every bracket it opens: `[O-]Cl(=O)=O` is a SMILES, not the label
        // `[O-]Cl(` of `O)=O`
        let balanced = |open: char, close: char| {
            let mut depth = 0i32;
            label.chars().all(|c| {
                depth += i32::from(c == open) - i32::from(c == close);
                depth >= 0
            }) && depth == 0
        };
        if !balanced('(', ')') || !balanced('[', ']') {
            return Ok(None);
        }
        if matches!(classify(rhs), Ok(Query::Name(_)) | Err(_)) && !could_be_smiles(rhs) {
            return Ok(None);
        }
        Ok(Some(match self.resolve(rhs)? {
            Resolution::Found(mut a) => {
                a.query = label.to_string();
                Resolution::Found(a)
            }
            Resolution::StructureOnly { smiles, .. } => Resolution::StructureOnly {
                query: label.to_string(),
                smiles,
            },
            Resolution::Unresolved(mut u) => {
                u.query = raw.trim().to_string();
                Resolution::Unresolved(u)
            }
        }))
    }

    /// An unresolved outcome when `name` denotes several different compounds in the shipped
    /// base and the user overlay does not hold it, or the common form when it denotes the ring
    /// and chain forms of one sugar (see [`super::ambiguity`]); `None` otherwise.
    fn decide_name(&self, raw: &str, name: &str) -> Result<Option<Resolution>, KbError> {
        let norm = normalise_name(name);
        if norm.is_empty() {
            return Ok(None);
        }
        if let Some(u) = &self.user {
            let held: bool = u
                .prepare_cached("SELECT 1 FROM name WHERE norm = ?1")
                .and_then(|mut st| st.exists([&norm]))
                .map_err(|e| KbError::sql(&self.user_path, e))?;
            if held {
                return Ok(None);
            }
        }
        let decision = super::ambiguity::decide(&self.shipped, raw, &norm)
            .map_err(|e| KbError::sql(&self.shipped_path, e))?;
        Ok(match decision {
            super::ambiguity::NameDecision::Ambiguous(c) => {
                Some(Resolution::Unresolved(Unresolved {
                    query: raw.trim().to_string(),
                    reason: super::ambiguity::ambiguity_reason(raw, &c),
                    suggestions: Vec::new(),
                    candidates: c,
                }))
            }
            super::ambiguity::NameDecision::CommonForm { id, note } => self
                .find_anywhere_by_id(raw, id, Origin::Shipped, &format!("name; {note}"))?
                .map(|a| Resolution::Found(Box::new(a))),
            _ => None,
        })
    }

    /// The record whose canonical structure key matches `smiles` (user overlay first, then
    /// the shipped base; stereo key before skeleton key), with the shipped and user values
    /// of the same compound merged as for any other match.
    fn find_by_structure(&self, raw: &str, smiles: &str) -> Result<Option<Analyte>, KbError> {
        let Some(key) = query_key(smiles) else {
            return Ok(None);
        };
        if let Some(u) = &self.user
            && let Some((id, how)) = self
                .user_keys
                .find(u, &key)
                .map_err(|e| KbError::sql(&self.user_path, e))?
        {
            return self.find_anywhere_by_id(raw, id, Origin::User, &how.describe(&key));
        }
        let exact =
            find_shipped(&self.shipped, &key).map_err(|e| KbError::sql(&self.shipped_path, e))?;
        // a salt record matched through its largest fragment gives way to the compound's own
        // record held as another tautomer (same formula as the query, so never a salt)
        let salt_only = match exact {
            Some((id, _)) => is_salt_of(&self.shipped, id, smiles)
                .map_err(|e| KbError::sql(&self.shipped_path, e))?,
            None => true,
        };
        if salt_only
            && let Some(id) = find_shipped_tautomer(&self.shipped, smiles)
                .map_err(|e| KbError::sql(&self.shipped_path, e))?
        {
            return self.find_anywhere_by_id(
                raw,
                id,
                Origin::Shipped,
                "structure as another tautomer (hydrogens or charges on N, O or S placed differently from the base's record; check that the record is the compound meant)",
            );
        }
        match exact {
            Some((id, how)) => {
                self.find_anywhere_by_id(raw, id, Origin::Shipped, &how.describe(&key))
            }
            None => Ok(None),
        }
    }

    /// As [`Kb::find_anywhere`] for a known row id of one base.
    fn find_anywhere_by_id(
        &self,
        raw: &str,
        id: i64,
        origin: Origin,
        how: &str,
    ) -> Result<Option<Analyte>, KbError> {
        let (conn, path) = match (origin, &self.user) {
            (Origin::User, Some(u)) => (u, &self.user_path),
            _ => (&self.shipped, &self.shipped_path),
        };
        let row = conn
            .prepare_cached(&format!(
                "SELECT {COMPOUND_COLUMNS} FROM compound WHERE id = ?1"
            ))
            .and_then(|mut st| st.query_row([id], compound_from_row).optional())
            .map_err(|e| KbError::sql(path, e))?;
        let Some(row) = row else { return Ok(None) };
        // Reuse the identity merge of the InChIKey path when the record has one.
        if let Some(key) = &row.inchikey
            && let Some(mut a) = self.find_anywhere(raw, &Query::InchiKey(key.clone()))?
            && a.name == row.name
        {
            a.matched_by = how.to_string();
            return Ok(Some(a));
        }
        let mut a = self.analyte_from(raw, &row, how, origin)?;
        a.sort_properties();
        Ok(Some(a))
    }

    fn find_anywhere(&self, raw: &str, q: &Query) -> Result<Option<Analyte>, KbError> {
        let user_hit = match &self.user {
            Some(u) => find(u, q).map_err(|e| KbError::sql(&self.user_path, e))?,
            None => None,
        };
        if let Some((row, how)) = user_hit {
            let mut a = self.analyte_from(raw, &row, how, Origin::User)?;
            // Shipped values for the same compound stay visible, ranked below the user's.
            if let Some(key) = &row.inchikey
                && let Some((srow, _)) = find(&self.shipped, &Query::InchiKey(key.clone()))
                    .map_err(|e| KbError::sql(&self.shipped_path, e))?
            {
                let extra = properties_of(&self.shipped, srow.id, Origin::Shipped)
                    .map_err(|e| KbError::sql(&self.shipped_path, e))?;
                a.properties.extend(extra);
                drop_repeated_estimates(&mut a.properties);
                fill_identity(&mut a, &srow);
            }
            a.sort_properties();
            return Ok(Some(a));
        }
        let hit = find(&self.shipped, q).map_err(|e| KbError::sql(&self.shipped_path, e))?;
        let Some((row, how)) = hit else {
            return Ok(None);
        };
        let mut a = self.analyte_from(raw, &row, how, Origin::Shipped)?;
        // User values for the same compound (matched by InChIKey) win.
        if let (Some(u), Some(key)) = (&self.user, &row.inchikey)
            && let Some((urow, _)) = find(u, &Query::InchiKey(key.clone()))
                .map_err(|e| KbError::sql(&self.user_path, e))?
        {
            let extra = properties_of(u, urow.id, Origin::User)
                .map_err(|e| KbError::sql(&self.user_path, e))?;
            a.properties.extend(extra);
            drop_repeated_estimates(&mut a.properties);
        }
        a.sort_properties();
        Ok(Some(a))
    }

    fn analyte_from(
        &self,
        raw: &str,
        row: &CompoundRow,
        how: &str,
        origin: Origin,
    ) -> Result<Analyte, KbError> {
        let (conn, path) = match origin {
            Origin::User => (self.user.as_ref().unwrap_or(&self.shipped), &self.user_path),
            _ => (&self.shipped, &self.shipped_path),
        };
        let properties = properties_of(conn, row.id, origin).map_err(|e| KbError::sql(path, e))?;
        Ok(Analyte {
            query: raw.trim().to_string(),
            name: row.name.clone(),
            inchikey: row.inchikey.clone(),
            smiles: row.smiles.clone(),
            formula: row.formula.clone(),
            molar_mass_g_mol: row.mw,
            cid: row.cid,
            cas: row.cas.clone(),
            origin,
            matched_by: how.to_string(),
            properties,
        })
    }

    /// Up to [`MAX_SUGGESTIONS`] names close to `name`, from both databases.
    ///
    /// A trigram index narrows the whole base to a few hundred candidates (the rarest
    /// trigrams of the query that occur at all), which are then ranked by normalised
    /// Damerau–Levenshtein similarity.
    ///
    /// # Errors
    /// Database failures.
    pub fn suggest(&self, name: &str) -> Result<Vec<Suggestion>, KbError> {
        let norm = normalise_name(name);
        let mut all =
            suggest_in(&self.shipped, &norm).map_err(|e| KbError::sql(&self.shipped_path, e))?;
        if let Some(u) = &self.user {
            all.extend(suggest_in(u, &norm).map_err(|e| KbError::sql(&self.user_path, e))?);
        }
        all.sort_by(|a, b| {
            b.similarity
                .total_cmp(&a.similarity)
                .then_with(|| a.name.len().cmp(&b.name.len()))
                .then_with(|| a.name.cmp(&b.name))
        });
        let mut seen = Vec::new();
        all.retain(|s| {
            if seen.contains(&s.compound) {
                false
            } else {
                seen.push(s.compound.clone());
                true
            }
        });
        keep_close_to_best(&mut all);
        all.truncate(MAX_SUGGESTIONS);
        Ok(all)
    }
}

/// A suggestion at least this similar counts as a near-exact match (e.g. one swapped or
/// missing letter in an eight-letter name: 1 − 1/8 = 0.875).
const NEAR_EXACT: f64 = 0.8;
/// Beside a near-exact match, only suggestions within this much of it are kept: an unrelated
/// name of similarity 0.6 next to a 0.88 match only distracts.
const CLOSE_TO_BEST: f64 = 0.1;

/// Drops suggestions far below a near-exact best one (`all` sorted best first).
fn keep_close_to_best(all: &mut Vec<Suggestion>) {
    if let Some(best) = all.first().map(|s| s.similarity)
        && best >= NEAR_EXACT
    {
        all.retain(|s| s.similarity >= best - CLOSE_TO_BEST);
    }
}

fn fill_identity(a: &mut Analyte, row: &CompoundRow) {
    if a.smiles.is_none() {
        a.smiles = row.smiles.clone();
    }
    if a.formula.is_none() {
        a.formula = row.formula.clone();
    }
    if a.molar_mass_g_mol.is_none() {
        a.molar_mass_g_mol = row.mw;
    }
    if a.cid.is_none() {
        a.cid = row.cid;
    }
    if a.cas.is_none() {
        a.cas = row.cas.clone();
    }
}

/// Most trigrams whose posting lists are read for one query (the rarest ones).
const TRIGRAMS_READ: usize = 16;
/// Trigrams in more names than this are skipped (unless fewer than three are left).
const COMMON_TRIGRAM: i64 = 250_000;

/// A trigram-index rowid holds the (padded, capped) length of the name in its high bits and
/// the name id in the low [`ID_BITS`] bits. Posting lists are sorted by rowid, so they are
/// grouped by length: a query reads only names of about its own length (a rowid range), and
/// ranks them by trigram Jaccard similarity straight from the posting lists.
const ID_BITS: u32 = 40;
/// Longest length kept in a rowid.
const MAX_LEN: i64 = 255;

/// The trigram-index rowid of a name (`text` is the padded index text).
pub(crate) fn trigram_rowid(name_id: i64, text: &str) -> i64 {
    let len = (text.chars().count() as i64).min(MAX_LEN);
    (len << ID_BITS) | name_id
}

/// The text put into the trigram index: the normalised name between start and end marks, so
/// that the first and last letters form trigrams of their own (`^be`, `ne$`), which anchor
/// short names.
pub(crate) fn trigram_text(norm: &str) -> String {
    format!("^{norm}$")
}
/// Candidates (most shared trigrams first) ranked by edit similarity.
const CANDIDATES: usize = 300;

/// The shipped base's table of trigram document frequencies, written by the build from the
/// fts5vocab view (which counts them by walking each posting list on every read).
pub(crate) const TRIGRAM_DF_SQL: &str = "
CREATE TABLE name_trigram_df (term TEXT PRIMARY KEY, doc INTEGER NOT NULL) WITHOUT ROWID;
INSERT INTO name_trigram_df SELECT term, doc FROM name_trigram_vocab;
";

fn suggest_in(conn: &Connection, norm: &str) -> rusqlite::Result<Vec<Suggestion>> {
    if norm.chars().count() < 2 {
        return Ok(Vec::new());
    }
    let chars: Vec<char> = trigram_text(norm).chars().collect();
    let mut grams: Vec<String> = chars.windows(3).map(|w| w.iter().collect()).collect();
    grams.sort();
    grams.dedup();
    // document frequency of each trigram
    let mut df: Vec<(i64, String)> = Vec::new();
    {
        let stored: bool = conn
            .prepare_cached(
                "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'name_trigram_df'",
            )?
            .exists([])?;
        let mut st = conn.prepare_cached(if stored {
            "SELECT doc FROM name_trigram_df WHERE term = ?1"
        } else {
            "SELECT doc FROM name_trigram_vocab WHERE term = ?1"
        })?;
        for g in &grams {
            if let Some(d) = st.query_row([g], |r| r.get::<_, i64>(0)).optional()? {
                df.push((d, g.clone()));
            }
        }
    }
    df.sort();
    let mut hits: HashMap<i64, u32> = HashMap::new();
    {
        let mut st = conn.prepare_cached(
            "SELECT rowid FROM name_trigram WHERE name_trigram MATCH ?1 AND rowid BETWEEN ?2 AND ?3",
        )?;
        // Names whose length differs by more than a quarter cannot be close in edit distance.
        let len = chars.len() as i64;
        let slack = (len / 4).max(2);
        let lo = ((len - slack).max(0)) << ID_BITS;
        let hi = (((len + slack).min(MAX_LEN) + 1) << ID_BITS) - 1;
        let rare = df
            .iter()
            .filter(|(d, _)| *d <= COMMON_TRIGRAM)
            .count()
            .max(3);
        for (_, g) in df.iter().take(rare.min(TRIGRAMS_READ)) {
            let quoted = format!("\"{}\"", g.replace('"', "\"\""));
            let rows = st.query_map(params![quoted, lo, hi], |r| r.get::<_, i64>(0))?;
            for id in rows {
                *hits.entry(id?).or_insert(0) += 1;
            }
        }
    }
    let q_grams = (chars.len() - 2) as f64;
    let mut cand: Vec<(f64, i64)> = hits
        .into_iter()
        .map(|(rowid, n)| {
            let len = (rowid >> ID_BITS) as f64;
            let c_grams = (len - 2.0).max(1.0);
            let jaccard = f64::from(n) / (q_grams + c_grams - f64::from(n)).max(1.0);
            (jaccard, rowid & ((1 << ID_BITS) - 1))
        })
        .collect();
    cand.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
    cand.truncate(CANDIDATES);
    let mut st = conn.prepare_cached(
        "SELECT n.name, n.norm, c.preferred_name FROM name n JOIN compound c ON c.id = n.compound_id WHERE n.id = ?1",
    )?;
    let mut out = Vec::new();
    for (_, id) in cand {
        if let Some((name, cand_norm, compound)) = st
            .query_row(params![id], |r| {
                Ok((
                    r.get::<_, String>(0)?,
                    r.get::<_, String>(1)?,
                    r.get::<_, String>(2)?,
                ))
            })
            .optional()?
        {
            let similarity = strsim::normalized_damerau_levenshtein(norm, &cand_norm);
            out.push(Suggestion {
                name,
                compound,
                similarity,
            });
        }
    }
    Ok(out)
}

#[cfg(test)]
mod suggestion_tests {
    use super::*;

    #[test]
    fn unrelated_names_are_dropped_beside_a_near_exact_match() {
        let sug = |name: &str, similarity: f64| Suggestion {
            name: name.into(),
            compound: name.into(),
            similarity,
        };
        // "caffiene": caffeine is one transposition away (0.875); the others are unrelated
        let mut v = vec![
            sug("caffeine", 0.875),
            sug("cafestol", 0.6),
            sug("carbene", 0.55),
        ];
        keep_close_to_best(&mut v);
        assert_eq!(v.len(), 1);
        // without a near-exact match every candidate stays for the user to judge
        let mut v = vec![sug("alpha", 0.6), sug("beta", 0.55)];
        keep_close_to_best(&mut v);
        assert_eq!(v.len(), 2);
        // two near-exact matches are both kept
        let mut v = vec![sug("xylol", 0.9), sug("xylene", 0.83)];
        keep_close_to_best(&mut v);
        assert_eq!(v.len(), 2);
    }
}
