package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
	"github.com/jackc/pgx/v5/stdlib" // also registers the driver "pgx"
	_ "modernc.org/sqlite"           // driver "sqlite"
)

// DefaultPath is the SQLite database file used when neither --db nor
// $LOTPROOF_DB names one: lotproof.db in the current folder.
const DefaultPath = "lotproof.db"

// EnvVar names the environment variable that overrides DefaultPath.
const EnvVar = "LOTPROOF_DB"

// Backend is the kind of database behind a Store.
type Backend string

// The two backends.
const (
	SQLite   Backend = "sqlite"
	Postgres Backend = "postgres"
)

// Store is an open lot-history database.
type Store struct {
	db      *sql.DB
	backend Backend
	where   string // file path or URL without password, for messages
}

// ResolveURL picks the database: the given url, else $LOTPROOF_DB, else
// DefaultPath.
func ResolveURL(url string) string {
	if strings.TrimSpace(url) != "" {
		return url
	}
	if v := strings.TrimSpace(os.Getenv(EnvVar)); v != "" {
		return v
	}
	return DefaultPath
}

// IsPostgres reports whether url names a PostgreSQL server.
func IsPostgres(url string) bool {
	return strings.HasPrefix(url, "postgres://") || strings.HasPrefix(url, "postgresql://")
}

// Open opens (creating it if needed) the database at url and brings its
// schema up to date. A url starting with postgres:// or postgresql:// is a
// PostgreSQL connection URL; anything else is a SQLite file path (an
// optional "sqlite:" or "file:" prefix is removed).
func Open(ctx context.Context, url string) (*Store, error) {
	backend, loc, err := location("store", url)
	if err != nil {
		return nil, err
	}
	var s *Store
	if backend == Postgres {
		if s, err = openPostgres("store", loc, nil, 4); err != nil {
			return nil, err
		}
	} else {
		path := loc
		if dir := filepath.Dir(path); dir != "" {
			if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
				return nil, fmt.Errorf("store: folder %q of the database file does not exist", dir)
			}
		}
		dsn := path + "?_pragma=busy_timeout(20000)&_pragma=journal_mode(WAL)&_pragma=foreign_keys(1)&_pragma=synchronous(NORMAL)&_txlock=immediate"
		// One connection: SQLite allows one writer at a time anyway, and
		// a single connection keeps this process from locking itself out.
		if s, err = openSQLite(path, dsn, 1); err != nil {
			return nil, err
		}
	}
	// The first connection sets SQLite's WAL mode, which needs a moment
	// of exclusive access when several processes open a new file at once:
	// reach retries while the database is busy.
	if err := s.reach(ctx, "store"); err != nil {
		return nil, err
	}
	if err := s.migrate(ctx, Latest()); err != nil {
		s.db.Close()
		return nil, err
	}
	return s, nil
}

