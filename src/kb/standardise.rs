//! Standardisation of a resolved record, said out loud in `matched_by`:
//!
//! - a **salt** record (its SMILES has more than one fragment, e.g. `metformin
//!   hydrochloride`) is replaced by the record of its parent when the base holds one (same
//!   canonical key, single fragment), else kept with a note that its parent structure (the
//!   largest organic fragment) is what is analysed; the counter-ions are named so that ion
//!   chromatography can still see them;
//! - a name that matched a record **without stereo** although the compound has
//!   stereoisomers is flagged when the name was only a synonym of that record, itself
//!   denotes a stereoisomer (`dieldrin` held as a synonym of the stereo-less `endrin`
//!   record), or names a compound with two or more possible stereo elements (a trivial name
//!   such as `aflatoxin b1` denotes one diastereomer, which a stereo-less record cannot be):
//!   the base cannot tell the stereoisomers apart. A compound with one stereocentre named
//!   without descriptor (`ibuprofen`) is its racemate or either enantiomer, and is not
//!   flagged, nor is such a synonym when stereoisomer records carry it with their descriptor
//!   (`propylene glycol` beside `(R)-propylene glycol`: the name of the racemate). Common practice, no source.

use rusqlite::OptionalExtension;

use super::resolve::Resolution;
use super::{Kb, KbError};
use crate::property::{Analyte, Origin};
use crate::structure::canon::{key_of_graph, possible_stereo_elements};

/// Note appended when a stereo name meets a record without stereo.
pub const STEREO_LESS_NOTE: &str =
    "the base holds this compound without stereo, so its stereoisomers are not told apart";

/// Words that mark a name as denoting one stereoisomer.
fn has_stereo_word(name: &str) -> bool {
    let low = name.trim().to_ascii_lowercase();
    const PREFIXES: &[&str] = &[
        "(+)", "(-)", "(r)", "(s)", "(e)", "(z)", "(r,", "(s,", "(1r", "(1s", "(2r", "(2s", "(3r",
        "(3s", "cis-", "trans-", "l-", "d-", "r-", "s-", "e-", "z-", "dex", "lev", "meso-",
        "endo-", "exo-",
    ];
    PREFIXES.iter().any(|p| low.starts_with(p))
}

impl Kb {
    /// Apply the standardisation to a resolution (only found shipped records change).
    ///
    /// # Errors
    /// Database failures.
    pub(crate) fn standardise(&self, r: Resolution) -> Result<Resolution, KbError> {
        let Resolution::Found(mut a) = r else {
            return Ok(r);
        };
        if a.origin != Origin::Shipped {
            return Ok(Resolution::Found(a));
        }
        let Some(smiles) = a.smiles.clone() else {
            return Ok(Resolution::Found(a));
        };
        // Only a salt record (more than one fragment) or a match by name that may have met a
        // stereo-less record can change below; any other record is kept without parsing it.
        let by_name = a.matched_by.starts_with("name") || a.matched_by.starts_with("synonym");
        let salt_possible = smiles.contains('.') && !a.matched_by.contains("salt");
        let stereo_possible = by_name && !a.matched_by.contains(STEREO_LESS_NOTE);
        if !salt_possible && !stereo_possible {
            return Ok(Resolution::Found(a));
        }
        // A record of one fragment (no `.`: nothing to drop) needs only what the build stored
        // from the same parse (its skeleton key, stereo elements and possible stereo
        // elements); its SMILES is parsed only when the base lacks them.
        if !smiles.contains('.')
            && let Some((skeleton, elements, possible)) = self.stored_stereo_facts(&smiles)
        {
            if by_name && elements == 0 && !a.matched_by.contains(STEREO_LESS_NOTE) {
                let flag = possible >= 2
                    || (possible == 1
                        && (has_stereo_word(&a.query)
                            || (a.matched_by.starts_with("synonym")
                                && !self.racemate_name(&a.query, &skeleton)?)));
                if flag {
                    a.matched_by = format!("{}; {STEREO_LESS_NOTE}", a.matched_by);
                }
            }
            return Ok(Resolution::Found(a));
        }
        let Ok(parsed) = crate::structure::parse_smiles(&smiles) else {
            return Ok(Resolution::Found(a));
        };
        let key = key_of_graph(&parsed.graph);
        if !parsed.fragments_dropped.is_empty() && !a.matched_by.contains("salt") {
            let dropped = parsed.fragments_dropped.join(", ");
            let parent: Option<i64> = self
                .shipped
                .prepare_cached(
                    "SELECT k.compound_id FROM structure_key k JOIN compound c ON c.id = k.compound_id
                     WHERE k.stereo = ?1 AND k.parent = 1 ORDER BY c.cid IS NULL, c.cid, c.id LIMIT 1",
                )
                .and_then(|mut st| st.query_row([&key.stereo], |r| r.get(0)).optional())
                .or_else(|e| match e {
                    // bases built before the key table: no parent look-up
                    rusqlite::Error::SqliteFailure(..) => Ok(None),
                    other => Err(other),
                })
                .map_err(|e| KbError::sql(&self.shipped_path, e))?;
            let salt = a.name.clone();
            let how = a.matched_by.clone();
            if let Some(id) = parent
                && let Some(mut p) = self.analyte_by_id(&a.query, id)?
            {
                p.matched_by = format!(
                    "{how} of the salt `{salt}`; the parent `{}` is the analyte (counter-ion {dropped})",
                    p.name
                );
                return Ok(Resolution::Found(p));
            }
            a.matched_by = format!(
                "{how}; salt record: its parent structure is the analyte (counter-ion {dropped})"
            );
        }
        if by_name && key.stereo_elements == 0 && !a.matched_by.contains(STEREO_LESS_NOTE) {
            let possible = possible_stereo_elements(&parsed.graph);
            let flag = possible >= 2
                || (possible == 1
                    && (has_stereo_word(&a.query)
                        || (a.matched_by.starts_with("synonym")
                            && !self.racemate_name(&a.query, &key.skeleton)?)));
            if flag {
                a.matched_by = format!("{}; {STEREO_LESS_NOTE}", a.matched_by);
            }
        }
        Ok(Resolution::Found(a))
    }

