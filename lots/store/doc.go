// Package store keeps the history of recorded specimens, lots, verdicts and
// the specification limits used, in an embedded SQLite database file
// (modernc.org/sqlite, pure Go) or on a shared PostgreSQL server
// (github.com/jackc/pgx/v5). Both backends share one schema, built by
// versioned migrations (ordered SQL steps valid on both) that are recorded
// in the schema_version table.
//
// Every import is one transaction: all of a file is written or nothing is.
// Imports are idempotent: a file whose SHA-256 was recorded before changes
// nothing, and a specimen already stored with identical values is skipped.
// A specimen id stored with different values is a conflict: nothing is
// written and the conflict is reported with both values.
//
// Concurrent writers are safe: SQLite runs in WAL mode with a busy timeout
// and starts every write transaction with BEGIN IMMEDIATE; PostgreSQL runs
// them SERIALIZABLE and retries on serialization failures, deadlocks and
// unique-violation races.
package store