// OpenReadOnly opens an existing database for reading only, for the
// commands that only read the history (trend, report). A SQLite file that
// does not exist is refused (nothing is created) and the file is opened
// without creating it and refuses every write (PRAGMA query_only; mode=ro
// when the file is read-only); a PostgreSQL session gets
// default_transaction_read_only=on, so no statement can write. A database
// whose schema is older than this build's is brought up to date first
// (the only write a reading command makes); a database without lotproof's
// schema is refused.
func OpenReadOnly(ctx context.Context, url string) (*Store, error) {
	backend, loc, err := location("store", url)
	if err != nil {
		return nil, err
	}
	var s *Store
	if backend == Postgres {
		if s, err = openPostgres("store", loc, readOnlySession, 4); err != nil {
			return nil, err
		}
	} else {
		path := loc
		fi, err := os.Stat(path)
		if err != nil {
			return nil, fmt.Errorf("store: there is no database %s (%v); check --db or $%s, or record results first with lotproof record", path, unwrapPath(err), EnvVar)
		}
		if !fi.Mode().IsRegular() {
			return nil, fmt.Errorf("store: %s is not a database file; check --db or $%s", path, EnvVar)
		}
		// mode=rw never creates the file; query_only refuses every write
		// (SQLite, "PRAGMA query_only"), while the connection can still
		// tidy the write-ahead log away when it closes. A file that
		// cannot be opened for writing is opened with mode=ro.
		mode := "rw"
		if f, err := os.OpenFile(path, os.O_RDWR, 0); err != nil {
			mode = "ro"
		} else {
			f.Close()
		}
		dsn := fileURI(path) + "?mode=" + mode + "&_pragma=query_only(1)&_pragma=busy_timeout(20000)&_pragma=foreign_keys(1)"
		if s, err = openSQLite(path, dsn, 1); err != nil {
			return nil, err
		}
	}
	if err := s.reach(ctx, "store"); err != nil {
		return nil, err
	}
	var v sql.NullInt64
	if err := s.db.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_version`).Scan(&v); err != nil || !v.Valid {
		s.db.Close()
		return nil, fmt.Errorf("store: %s is not a lotproof history database (no schema version); check --db or $%s", s.where, EnvVar)
	}
	switch cur := int(v.Int64); {
	case cur > Latest():
		s.db.Close()
		return nil, fmt.Errorf("store: %s has schema version %d, newer than this lotproof understands (%d); use a newer lotproof", s.where, cur, Latest())
	case cur < Latest():
		s.db.Close()
		up, err := Open(ctx, url)
		if err != nil {
			return nil, err
		}
		up.Close()
		return OpenReadOnly(ctx, url)
	}
	return s, nil
}

// readOnlySession makes a PostgreSQL session refuse every write.
var readOnlySession = map[string]string{"default_transaction_read_only": "on"}

// ServeConns bounds the connections of a database opened with OpenView.
const ServeConns = 4

// OpenView opens an existing database for a long-running reader (lotproof
// serve) that must never write, not even to bring an older schema up to
// date. SQLite is opened through a file: URI with mode=ro (a missing file
// is refused, never created), query_only and case-sensitive LIKE;
// PostgreSQL sessions start with default_transaction_read_only=on, so the
// server itself refuses any write. A database whose schema is older or
// newer than this build's is refused with a message. Messages start with
// who (e.g. "serve"), which also names the PostgreSQL application.
func OpenView(ctx context.Context, url, who string) (*Store, error) {
	backend, loc, err := location(who, url)
	if err != nil {
		return nil, err
	}
	var s *Store
	if backend == Postgres {
		params := map[string]string{"application_name": "lotproof " + who}
		for k, v := range readOnlySession {
			params[k] = v
		}
		if s, err = openPostgres(who, loc, params, ServeConns); err != nil {
			return nil, err
		}
	} else {
		path := loc
		fi, err := os.Stat(path)
		if err != nil {
			return nil, fmt.Errorf("%s: database file %s: %w (lotproof %s never creates one; record results first)", who, path, err, who)
		}
		if fi.IsDir() {
			return nil, fmt.Errorf("%s: %s is a folder, not a database file", who, path)
		}
		dsn := fileURI(path) + "?mode=ro&_pragma=query_only(1)&_pragma=busy_timeout(5000)&_pragma=case_sensitive_like(1)"
		if s, err = openSQLite(path, dsn, ServeConns); err != nil {
			return nil, fmt.Errorf("%s: %w", who, errors.Unwrap(err))
		}
	}
	s.db.SetMaxIdleConns(ServeConns)
	if err := s.reach(ctx, who); err != nil {
		return nil, err
	}
	var v sql.NullInt64
	if err := s.db.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_version`).Scan(&v); err != nil {
		s.db.Close()
		return nil, fmt.Errorf("%s: %s holds no lot history (%v); record results into it first", who, s.where, err)
	}
	if int(v.Int64) != Latest() {
		s.db.Close()
		return nil, fmt.Errorf("%s: %s has schema version %d, this lotproof reads version %d; open it once with lotproof record of the same version, or use a matching lotproof",
			who, s.where, v.Int64, Latest())
	}
	return s, nil
}

// location splits a database location into its backend and the
// PostgreSQL URL or SQLite file path (without a "sqlite:" or "file:"
// prefix). Messages start with who.
func location(who, url string) (Backend, string, error) {
	url = strings.TrimSpace(url)
	if url == "" {
		return "", "", fmt.Errorf("%s: empty database location", who)
	}
	if IsPostgres(url) {
		return Postgres, url, nil
	}
	path := strings.TrimPrefix(strings.TrimPrefix(url, "sqlite:"), "file:")
	if strings.ContainsAny(path, "?#") {
		return "", "", fmt.Errorf("%s: SQLite file name %q contains ? or #; rename the file", who, path)
	}
	return SQLite, path, nil
}

// openPostgres prepares (without connecting) a pool of at most conns
// connections to the PostgreSQL server at url, with the run-time
// parameters params set on every session (over any the URL sets).
// Messages start with who.
func openPostgres(who, url string, params map[string]string, conns int) (*Store, error) {
	cfg, err := pgx.ParseConfig(url)
	if err != nil {
		return nil, fmt.Errorf("%s: database URL: %w", who, err)
	}
	for k, v := range params {
		cfg.RuntimeParams[k] = v
	}
	db := stdlib.OpenDB(*cfg)
	db.SetMaxOpenConns(conns)
	return &Store{db: db, backend: Postgres, where: redact(url)}, nil
}

