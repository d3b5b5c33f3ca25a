-- phasewise knowledge-base schema. Each migration is a numbered block below; the
-- `schema_version` table records the highest one applied. Never edit a released
-- block: add a new one. The shipped base and the user overlay share this schema.

-- migration 1
CREATE TABLE schema_version (version INTEGER NOT NULL);
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE compound (
    id INTEGER PRIMARY KEY,
    inchikey TEXT,
    preferred_name TEXT NOT NULL,
    smiles TEXT,
    formula TEXT,
    molar_mass_g_mol REAL,
    cid INTEGER,
    cas TEXT,
    origin TEXT NOT NULL
);
CREATE INDEX compound_inchikey ON compound(inchikey);
CREATE INDEX compound_cas ON compound(cas);
CREATE INDEX compound_cid ON compound(cid);
CREATE INDEX compound_smiles ON compound(smiles);
CREATE TABLE name (
    id INTEGER PRIMARY KEY,
    compound_id INTEGER NOT NULL REFERENCES compound(id) ON DELETE CASCADE,
    name TEXT NOT NULL,
    norm TEXT NOT NULL,
    rank INTEGER NOT NULL
);
CREATE INDEX name_norm ON name(norm);
CREATE INDEX name_compound ON name(compound_id);
CREATE TABLE property (
    id INTEGER PRIMARY KEY,
    compound_id INTEGER NOT NULL REFERENCES compound(id) ON DELETE CASCADE,
    property TEXT NOT NULL,
    value REAL NOT NULL,
    unit TEXT NOT NULL,
    kind TEXT NOT NULL CHECK (kind IN ('experimental', 'estimated')),
    source TEXT NOT NULL,
    licence TEXT NOT NULL,
    detail TEXT NOT NULL DEFAULT ''
);
CREATE INDEX property_compound ON property(compound_id);
CREATE VIRTUAL TABLE name_trigram USING fts5(norm, content='', tokenize='trigram', detail='none', contentless_delete=1);
CREATE VIRTUAL TABLE name_trigram_vocab USING fts5vocab(name_trigram, 'row');
-- end

-- migration 2
-- Retention fits from the user's own scouting runs (`phasewise scout --store`): one row per
-- analyte and chromatographic system. Only the user overlay holds rows; the table exists in
-- the shipped base too because both share this schema.
CREATE TABLE retention_fit (
    id INTEGER PRIMARY KEY,
    analyte TEXT NOT NULL,
    inchikey TEXT NOT NULL,
    phase_id TEXT NOT NULL,
    mode TEXT NOT NULL CHECK (mode IN ('rp', 'hilic')),
    chem_class TEXT NOT NULL,
    modifier TEXT NOT NULL CHECK (modifier IN ('acetonitrile', 'methanol')),
    ph REAL NOT NULL,
    temperature_c REAL,
    log_kw REAL NOT NULL,
    s REAL NOT NULL,
    log_kw_sd REAL NOT NULL,
    s_sd REAL NOT NULL,
    correlation REAL NOT NULL,
    rms_residual_min REAL NOT NULL,
    gradients TEXT NOT NULL,
    t0_min REAL NOT NULL,
    dwell_min REAL NOT NULL,
    flow_ml_min REAL,
    source TEXT NOT NULL,
    stored_on TEXT NOT NULL
);
CREATE INDEX retention_fit_inchikey ON retention_fit(inchikey);
-- end

-- migration 3
-- The composition the stored log kw and S refer to, and the buffer or additive of the runs.
-- `basis`: `organic` (log k = log kw − S φ, φ the organic fraction; every row stored before
-- this migration) or `water` (ψ = 1 − φ, HILIC fits from now on, with positive S).
-- `buffer`: the aqueous buffer or additive as the user gave it (e.g. `0.1 % formic acid`);
-- NULL for rows stored before this migration, when it was not recorded.
ALTER TABLE retention_fit ADD COLUMN basis TEXT NOT NULL DEFAULT 'organic' CHECK (basis IN ('organic', 'water'));
ALTER TABLE retention_fit ADD COLUMN buffer TEXT;
-- end
