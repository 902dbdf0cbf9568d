package serve

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"net/url"
	"os"
	"strconv"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/stdlib"

	"lotproof/lots/store"
)

// DB is a lot-history database opened read-only.
//
// This is a local stand-in for read-only opening in lots/store: SQLite is
// opened through a file: URI with mode=ro (a missing file is refused, never
// created) and query_only; PostgreSQL sessions start with
// default_transaction_read_only=on, so the server itself refuses any write.
// No migration is run: a database whose schema is older or newer than this
// build's is refused with a message.
type DB struct {
	db      *sql.DB
	backend store.Backend
	where   string
}

// MaxConns bounds the database connections the server opens.
const MaxConns = 4

// OpenReadOnly opens the database at loc (a SQLite file path, optionally
// prefixed sqlite: or file:, or a postgres:// URL) for reading only.
func OpenReadOnly(ctx context.Context, loc string) (*DB, error) {
	loc = strings.TrimSpace(loc)
	if loc == "" {
		return nil, errors.New("serve: empty database location")
	}
	d := &DB{}
	if store.IsPostgres(loc) {
		cfg, err := pgx.ParseConfig(loc)
		if err != nil {
			return nil, fmt.Errorf("serve: database URL: %w", err)
		}
		cfg.RuntimeParams["default_transaction_read_only"] = "on"
		cfg.RuntimeParams["application_name"] = "lotproof serve"
		d.db = stdlib.OpenDB(*cfg)
		d.backend = store.Postgres
		d.where = redact(loc)
	} else {
		path := strings.TrimPrefix(strings.TrimPrefix(loc, "sqlite:"), "file:")
		if strings.ContainsAny(path, "?#") {
			return nil, fmt.Errorf("serve: SQLite file name %q contains ? or #; rename the file", path)
		}
		fi, err := os.Stat(path)
		if err != nil {
			return nil, fmt.Errorf("serve: database file %s: %w (lotproof serve never creates one; record results first)", path, err)
		}
		if fi.IsDir() {
			return nil, fmt.Errorf("serve: %s is a folder, not a database file", path)
		}
		u := url.URL{Scheme: "file", OmitHost: true, Path: path}
		dsn := u.String() + "?mode=ro&_pragma=query_only(1)&_pragma=busy_timeout(5000)&_pragma=case_sensitive_like(1)"
		d.db, err = sql.Open("sqlite", dsn)
		if err != nil {
			return nil, fmt.Errorf("serve: %w", err)
		}
		d.backend = store.SQLite
		d.where = path
	}
	d.db.SetMaxOpenConns(MaxConns)
	d.db.SetMaxIdleConns(MaxConns)
	if err := d.db.PingContext(ctx); err != nil {
		d.db.Close()
		return nil, fmt.Errorf("serve: cannot reach %s: %w", d.where, err)
	}
	var v sql.NullInt64
	if err := d.db.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_version`).Scan(&v); err != nil {
		d.db.Close()
		return nil, fmt.Errorf("serve: %s holds no lot history (%v); record results into it first", d.where, err)
	}
	if int(v.Int64) != store.Latest() {
		d.db.Close()
		return nil, fmt.Errorf("serve: %s has schema version %d, this lotproof reads version %d; open it once with lotproof record of the same version, or use a matching lotproof",
			d.where, v.Int64, store.Latest())
	}
	return d, nil
}

// Close closes the database.
func (d *DB) Close() error { return d.db.Close() }

// Where is the file or URL (without a password).
func (d *DB) Where() string { return d.where }

// Backend tells which kind of database this is.
func (d *DB) Backend() store.Backend { return d.backend }

// q rewrites ? placeholders into $1, $2, ... for PostgreSQL (the SQL of
// this package never has a ? inside a string literal).
func (d *DB) q(query string) string {
	if d.backend != store.Postgres {
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

// redact removes a password from a connection URL.
func redact(loc string) string {
	u, err := url.Parse(loc)
	if err != nil || u.User == nil {
		return loc
	}
	if _, ok := u.User.Password(); ok {
		u.User = url.UserPassword(u.User.Username(), "***")
	}
	return u.String()
}
