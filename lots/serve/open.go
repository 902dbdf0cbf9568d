package serve

import (
	"context"

	"lotproof/lots/store"
)

// DB is a lot-history database opened read-only (store.OpenView).
type DB = store.Store

// MaxConns bounds the database connections the server opens.
const MaxConns = store.ServeConns

// OpenReadOnly opens the database at loc (a SQLite file path, optionally
// prefixed sqlite: or file:, or a postgres:// URL) for reading only: it
// never writes, and a database whose schema is older or newer than this
// build's is refused (store.OpenView).
func OpenReadOnly(ctx context.Context, loc string) (*DB, error) {
	return store.OpenView(ctx, loc, "serve")
}