// openSQLite prepares (without connecting) a pool of at most conns
// connections to the SQLite file path, through the driver name dsn.
func openSQLite(path, dsn string, conns int) (*Store, error) {
	db, err := sql.Open("sqlite", dsn)
	if err != nil {
		return nil, fmt.Errorf("store: %w", err)
	}
	db.SetMaxOpenConns(conns)
	return &Store{db: db, backend: SQLite, where: path}, nil
}

// fileURI makes a SQLite URI filename of path: % is the only character of
// a path that needs escaping once ? and # are excluded (SQLite, "URI
// Filenames").
func fileURI(path string) string {
	return "file:" + strings.ReplaceAll(path, "%", "%25")
}

// reach connects, retrying while the database is busy, and closes the
// pool when it cannot connect. Messages start with who.
func (s *Store) reach(ctx context.Context, who string) error {
	var err error
	for attempt := 0; attempt < maxAttempts; attempt++ {
		if err = s.db.PingContext(ctx); err == nil || !retryable(err) {
			break
		}
		time.Sleep(time.Duration(10+rand.IntN(40)) * time.Millisecond)
	}
	if err != nil {
		s.db.Close()
		return fmt.Errorf("%s: cannot reach %s: %w", who, s.where, err)
	}
	return nil
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// redact removes a password from a connection URL.
func redact(url string) string {
	at := strings.LastIndex(url, "@")
	scheme := strings.Index(url, "://")
	if at < 0 || scheme < 0 {
		return url
	}
	cred := url[scheme+3 : at]
	if i := strings.Index(cred, ":"); i >= 0 {
		cred = cred[:i] + ":***"
	}
	return url[:scheme+3] + cred + url[at:]
}

// Close closes the database.
func (s *Store) Close() error { return s.db.Close() }

// Backend tells which kind of database this is.
func (s *Store) Backend() Backend { return s.backend }

// Where is the database file or URL (without a password).
func (s *Store) Where() string { return s.where }

// q rewrites ? placeholders into $1, $2, ... for PostgreSQL. The SQL in
// this package never has a ? inside a string literal.
func (s *Store) q(query string) string {
	if s.backend != Postgres {
		return query
	}
	var b strings.Builder
	n := 0
	for _, r := range query {
		if r == '?' {
			n++
			b.WriteByte('$')
			b.WriteString(strconv.Itoa(n))
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// retryable reports whether a failed transaction may succeed when run
// again: a PostgreSQL serialization failure (40001), deadlock (40P01) or
// unique violation from a concurrent insert (23505), or a SQLite busy or
// locked database.
func retryable(err error) bool {
	var pg *pgconn.PgError
	if errors.As(err, &pg) {
		switch pg.Code {
		case "40001", "40P01", "23505":
			return true
		}
		return false
	}
	m := err.Error()
	return strings.Contains(m, "SQLITE_BUSY") || strings.Contains(m, "database is locked") ||
		strings.Contains(m, "SQLITE_LOCKED")
}

// maxAttempts bounds the retries of one transaction.
const maxAttempts = 30

// inTx runs fn in one write transaction, retrying it from the start when
// it failed for a retryable reason. fn must not keep state between calls.
func (s *Store) inTx(ctx context.Context, fn func(tx *sql.Tx) error) error {
	return s.inTxIso(ctx, sql.LevelSerializable, fn)
}

// inTxIso is inTx with the PostgreSQL isolation level given (SQLite
// transactions are always serializable).
func (s *Store) inTxIso(ctx context.Context, iso sql.IsolationLevel, fn func(tx *sql.Tx) error) error {
	var err error
	for attempt := 0; attempt < maxAttempts; attempt++ {
		if attempt > 0 {
			d := time.Duration(5+rand.IntN(20*attempt)) * time.Millisecond
			select {
			case <-ctx.Done():
				return ctx.Err()
			case <-time.After(d):
			}
		}
		err = s.tryTx(ctx, iso, fn)
		if err == nil || !retryable(err) {
			return err
		}
	}
	return fmt.Errorf("store: gave up after %d attempts: %w", maxAttempts, err)
}

func (s *Store) tryTx(ctx context.Context, iso sql.IsolationLevel, fn func(tx *sql.Tx) error) error {
	var opts *sql.TxOptions
	if s.backend == Postgres {
		opts = &sql.TxOptions{Isolation: iso}
	}
	tx, err := s.db.BeginTx(ctx, opts)
	if err != nil {
		return err
	}
	if err := fn(tx); err != nil {
		tx.Rollback()
		return err
	}
	return tx.Commit()
}
