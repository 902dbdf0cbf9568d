package store

import (
	"context"
	"database/sql"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// OpenReadOnly reads what Open wrote, refuses every write, refuses a
// database that does not exist (creating nothing) or has no lotproof
// schema, and brings an older schema up to date first.
func TestOpenReadOnly(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			url := b.fresh(t)
			// A database without lotproof's schema (an empty PostgreSQL
			// database, a missing SQLite file) is refused and left as it was.
			_, err := OpenReadOnly(ctx, url)
			if err == nil {
				t.Fatal("opened a database without a lotproof schema")
			}
			if IsPostgres(url) {
				if !strings.Contains(err.Error(), "not a lotproof history database") {
					t.Fatalf("empty database: %v", err)
				}
				raw, _ := sql.Open("pgx", url)
				var n int
				raw.QueryRow(`SELECT count(*) FROM information_schema.tables WHERE table_schema = 'public'`).Scan(&n)
				raw.Close()
				if n != 0 {
					t.Fatalf("%d tables created", n)
				}
			} else {
				if !strings.Contains(err.Error(), "there is no database") {
					t.Fatalf("missing file: %v", err)
				}
				if ents, _ := os.ReadDir(filepath.Dir(url)); len(ents) != 0 {
					t.Fatalf("created %v", ents)
				}
			}
			w := open(t, url)
			d := dataset(t, "a.csv", synth("RO", 2, 3, 7))
			if _, err := w.Record(ctx, d, nil, nil, Meta{Time: t0, User: "u"}); err != nil {
				t.Fatal(err)
			}
			w.Close()
			var before []byte
			if !IsPostgres(url) {
				before, _ = os.ReadFile(url)
			}
			r, err := OpenReadOnly(ctx, url)
			if err != nil {
				t.Fatal(err)
			}
			lv, err := r.LotData(ctx, Filter{Property: "tensile"})
			if err != nil || len(lv) != 2 {
				t.Fatalf("read %d lots (%v)", len(lv), err)
			}
			if _, err := r.db.ExecContext(ctx, `DELETE FROM measurements`); err == nil {
				t.Fatal("a read-only store deleted rows")
			}
			if _, err := r.Record(ctx, dataset(t, "b.csv", synth("RO2", 1, 2, 8)), nil, nil, Meta{Time: t0, User: "u"}); err == nil {
				t.Fatal("a read-only store recorded a file")
			}
			r.Close()
			if !IsPostgres(url) {
				after, _ := os.ReadFile(url)
				if string(after) != string(before) {
					t.Fatal("the database file changed")
				}
				ents, _ := os.ReadDir(filepath.Dir(url))
				if len(ents) != 1 {
					t.Fatalf("files beside the database after reading: %v", ents)
				}
			}
			again := open(t, url)
			if c := counts(t, again); c.Specimens != 6 {
				t.Fatalf("%d specimens after the refused writes, want 6", c.Specimens)
			}
		})
	}
}

// A database at an older schema version is brought up to date, then read.
func TestOpenReadOnlyMigratesOlderSchema(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			url := b.fresh(t)
			writeV1(t, url)
			r, err := OpenReadOnly(ctx, url)
			if err != nil {
				t.Fatal(err)
			}
			defer r.Close()
			if v, err := r.SchemaVersion(ctx); err != nil || v != Latest() {
				t.Fatalf("version %d (%v), want %d", v, err, Latest())
			}
			if lv, err := r.LotData(ctx, Filter{}); err != nil || len(lv) != 1 {
				t.Fatalf("old data: %+v (%v)", lv, err)
			}
		})
	}
}

// A SQLite file that cannot be written (permissions, or an immutable file
// when the test runs as root) is read: trend on it used to fail with
// "attempt to write a readonly database".
func TestOpenReadOnlyWriteProtectedFile(t *testing.T) {
	ctx := context.Background()
	url := filepath.Join(t.TempDir(), "ro.db")
	w := open(t, url)
	if _, err := w.Record(ctx, dataset(t, "a.csv", synth("WP", 1, 3, 9)), nil, nil, Meta{Time: t0, User: "u"}); err != nil {
		t.Fatal(err)
	}
	w.Close()
	if err := os.Chmod(url, 0o444); err != nil {
		t.Fatal(err)
	}
	if f, err := os.OpenFile(url, os.O_RDWR, 0); err == nil {
		f.Close()
		// Root ignores permissions: try the immutable attribute.
		if out, err := exec.Command("chattr", "+i", url).CombinedOutput(); err != nil {
			t.Skipf("cannot write-protect the file as this user (chattr: %v %s)", err, out)
		}
		t.Cleanup(func() { exec.Command("chattr", "-i", url).Run() })
	}
	r, err := OpenReadOnly(ctx, url)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	if lv, err := r.LotData(ctx, Filter{Property: "tensile"}); err != nil || len(lv) != 1 {
		t.Fatalf("read %d lots (%v)", len(lv), err)
	}
}

// OpenView (lotproof serve's opener) refuses every write on both backends
// and leaves the history as it was.
func TestOpenView(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			url := b.fresh(t)
			w := open(t, url)
			if _, err := w.Record(ctx, dataset(t, "a.csv", synth("VW", 4, 3, 7)), nil, nil, Meta{Time: t0, User: "u"}); err != nil {
				t.Fatal(err)
			}
			w.Close()
			v, err := OpenView(ctx, url, "serve")
			if err != nil {
				t.Fatal(err)
			}
			defer v.Close()
			for _, q := range []string{`DELETE FROM lots`, `INSERT INTO properties (property, quantity, unit) VALUES ('x', 'stress', 'MPa')`, `CREATE TABLE x (a TEXT)`} {
				if _, err := v.db.Exec(q); err == nil {
					t.Errorf("%s: accepted on the read-only connection", q)
				}
			}
			var n int
			if err := v.db.QueryRow(`SELECT COUNT(*) FROM lots`).Scan(&n); err != nil || n != 4 {
				t.Errorf("lots after refused writes: %d, %v", n, err)
			}
		})
	}
}
