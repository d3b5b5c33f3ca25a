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
