package catalog

// ApplicationID is the SQLite application_id (PRAGMA application_id) that
// marks a file as a plumb catalog: the ASCII bytes "PLMB" as a big-endian
// 32-bit integer.
const ApplicationID = 0x504C4D42

// migrations are the forward schema steps; step i (0-based) takes a catalog
// from user_version i to i+1 and runs in one transaction with the
// user_version bump. Never edit a released step: append a new one.
//
// Units: every figure is SI. Ohm for resistance, a fraction for
// tolerances (0.001 = 0.1 %), ppm/K for tempcos, W, V, A, Hz, V/√Hz, A/√Hz,
// K/W; times are RFC 3339 text in UTC.
var migrations = []string{
	// 1: the first schema.
	`
-- A resistor series: one product line offering every value of an IEC 60063
-- series over [min_ohm, max_ohm] at one grade and one price list.
CREATE TABLE resistor_series (
	id            INTEGER PRIMARY KEY,
	part          TEXT NOT NULL UNIQUE,  -- order-code stem; value part = part || '-' || value code
	maker         TEXT NOT NULL,
	line          TEXT NOT NULL DEFAULT '',
	e_series      TEXT NOT NULL,         -- E24, E96, E192 ...
	min_ohm       REAL NOT NULL,         -- ohm
	max_ohm       REAL NOT NULL,         -- ohm
	technology    TEXT NOT NULL,         -- thick-film, thin-film, foil, ...
	package       TEXT NOT NULL,         -- case code, e.g. 0603
	tolerance     REAL NOT NULL,         -- fraction (0.001 = 0.1 %)
	tcr_ppm       REAL NOT NULL,         -- ±ppm/K about 25 °C
	power_w       REAL NOT NULL,         -- W at rated ambient
	max_voltage_v REAL NOT NULL,         -- V, limiting element voltage (0 = unknown)
	thermal_resistance_k_per_w REAL NOT NULL DEFAULT 0, -- K/W to ambient (0 = unknown)
	load_life     REAL NOT NULL DEFAULT 0, -- fraction over rated life (0 = unknown)
	min_order     INTEGER NOT NULL DEFAULT 0, -- pieces (0 or 1 = none)
	stock         INTEGER NOT NULL DEFAULT -1, -- pieces per value (-1 = unknown)
	source        TEXT NOT NULL DEFAULT '',
	imported_at   TEXT NOT NULL DEFAULT '' -- RFC 3339, UTC
);

-- An individual resistor: one part number, one value.
CREATE TABLE resistors (
	id            INTEGER PRIMARY KEY,
	part          TEXT NOT NULL UNIQUE,
	maker         TEXT NOT NULL,
	line          TEXT NOT NULL DEFAULT '',
	value_ohm     REAL NOT NULL,         -- ohm
	series_part   TEXT NOT NULL DEFAULT '', -- stem of the series it belongs to, if any
	technology    TEXT NOT NULL,
	package       TEXT NOT NULL,
	tolerance     REAL NOT NULL,         -- fraction
	tcr_ppm       REAL NOT NULL,         -- ±ppm/K
	power_w       REAL NOT NULL,         -- W
	max_voltage_v REAL NOT NULL,         -- V (0 = unknown)
	thermal_resistance_k_per_w REAL NOT NULL DEFAULT 0, -- K/W (0 = unknown)
	load_life     REAL NOT NULL DEFAULT 0, -- fraction (0 = unknown)
	min_order     INTEGER NOT NULL DEFAULT 0, -- pieces
	stock         INTEGER NOT NULL DEFAULT -1, -- pieces (-1 = unknown)
	source        TEXT NOT NULL DEFAULT '',
	imported_at   TEXT NOT NULL DEFAULT ''
);
CREATE INDEX resistors_value ON resistors(value_ohm);

-- A matched resistor network; its element values are in network_elements.
CREATE TABLE networks (
	id               INTEGER PRIMARY KEY,
	part             TEXT NOT NULL UNIQUE,
	maker            TEXT NOT NULL,
	technology       TEXT NOT NULL,
	package          TEXT NOT NULL,
	tolerance        REAL NOT NULL,      -- absolute, fraction
	ratio_tolerance  REAL NOT NULL,      -- any element to any other, fraction
	tcr_ppm          REAL NOT NULL,      -- absolute, ±ppm/K
	tcr_tracking_ppm REAL NOT NULL,      -- ratio drift, ±ppm/K
	power_w          REAL NOT NULL,      -- W per element
	max_voltage_v    REAL NOT NULL,      -- V per element (0 = unknown)
	min_order        INTEGER NOT NULL DEFAULT 0, -- pieces
	stock            INTEGER NOT NULL DEFAULT -1, -- pieces (-1 = unknown)
	source           TEXT NOT NULL DEFAULT '',
	imported_at      TEXT NOT NULL DEFAULT ''
);

CREATE TABLE network_elements (
	network_id INTEGER NOT NULL REFERENCES networks(id) ON DELETE CASCADE,
	position   INTEGER NOT NULL,         -- pin order, from 0
	value_ohm  REAL NOT NULL,            -- ohm
	PRIMARY KEY (network_id, position)
) WITHOUT ROWID;

-- Op-amps and amplifiers with matched resistors inside. Ranges are relative
-- to the rails: inputs from V- + cm_neg_v to V+ - cm_pos_v (negative
-- cm_pos_v = inputs work above V+), output from V- + swing_neg_v to
-- V+ - swing_pos_v.
CREATE TABLE amplifiers (
	id                INTEGER PRIMARY KEY,
	part              TEXT NOT NULL UNIQUE,
	maker             TEXT NOT NULL,
	type              TEXT NOT NULL CHECK (type IN ('opamp', 'matched')),
	channels          INTEGER NOT NULL,
	package           TEXT NOT NULL,
	supply_min_v      REAL NOT NULL,     -- V, total span V+ - V-
	supply_max_v      REAL NOT NULL,     -- V, total span
	cm_neg_v          REAL NOT NULL,     -- V above V-
	cm_pos_v          REAL NOT NULL,     -- V below V+ (negative = above V+)
	swing_neg_v       REAL NOT NULL,     -- V above V-
	swing_pos_v       REAL NOT NULL,     -- V below V+
	vos_v             REAL NOT NULL,     -- V, max input offset
	vos_drift_v_per_k REAL NOT NULL,     -- V/K, max offset drift
	ib_a              REAL NOT NULL,     -- A, max input bias current
	ios_a             REAL NOT NULL,     -- A, max input offset current
	aol_v_per_v       REAL NOT NULL,     -- V/V, min open-loop gain
	cmrr_db           REAL NOT NULL,     -- dB, min CMRR
	gbw_hz            REAL NOT NULL,     -- Hz
	slew_v_per_s      REAL NOT NULL,     -- V/s
	noise_v_per_rthz  REAL NOT NULL,     -- V/√Hz
	noise_a_per_rthz  REAL NOT NULL,     -- A/√Hz
	iq_a              REAL NOT NULL,     -- A per channel
	typical_only      TEXT NOT NULL DEFAULT '', -- comma-separated JSON names of typical-only figures
	gain_error_max    REAL NOT NULL DEFAULT 0, -- fraction (matched only)
	gain_drift_ppm    REAL NOT NULL DEFAULT 0, -- ±ppm/K (matched only)
	in_neg_v          REAL NOT NULL DEFAULT 0, -- V above V- (matched only; negative = below V-)
	in_pos_v          REAL NOT NULL DEFAULT 0, -- V below V+ (matched only; negative = above V+)
	internal_ohm      REAL NOT NULL DEFAULT 0, -- ohm (matched only)
	min_order         INTEGER NOT NULL DEFAULT 0, -- pieces
	stock             INTEGER NOT NULL DEFAULT -1, -- pieces (-1 = unknown)
	source            TEXT NOT NULL DEFAULT '',
	imported_at       TEXT NOT NULL DEFAULT ''
);

-- The fixed gains of a matched amplifier, in the maker's order.
CREATE TABLE amplifier_gains (
	amplifier_id INTEGER NOT NULL REFERENCES amplifiers(id) ON DELETE CASCADE,
	position     INTEGER NOT NULL,       -- from 0
	gain         REAL NOT NULL,          -- V/V
	PRIMARY KEY (amplifier_id, position)
) WITHOUT ROWID;

-- Price lists. part_id is the id in the table of the kind
-- ('series' -> resistor_series, 'resistor', 'network', 'amplifier').
CREATE TABLE price_breaks (
	kind       TEXT NOT NULL CHECK (kind IN ('series', 'resistor', 'network', 'amplifier')),
	part_id    INTEGER NOT NULL,
	min_qty    INTEGER NOT NULL CHECK (min_qty >= 1), -- pieces
	unit_price REAL NOT NULL CHECK (unit_price >= 0), -- currency units per piece
	currency   TEXT NOT NULL,            -- ISO 4217 code
	PRIMARY KEY (kind, part_id, min_qty)
) WITHOUT ROWID;

CREATE TRIGGER resistor_series_breaks AFTER DELETE ON resistor_series
	BEGIN DELETE FROM price_breaks WHERE kind = 'series' AND part_id = OLD.id; END;
CREATE TRIGGER resistors_breaks AFTER DELETE ON resistors
	BEGIN DELETE FROM price_breaks WHERE kind = 'resistor' AND part_id = OLD.id; END;
CREATE TRIGGER networks_breaks AFTER DELETE ON networks
	BEGIN DELETE FROM price_breaks WHERE kind = 'network' AND part_id = OLD.id; END;
CREATE TRIGGER amplifiers_breaks AFTER DELETE ON amplifiers
	BEGIN DELETE FROM price_breaks WHERE kind = 'amplifier' AND part_id = OLD.id; END;

-- Where each part's figures came from: one row per import that added,
-- updated or disagreed with a part.
CREATE TABLE part_history (
	id          INTEGER PRIMARY KEY,
	part        TEXT NOT NULL,
	kind        TEXT NOT NULL,
	source      TEXT NOT NULL,
	imported_at TEXT NOT NULL,           -- RFC 3339, UTC
	outcome     TEXT NOT NULL,           -- added, updated, spec-changed
	figures     TEXT NOT NULL,           -- the part as imported, snapshot JSON
	changes     TEXT NOT NULL DEFAULT '' -- newline-separated "field old -> new"
);
CREATE INDEX part_history_part ON part_history(part, kind);
`,
	// 2: a figure nobody gave is NULL (unknown), not 0. The part tables are
	// rebuilt with nullable figure columns (SQLite cannot drop NOT NULL in
	// place); zeros that schema 1 used for "unknown" become NULL; amplifiers
	// get rail_to_rail. Child tables are rebuilt first so dropping a parent
	// cascades nothing, and its price-break trigger is dropped so no price
	// is lost.
	`
CREATE TABLE resistor_series_new (
	id            INTEGER PRIMARY KEY,
	part          TEXT NOT NULL UNIQUE,
	maker         TEXT NOT NULL,
	line          TEXT NOT NULL DEFAULT '',
	e_series      TEXT NOT NULL,
	min_ohm       REAL NOT NULL,         -- ohm
	max_ohm       REAL NOT NULL,         -- ohm
	technology    TEXT NOT NULL,         -- '' = unknown
	package       TEXT NOT NULL,         -- '' = unknown
	tolerance     REAL NOT NULL,         -- fraction
	tcr_ppm       REAL,                  -- ±ppm/K (NULL = unknown, as below)
	power_w       REAL,                  -- W
	max_voltage_v REAL,                  -- V, limiting element voltage
	thermal_resistance_k_per_w REAL,     -- K/W to ambient
	load_life     REAL,                  -- fraction over rated life
	min_order     INTEGER NOT NULL DEFAULT 0,
	stock         INTEGER NOT NULL DEFAULT -1,
	source        TEXT NOT NULL DEFAULT '',
	imported_at   TEXT NOT NULL DEFAULT ''
);
INSERT INTO resistor_series_new SELECT id, part, maker, line, e_series, min_ohm, max_ohm, technology, package,
	tolerance, tcr_ppm, power_w, NULLIF(max_voltage_v, 0), NULLIF(thermal_resistance_k_per_w, 0), NULLIF(load_life, 0),
	min_order, stock, source, imported_at FROM resistor_series;
DROP TRIGGER resistor_series_breaks;
DROP TABLE resistor_series;
ALTER TABLE resistor_series_new RENAME TO resistor_series;
CREATE TRIGGER resistor_series_breaks AFTER DELETE ON resistor_series
	BEGIN DELETE FROM price_breaks WHERE kind = 'series' AND part_id = OLD.id; END;

CREATE TABLE resistors_new (
	id            INTEGER PRIMARY KEY,
	part          TEXT NOT NULL UNIQUE,
	maker         TEXT NOT NULL,
	line          TEXT NOT NULL DEFAULT '',
	value_ohm     REAL NOT NULL,         -- ohm
	series_part   TEXT NOT NULL DEFAULT '',
	technology    TEXT NOT NULL,
	package       TEXT NOT NULL,
	tolerance     REAL NOT NULL,         -- fraction
	tcr_ppm       REAL,                  -- ±ppm/K (NULL = unknown, as below)
	power_w       REAL,                  -- W
	max_voltage_v REAL,                  -- V
	thermal_resistance_k_per_w REAL,     -- K/W
	load_life     REAL,                  -- fraction
	min_order     INTEGER NOT NULL DEFAULT 0,
	stock         INTEGER NOT NULL DEFAULT -1,
	source        TEXT NOT NULL DEFAULT '',
	imported_at   TEXT NOT NULL DEFAULT ''
);
INSERT INTO resistors_new SELECT id, part, maker, line, value_ohm, series_part, technology, package,
	tolerance, tcr_ppm, power_w, NULLIF(max_voltage_v, 0), NULLIF(thermal_resistance_k_per_w, 0), NULLIF(load_life, 0),
	min_order, stock, source, imported_at FROM resistors;
DROP TRIGGER resistors_breaks;
DROP TABLE resistors;
ALTER TABLE resistors_new RENAME TO resistors;
CREATE INDEX resistors_value ON resistors(value_ohm);
CREATE TRIGGER resistors_breaks AFTER DELETE ON resistors
	BEGIN DELETE FROM price_breaks WHERE kind = 'resistor' AND part_id = OLD.id; END;

CREATE TABLE networks_new (
	id               INTEGER PRIMARY KEY,
	part             TEXT NOT NULL UNIQUE,
	maker            TEXT NOT NULL,
	technology       TEXT NOT NULL,
	package          TEXT NOT NULL,
	tolerance        REAL NOT NULL,      -- absolute, fraction
	ratio_tolerance  REAL NOT NULL,      -- fraction
	tcr_ppm          REAL,               -- absolute, ±ppm/K (NULL = unknown, as below)
	tcr_tracking_ppm REAL,               -- ratio drift, ±ppm/K
	power_w          REAL,               -- W per element
	max_voltage_v    REAL,               -- V per element
	min_order        INTEGER NOT NULL DEFAULT 0,
	stock            INTEGER NOT NULL DEFAULT -1,
	source           TEXT NOT NULL DEFAULT '',
	imported_at      TEXT NOT NULL DEFAULT ''
);
INSERT INTO networks_new SELECT id, part, maker, technology, package, tolerance, ratio_tolerance, tcr_ppm,
	tcr_tracking_ppm, power_w, NULLIF(max_voltage_v, 0), min_order, stock, source, imported_at FROM networks;
CREATE TABLE network_elements_new (
	network_id INTEGER NOT NULL REFERENCES networks_new(id) ON DELETE CASCADE,
	position   INTEGER NOT NULL,
	value_ohm  REAL NOT NULL,
	PRIMARY KEY (network_id, position)
) WITHOUT ROWID;
INSERT INTO network_elements_new SELECT network_id, position, value_ohm FROM network_elements;
DROP TABLE network_elements;
DROP TRIGGER networks_breaks;
DROP TABLE networks;
ALTER TABLE networks_new RENAME TO networks;
ALTER TABLE network_elements_new RENAME TO network_elements;
CREATE TRIGGER networks_breaks AFTER DELETE ON networks
	BEGIN DELETE FROM price_breaks WHERE kind = 'network' AND part_id = OLD.id; END;

-- Schema 1 imports stored an op-amp figure nobody gave as 0; no op-amp has
-- zero bias current, noise or drift, so those zeros become unknown, and the
-- matched-only figures of an op-amp do not apply to it.
CREATE TABLE amplifiers_new (
	id                INTEGER PRIMARY KEY,
	part              TEXT NOT NULL UNIQUE,
	maker             TEXT NOT NULL,
	type              TEXT NOT NULL CHECK (type IN ('opamp', 'matched')),
	channels          INTEGER NOT NULL,
	package           TEXT NOT NULL,     -- '' = unknown
	supply_min_v      REAL NOT NULL,     -- V, total span V+ - V-
	supply_max_v      REAL NOT NULL,     -- V, total span
	cm_neg_v          REAL,              -- V above V- (NULL = unknown, as below)
	cm_pos_v          REAL,              -- V below V+ (negative = above V+)
	swing_neg_v       REAL,              -- V above V-
	swing_pos_v       REAL,              -- V below V+
	vos_v             REAL,              -- V, max input offset
	vos_drift_v_per_k REAL,              -- V/K
	ib_a              REAL,              -- A
	ios_a             REAL,              -- A
	aol_v_per_v       REAL,              -- V/V, min
	cmrr_db           REAL,              -- dB, min
	gbw_hz            REAL,              -- Hz
	slew_v_per_s      REAL,              -- V/s
	noise_v_per_rthz  REAL,              -- V/√Hz
	noise_a_per_rthz  REAL,              -- A/√Hz
	iq_a              REAL,              -- A per channel
	typical_only      TEXT NOT NULL DEFAULT '',
	rail_to_rail      TEXT NOT NULL DEFAULT '' CHECK (rail_to_rail IN ('', 'in', 'out', 'in-out')),
	gain_error_max    REAL,              -- fraction (matched only)
	gain_drift_ppm    REAL,              -- ±ppm/K (matched only)
	in_neg_v          REAL,              -- V above V- (matched only)
	in_pos_v          REAL,              -- V below V+ (matched only)
	internal_ohm      REAL,              -- ohm (matched only)
	min_order         INTEGER NOT NULL DEFAULT 0,
	stock             INTEGER NOT NULL DEFAULT -1,
	source            TEXT NOT NULL DEFAULT '',
	imported_at       TEXT NOT NULL DEFAULT ''
);
INSERT INTO amplifiers_new SELECT id, part, maker, type, channels, package, supply_min_v, supply_max_v,
	cm_neg_v, cm_pos_v, swing_neg_v, swing_pos_v, vos_v,
	CASE WHEN type = 'opamp' THEN NULLIF(vos_drift_v_per_k, 0) ELSE vos_drift_v_per_k END,
	CASE WHEN type = 'opamp' THEN NULLIF(ib_a, 0) ELSE ib_a END,
	CASE WHEN type = 'opamp' THEN NULLIF(ios_a, 0) ELSE ios_a END,
	aol_v_per_v, cmrr_db, gbw_hz, slew_v_per_s,
	CASE WHEN type = 'opamp' THEN NULLIF(noise_v_per_rthz, 0) ELSE noise_v_per_rthz END,
	CASE WHEN type = 'opamp' THEN NULLIF(noise_a_per_rthz, 0) ELSE noise_a_per_rthz END,
	NULLIF(iq_a, 0), typical_only, '',
	CASE WHEN type = 'opamp' THEN NULL ELSE gain_error_max END,
	CASE WHEN type = 'opamp' THEN NULL ELSE NULLIF(gain_drift_ppm, 0) END,
	CASE WHEN type = 'opamp' THEN NULL ELSE in_neg_v END,
	CASE WHEN type = 'opamp' THEN NULL ELSE in_pos_v END,
	CASE WHEN type = 'opamp' THEN NULL ELSE NULLIF(internal_ohm, 0) END,
	min_order, stock, source, imported_at FROM amplifiers;
CREATE TABLE amplifier_gains_new (
	amplifier_id INTEGER NOT NULL REFERENCES amplifiers_new(id) ON DELETE CASCADE,
	position     INTEGER NOT NULL,
	gain         REAL NOT NULL,          -- V/V
	PRIMARY KEY (amplifier_id, position)
) WITHOUT ROWID;
INSERT INTO amplifier_gains_new SELECT amplifier_id, position, gain FROM amplifier_gains;
DROP TABLE amplifier_gains;
DROP TRIGGER amplifiers_breaks;
DROP TABLE amplifiers;
ALTER TABLE amplifiers_new RENAME TO amplifiers;
ALTER TABLE amplifier_gains_new RENAME TO amplifier_gains;
CREATE TRIGGER amplifiers_breaks AFTER DELETE ON amplifiers
	BEGIN DELETE FROM price_breaks WHERE kind = 'amplifier' AND part_id = OLD.id; END;
`,
	// 3: voltage references as a kind of their own, and the matched
	// resistors inside an amplifier (its network). price_breaks is rebuilt
	// so its kind may be 'reference'; the triggers that clear it are
	// dropped first and made again, so no price is lost.
	`
CREATE TABLE voltage_references (
	id               INTEGER PRIMARY KEY,
	part             TEXT NOT NULL UNIQUE,
	maker            TEXT NOT NULL,
	topology         TEXT NOT NULL DEFAULT '' CHECK (topology IN ('', 'series', 'shunt')),
	package          TEXT NOT NULL,      -- '' = unknown
	output_v         REAL NOT NULL,      -- V, nominal
	tolerance        REAL NOT NULL,      -- fraction, initial at 25 °C
	drift_ppm        REAL,               -- ppm/K, box method over [temp_min_c, temp_max_c] (NULL = unknown, as below)
	temp_min_c       REAL,               -- °C
	temp_max_c       REAL,               -- °C
	noise_pp_v       REAL,               -- V peak to peak, 0.1 Hz to 10 Hz
	noise_v_per_rthz REAL,               -- V/√Hz, wideband
	supply_min_v     REAL,               -- V, input
	supply_max_v     REAL,               -- V, input
	dropout_v        REAL,               -- V
	load_source_a    REAL,               -- A
	load_sink_a      REAL,               -- A
	output_ohm       REAL,               -- ohm (load regulation, V/A)
	long_term_ppm    REAL,               -- ppm over the first 1000 h
	iq_a             REAL,               -- A
	min_order        INTEGER NOT NULL DEFAULT 0,
	stock            INTEGER NOT NULL DEFAULT -1,
	source           TEXT NOT NULL DEFAULT '',
	imported_at      TEXT NOT NULL DEFAULT ''
);

-- The matched resistors inside an amplifier: one row per amplifier whose
-- maker publishes them; pins are comma-separated pin names.
CREATE TABLE amplifier_networks (
	amplifier_id    INTEGER PRIMARY KEY REFERENCES amplifiers(id) ON DELETE CASCADE,
	pins            TEXT NOT NULL,
	opamp_inv       TEXT NOT NULL,       -- node of the internal op-amp's inverting input
	opamp_noninv    TEXT NOT NULL,       -- node of its non-inverting input
	opamp_out       TEXT NOT NULL,       -- node of its output
	tolerance       REAL,                -- fraction, absolute (NULL = unknown, as below)
	ratio_tolerance REAL,                -- fraction, any element to any other
	ratio_drift_ppm REAL                 -- ±ppm/K, ratio tracking
);
CREATE TABLE amplifier_network_elements (
	amplifier_id INTEGER NOT NULL REFERENCES amplifier_networks(amplifier_id) ON DELETE CASCADE,
	position     INTEGER NOT NULL,       -- from 0
	name         TEXT NOT NULL,          -- R1, R2, ... as the datasheet draws it
	ohms         REAL NOT NULL,          -- ohm, nominal
	node_a       TEXT NOT NULL,
	node_b       TEXT NOT NULL,
	PRIMARY KEY (amplifier_id, position)
) WITHOUT ROWID;

DROP TRIGGER resistor_series_breaks;
DROP TRIGGER resistors_breaks;
DROP TRIGGER networks_breaks;
DROP TRIGGER amplifiers_breaks;
CREATE TABLE price_breaks_new (
	kind       TEXT NOT NULL CHECK (kind IN ('series', 'resistor', 'network', 'amplifier', 'reference')),
	part_id    INTEGER NOT NULL,
	min_qty    INTEGER NOT NULL CHECK (min_qty >= 1), -- pieces
	unit_price REAL NOT NULL CHECK (unit_price >= 0), -- currency units per piece
	currency   TEXT NOT NULL,            -- ISO 4217 code
	PRIMARY KEY (kind, part_id, min_qty)
) WITHOUT ROWID;
INSERT INTO price_breaks_new SELECT kind, part_id, min_qty, unit_price, currency FROM price_breaks;
DROP TABLE price_breaks;
ALTER TABLE price_breaks_new RENAME TO price_breaks;
CREATE TRIGGER resistor_series_breaks AFTER DELETE ON resistor_series
	BEGIN DELETE FROM price_breaks WHERE kind = 'series' AND part_id = OLD.id; END;
CREATE TRIGGER resistors_breaks AFTER DELETE ON resistors
	BEGIN DELETE FROM price_breaks WHERE kind = 'resistor' AND part_id = OLD.id; END;
CREATE TRIGGER networks_breaks AFTER DELETE ON networks
	BEGIN DELETE FROM price_breaks WHERE kind = 'network' AND part_id = OLD.id; END;
CREATE TRIGGER amplifiers_breaks AFTER DELETE ON amplifiers
	BEGIN DELETE FROM price_breaks WHERE kind = 'amplifier' AND part_id = OLD.id; END;
CREATE TRIGGER voltage_references_breaks AFTER DELETE ON voltage_references
	BEGIN DELETE FROM price_breaks WHERE kind = 'reference' AND part_id = OLD.id; END;
`,
}

// schemaUnknownNull is the first schema version that stores an unknown
// figure as NULL (JSON: absent or null); before it, some figures wrote 0
// for unknown (legacyZeroUnknown).
const schemaUnknownNull = 2

// SchemaVersionCurrent is the schema version this code writes and knows.
var SchemaVersionCurrent = len(migrations)