    /// (skeleton key, stereo elements, possible stereo elements) that the build stored for a
    /// shipped record with this SMILES (the keys are a function of the SMILES text, so any
    /// record with it will do); `None` when no record has a key (its SMILES did not parse)
    /// or the base predates these columns.
    fn stored_stereo_facts(&self, smiles: &str) -> Option<(String, i64, i64)> {
        self.shipped
            .prepare_cached(
                "SELECT k.skeleton, k.stereo_elements, k.possible_stereo
                 FROM compound c JOIN structure_key k ON k.compound_id = c.id
                 WHERE c.smiles = ?1 LIMIT 1",
            )
            .and_then(|mut st| {
                st.query_row([smiles], |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?)))
                    .optional()
            })
            .ok()
            .flatten()
    }

    /// Whether `query` is the name, without descriptor, of stereoisomer records of the same
    /// skeleton (`propylene glycol` beside `(r)-propylene glycol` and `(s)-propylene glycol`):
    /// then, on the record without stereo, it names the racemate or an unspecified isomer,
    /// not one stereoisomer under a name of its own (`levetiracetam`).
    fn racemate_name(&self, query: &str, skeleton: &str) -> Result<bool, KbError> {
        let norm = super::normalise::normalise_name(query);
        self.shipped
            .prepare_cached(
                "SELECT 1 FROM name n JOIN structure_key k ON k.compound_id = n.compound_id
                 JOIN compound c ON c.id = n.compound_id
                 WHERE n.norm = ?1 AND n.rank = 3 AND k.skeleton = ?2 AND instr(c.smiles, '@') > 0",
            )
            .and_then(|mut st| st.exists(rusqlite::params![norm, skeleton]))
            .or_else(|e| match e {
                rusqlite::Error::SqliteFailure(..) => Ok(false),
                other => Err(other),
            })
            .map_err(|e| KbError::sql(&self.shipped_path, e))
    }

    /// A shipped record as an analyte (with user values of the same compound merged).
    fn analyte_by_id(&self, query: &str, id: i64) -> Result<Option<Box<Analyte>>, KbError> {
        let key: Option<Option<String>> = self
            .shipped
            .prepare_cached("SELECT inchikey FROM compound WHERE id = ?1")
            .and_then(|mut st| st.query_row([id], |r| r.get(0)).optional())
            .map_err(|e| KbError::sql(&self.shipped_path, e))?;
        match key.flatten() {
            Some(k) => match self.resolve_raw(&format!("inchikey:{k}"))? {
                Resolution::Found(mut a) => {
                    a.query = query.to_string();
                    Ok(Some(a))
                }
                _ => Ok(None),
            },
            None => Ok(None),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stereo_words() {
        for n in [
            "L-alanine",
            "(R)-carvone",
            "(+)-limonene",
            "cis-permethrin",
            "dexibuprofen",
        ] {
            assert!(has_stereo_word(n), "{n}");
        }
        for n in ["alanine", "carvone", "caffeine", "permethrin"] {
            assert!(!has_stereo_word(n), "{n}");
        }
    }
}
