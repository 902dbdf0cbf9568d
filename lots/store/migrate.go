package store

import (
	"context"
	"database/sql"
	"fmt"
	"slices"
	"strings"
)

// A migration is one ordered step of the schema: SQL statements valid on
// both SQLite and PostgreSQL. Version n's statements take a database at
// version n-1 to version n. Never change a released step; add a new one.
type migration struct {
	version int
	about   string
	sql     []string
	pg      []string // then, on PostgreSQL only (features SQLite lacks)
	lite    []string // then, on SQLite only
}

// Types used so that one statement suits both backends: TEXT, BIGINT and
// DOUBLE PRECISION (REAL affinity in SQLite, float8 in PostgreSQL, both
// IEEE 754 binary64, so values read back bit for bit).
var migrations = []migration{
	{1, "imports, lots, specimens, measurements, properties", []string{
		`CREATE TABLE imports (
			digest TEXT NOT NULL PRIMARY KEY,
			source TEXT NOT NULL,
			imported_at TEXT NOT NULL,
			user_name TEXT NOT NULL,
			specimens_new BIGINT NOT NULL,
			specimens_same BIGINT NOT NULL
		)`,
		`CREATE TABLE properties (
			property TEXT NOT NULL PRIMARY KEY,
			quantity TEXT NOT NULL,
			unit TEXT NOT NULL
		)`,
		`CREATE TABLE lots (
			lot TEXT NOT NULL PRIMARY KEY,
			supplier TEXT NOT NULL,
			material TEXT NOT NULL,
			import_digest TEXT NOT NULL REFERENCES imports(digest)
		)`,
		`CREATE TABLE specimens (
			specimen TEXT NOT NULL PRIMARY KEY,
			lot TEXT NOT NULL REFERENCES lots(lot),
			heat TEXT NOT NULL,
			tested TEXT NOT NULL,
			test_condition TEXT NOT NULL,
			import_digest TEXT NOT NULL REFERENCES imports(digest)
		)`,
		`CREATE TABLE measurements (
			specimen TEXT NOT NULL REFERENCES specimens(specimen),
			property TEXT NOT NULL REFERENCES properties(property),
			value DOUBLE PRECISION NOT NULL,
			PRIMARY KEY (specimen, property)
		)`,
	}, nil, nil},
	{2, "verdicts and specification limits per import; lot index on specimens", []string{
		`CREATE TABLE verdicts (
			import_digest TEXT NOT NULL REFERENCES imports(digest),
			lot TEXT NOT NULL REFERENCES lots(lot),
			spec TEXT NOT NULL,
			verdict TEXT NOT NULL,
			PRIMARY KEY (import_digest, lot, spec)
		)`,
		`CREATE TABLE spec_limits (
			import_digest TEXT NOT NULL REFERENCES imports(digest),
			spec TEXT NOT NULL,
			material TEXT NOT NULL,
			property TEXT NOT NULL,
			minimum DOUBLE PRECISION,
			maximum DOUBLE PRECISION,
			unit TEXT NOT NULL,
			PRIMARY KEY (import_digest, spec, material, property)
		)`,
		`CREATE INDEX specimens_lot ON specimens (lot)`,
		`ALTER TABLE imports ADD COLUMN tool_version TEXT NOT NULL DEFAULT ''`,
	}, nil, nil},
	{3, "the unit each property was entered in, for display (moduli in GPa stay in GPa)", []string{
		`ALTER TABLE properties ADD COLUMN entered_unit TEXT NOT NULL DEFAULT ''`,
	}, nil, nil},
	// A specimen's lot never changes once recorded (a different lot is a
	// conflict), so the copy on its measurements stays right; it lets the
	// per-lot values be grouped without joining a million specimens.
	//
	// On PostgreSQL a covering index in (lot, property, specimen id
	// bytewise) order lets LotSamples read the values grouped and in order
	// from the index alone, with no sort of every measurement (SQLite's
	// LotSamples reads through the specimens' lot index instead).
	{4, "each measurement carries its specimen's lot", []string{
		`ALTER TABLE measurements ADD COLUMN lot TEXT NOT NULL DEFAULT ''`,
		`UPDATE measurements SET lot = (SELECT s.lot FROM specimens s WHERE s.specimen = measurements.specimen)`,
	}, []string{
		`CREATE INDEX measurements_lot ON measurements (lot, property, specimen COLLATE "C") INCLUDE (value)`,
	}, nil},
	// SQLite's LotSamples read every measurement through the specimens'
	// lot index and two row lookups each; with these covering indexes it
	// reads the values, grouped by lot, and the test dates from the
	// indexes alone (about half the time of a trend; the database grows by
	// about 40 %). PostgreSQL has its own index since version 4.
	{5, "SQLite: the per-lot values and test dates read from covering indexes", nil, nil, []string{
		`CREATE INDEX measurements_lot_values ON measurements (lot, property, specimen, value)`,
		`CREATE INDEX specimens_lot_tested ON specimens (lot, tested)`,
		`DROP INDEX specimens_lot`,
	}},
}

// Latest is the schema version this build writes.
func Latest() int { return migrations[len(migrations)-1].version }

// SchemaVersion reads the database's schema version (0 when empty).
func (s *Store) SchemaVersion(ctx context.Context) (int, error) {
	var v sql.NullInt64
	err := s.db.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_version`).Scan(&v)
	if err != nil {
		return 0, fmt.Errorf("store: reading the schema version: %w", err)
	}
	return int(v.Int64), nil
}

// migrate brings the schema to version target in one transaction, so that
// concurrent processes opening a fresh database do not race (BEGIN
// IMMEDIATE in SQLite, an advisory transaction lock in PostgreSQL).
func (s *Store) migrate(ctx context.Context, target int) error {
	// READ COMMITTED in PostgreSQL: after waiting for the advisory lock,
	// each statement must see what the process that held it committed.
	err := s.inTxIso(ctx, sql.LevelReadCommitted, func(tx *sql.Tx) error {
		if s.backend == Postgres {
			if _, err := tx.ExecContext(ctx, `SELECT pg_advisory_xact_lock(7345120261202)`); err != nil {
				return err
			}
		}
		if _, err := tx.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_version (
			version BIGINT NOT NULL PRIMARY KEY,
			about TEXT NOT NULL
		)`); err != nil {
			return err
		}
		var cur int
		var v sql.NullInt64
		if err := tx.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_version`).Scan(&v); err != nil {
			return err
		}
		cur = int(v.Int64)
		if cur > Latest() {
			return fmt.Errorf("store: %s has schema version %d, newer than this lotproof understands (%d); use a newer lotproof", s.where, cur, Latest())
		}
		for _, m := range migrations {
			if m.version <= cur || m.version > target {
				continue
			}
			stmts := m.sql
			if s.backend == Postgres {
				stmts = append(slices.Clip(stmts), m.pg...)
			} else {
				stmts = append(slices.Clip(stmts), m.lite...)
			}
			for _, stmt := range stmts {
				if _, err := tx.ExecContext(ctx, stmt); err != nil {
					return fmt.Errorf("store: migration %d (%s): %w\n%s", m.version, m.about, err, strings.TrimSpace(stmt))
				}
			}
			if _, err := tx.ExecContext(ctx, s.q(`INSERT INTO schema_version (version, about) VALUES (?, ?)`), m.version, m.about); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("store: bringing %s up to date: %w", s.where, err)
	}
	return nil
}
