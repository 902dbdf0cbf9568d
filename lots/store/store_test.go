package store

import (
	"bufio"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"lotproof/lots"
	"lotproof/lots/units"

	"lotproof/lots/store/pgtest"
)

// The suite runs against every backend: SQLite always, PostgreSQL when
// LOTPROOF_TEST_PG names a server (.ci/start-postgres prints the URL).
// Each test gets a fresh database.
type backend struct {
	name  string
	fresh func(t *testing.T) string // URL of a new, empty database
}

func backends(t *testing.T) []backend {
	t.Helper()
	bs := []backend{{"sqlite", func(t *testing.T) string {
		return filepath.Join(t.TempDir(), "lotproof.db")
	}}}
	pg := os.Getenv("LOTPROOF_TEST_PG")
	if pg == "" {
		bs = append(bs, backend{"postgres", func(t *testing.T) string {
			t.Skip("LOTPROOF_TEST_PG is not set: skipping the PostgreSQL half (run .ci/start-postgres and export LOTPROOF_TEST_PG)")
			return ""
		}})
	} else {
		bs = append(bs, backend{"postgres", func(t *testing.T) string { return pgtest.Fresh(t, pg) }})
	}
	return bs
}

func open(t *testing.T, url string) *Store {
	t.Helper()
	s, err := Open(context.Background(), url)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// spec describes a synthetic specimen for the tests.
type specRow struct {
	id, lot, supplier, material, tested string
	tensile, proof                      float64
}

// dataset builds a Dataset as lots.ReadFile would, with a SHA-256 over a
// canonical text of its rows.
func dataset(t testing.TB, source string, rows []specRow) *lots.Dataset {
	t.Helper()
	mpa, err := units.Parse("MPa")
	if err != nil {
		t.Fatal(err)
	}
	d := &lots.Dataset{Source: source, Properties: []lots.Property{{Name: "tensile", Unit: mpa}, {Name: "proof", Unit: mpa}}}
	h := sha256.New()
	for i, r := range rows {
		d.Add(lots.Specimen{ID: r.id, Lot: r.lot, Heat: "H-" + r.lot, Supplier: r.supplier, Material: r.material,
			Tested: r.tested, Condition: "RT", Values: []float64{r.tensile, r.proof}, Line: i + 2})
		fmt.Fprintf(h, "%q,%q,%q,%q,%q,%v,%v\n", r.id, r.lot, r.supplier, r.material, r.tested, r.tensile, r.proof)
	}
	d.Digest = hex.EncodeToString(h.Sum(nil))
	return d
}

// synth makes nLots lots of perLot specimens with a given name prefix.
func synth(prefix string, nLots, perLot int, seed uint64) []specRow {
	rng := rand.New(rand.NewPCG(seed, 1))
	var rows []specRow
	for l := 0; l < nLots; l++ {
		lot := fmt.Sprintf("%s-L%05d", prefix, l)
		for s := 0; s < perLot; s++ {
			rows = append(rows, specRow{id: fmt.Sprintf("%s-%d", lot, s), lot: lot, supplier: prefix + " Mill", material: "bar",
				tested: fmt.Sprintf("2025-%02d-%02d", 1+l%12, 1+s%28), tensile: 1000 + 15*rng.NormFloat64(), proof: 880 + 15*rng.NormFloat64()})
		}
	}
	return rows
}

var t0 = time.Date(2026, 4, 1, 12, 0, 0, 0, time.UTC)

func counts(t *testing.T, s *Store) Counts {
	t.Helper()
	c, err := s.Count(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func TestRecordIdempotentAndConflict(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			s := open(t, b.fresh(t))
			if v, err := s.SchemaVersion(ctx); err != nil || v != Latest() {
				t.Fatalf("schema version %d, %v; want %d", v, err, Latest())
			}
			rows := synth("A", 3, 4, 1)
			rows[5].proof = math.NaN() // a missing value
			d := dataset(t, "a.csv", rows)
			verdicts := []Verdict{{Lot: "A-L00000", Spec: "S-1 rev A", Verdict: "conforming"}, {Lot: "A-L00001", Spec: "S-1 rev A", Verdict: "nonconforming"}}
			limits := []SpecLimit{{Spec: "S-1 rev A", Material: "bar", Property: "tensile", Minimum: 930, Maximum: math.NaN(), Unit: "MPa"}}
			r, err := s.Record(ctx, d, verdicts, limits, Meta{Time: t0, User: "ann"})
			if err != nil {
				t.Fatal(err)
			}
			if r.AlreadyRecorded || r.SpecimensNew != 12 || r.LotsNew != 3 || r.Verdicts != 2 || r.SpecLimits != 1 {
				t.Fatalf("first import: %+v", r)
			}
			want := Counts{Imports: 1, Lots: 3, Specimens: 12, Measurements: 23, Verdicts: 2}
			if c := counts(t, s); c != want {
				t.Fatalf("counts %+v, want %+v", c, want)
			}
			// The same file again: nothing changes, and the result says so.
			r2, err := s.Record(ctx, d, verdicts, limits, Meta{Time: t0.Add(time.Hour), User: "bob"})
			if err != nil {
				t.Fatal(err)
			}
			if !r2.AlreadyRecorded || r2.User != "ann" || r2.ImportedAt != "2026-04-01T12:00:00Z" || r2.SpecimensNew != 0 || r2.SpecimensSame != 12 || r2.LotsNew != 0 {
				t.Fatalf("second import: %+v", r2)
			}
			if c := counts(t, s); c != want {
				t.Fatalf("after re-import counts %+v, want %+v", c, want)
			}
			// A different file holding the same specimens plus one new lot:
			// identical specimens are skipped, the new ones stored.
			more := append(append([]specRow(nil), rows...), synth("B", 1, 2, 2)...)
			r3, err := s.Record(ctx, dataset(t, "b.csv", more), nil, nil, Meta{Time: t0.Add(2 * time.Hour), User: "ann"})
			if err != nil {
				t.Fatal(err)
			}
			if r3.AlreadyRecorded || r3.SpecimensNew != 2 || r3.SpecimensSame != 12 || r3.LotsNew != 1 {
				t.Fatalf("overlapping import: %+v", r3)
			}
			// A specimen seen again with a different value: conflict, both
			// values reported, nothing written.
			bad := append(append([]specRow(nil), rows...), synth("C", 1, 2, 3)...)
			bad[2].tensile += 0.5
			before := counts(t, s)
			_, err = s.Record(ctx, dataset(t, "c.csv", bad), nil, nil, Meta{Time: t0.Add(3 * time.Hour), User: "ann"})
			var ce *ConflictError
			if !errors.As(err, &ce) {
				t.Fatalf("want a conflict, got %v", err)
			}
			if len(ce.Conflicts) != 1 || ce.Conflicts[0].Key != rows[2].id || ce.Conflicts[0].Field != "tensile" ||
				ce.Conflicts[0].Stored != strconv.FormatFloat(rows[2].tensile, 'g', -1, 64)+" MPa" ||
				ce.Conflicts[0].Incoming != strconv.FormatFloat(bad[2].tensile, 'g', -1, 64)+" MPa" || ce.Conflicts[0].Line != 4 ||
				ce.Conflicts[0].StoredIn != "a.csv" || !strings.Contains(ce.Error(), "(specimen first recorded from a.csv)") {
				t.Fatalf("conflict %+v", ce.Conflicts)
			}
			if c := counts(t, s); c != before {
				t.Fatalf("a conflicting import wrote something: %+v, before %+v", c, before)
			}
			// A value not yet recorded is an addition, not a conflict (a
			// second results file for the same specimens); an empty cell
			// where a value is stored changes nothing.
			bad2 := append([]specRow(nil), rows...)
			bad2[5].proof = 870
			bad2[6].proof = math.NaN()
			before = counts(t, s)
			r4, err := s.Record(ctx, dataset(t, "d.csv", bad2), nil, nil, Meta{Time: t0.Add(4 * time.Hour), User: "ann"})
			if err != nil || r4.SpecimensNew != 0 || r4.SpecimensSame != 12 || r4.SpecimensAdded != 1 || r4.ValuesAdded != 1 {
				t.Fatalf("want one value added, got %+v, %v", r4, err)
			}
			if c := counts(t, s); c.Measurements != before.Measurements+1 || c.Specimens != before.Specimens {
				t.Fatalf("after the addition counts %+v, before %+v", c, before)
			}
			// A lot that changes supplier is a conflict.
			bad3 := synth("A", 1, 5, 9)
			bad3[4].id = "A-new"
			for i := range bad3 {
				bad3[i].supplier = "Other Mill"
			}
			_, err = s.Record(ctx, dataset(t, "e.csv", bad3), nil, nil, Meta{Time: t0, User: "ann"})
			if !errors.As(err, &ce) || ce.Conflicts[0].Kind != "lot" && ce.Conflicts[0].Field != "supplier" {
				t.Fatalf("want a lot conflict, got %v", err)
			}
			// Read back.
			lv, err := s.LotData(ctx, Filter{Property: "proof"})
			if err != nil {
				t.Fatal(err)
			}
			if len(lv) != 4 || lv[1].Lot != "A-L00001" || len(lv[1].Values) != 4 || lv[1].Values[0] != rows[4].proof || lv[1].Values[1] != 870 || lv[1].Tested != "2025-02-01" {
				t.Fatalf("lot data %+v", lv)
			}
			vs, err := s.LotVerdicts(ctx)
			if err != nil || len(vs) != 2 || vs["A-L00001"][0].Verdict != "nonconforming" {
				t.Fatalf("verdicts %v %v", vs, err)
			}
			sl, err := s.SpecLimits(ctx)
			if err != nil || len(sl) != 1 || sl[0].Minimum != 930 || !math.IsNaN(sl[0].Maximum) {
				t.Fatalf("limits %+v %v", sl, err)
			}
			im, err := s.Imports(ctx)
			if err != nil || len(im) != 3 || im[0].User != "ann" || im[0].Digest != d.Digest || im[2].Source != "d.csv" {
				t.Fatalf("imports %+v %v", im, err)
			}
		})
	}
}

// Names with quotes, SQL fragments, HTML and non-ASCII text are stored
// and read back verbatim.
func TestNamesVerbatim(t *testing.T) {
	ctx := context.Background()
	names := []string{
		`O'Brien "Steel" Ltd`,
		`x'); DROP TABLE lots; --`,
		`<script>alert("lot")</script> & <b>bold</b>`,
		`Robert'); DELETE FROM specimens WHERE ('1'='1`,
		"tab\there, ünïcödé, 鋼, back\\slash, percent %d, question ?",
		`$1 $2 ? :name @p`,
	}
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			s := open(t, b.fresh(t))
			var rows []specRow
			for i, n := range names {
				rows = append(rows, specRow{id: n + " #" + strconv.Itoa(i), lot: n, supplier: n + " (supplier)", material: n + " (material)", tested: "2025-01-02", tensile: 1000 + float64(i), proof: 900})
			}
			verdicts := []Verdict{{Lot: names[1], Spec: names[2], Verdict: "conforming"}}
			if _, err := s.Record(ctx, dataset(t, names[0]+".csv", rows), verdicts, nil, Meta{Time: t0, User: names[3]}); err != nil {
				t.Fatal(err)
			}
			lv, err := s.LotData(ctx, Filter{Property: "tensile"})
			if err != nil {
				t.Fatal(err)
			}
			got := map[string]LotValues{}
			for _, l := range lv {
				got[l.Lot] = l
			}
			for i, n := range names {
				l, ok := got[n]
				if !ok || l.Supplier != n+" (supplier)" || l.Material != n+" (material)" || len(l.IDs) != 1 || l.IDs[0] != n+" #"+strconv.Itoa(i) || l.Values[0] != 1000+float64(i) {
					t.Errorf("name %q read back as %+v", n, l)
				}
			}
			vs, err := s.LotVerdicts(ctx)
			if err != nil || len(vs[names[1]]) != 1 || vs[names[1]][0].Spec != names[2] {
				t.Errorf("verdict read back as %+v (%v)", vs, err)
			}
			im, err := s.Imports(ctx)
			if err != nil || len(im) != 1 || im[0].User != names[3] || im[0].Source != names[0]+".csv" {
				t.Errorf("import read back as %+v (%v)", im, err)
			}
			if c := counts(t, s); c.Lots != len(names) {
				t.Errorf("counts %+v", c)
			}
		})
	}
}

// schemaV1 is the schema as version 1 of lotproof wrote it (kept here
// verbatim so the migration from it stays tested).
var schemaV1 = []string{
	`CREATE TABLE schema_version (version BIGINT NOT NULL PRIMARY KEY, about TEXT NOT NULL)`,
	`CREATE TABLE imports (digest TEXT NOT NULL PRIMARY KEY, source TEXT NOT NULL, imported_at TEXT NOT NULL, user_name TEXT NOT NULL, specimens_new BIGINT NOT NULL, specimens_same BIGINT NOT NULL)`,
	`CREATE TABLE properties (property TEXT NOT NULL PRIMARY KEY, quantity TEXT NOT NULL, unit TEXT NOT NULL)`,
	`CREATE TABLE lots (lot TEXT NOT NULL PRIMARY KEY, supplier TEXT NOT NULL, material TEXT NOT NULL, import_digest TEXT NOT NULL REFERENCES imports(digest))`,
	`CREATE TABLE specimens (specimen TEXT NOT NULL PRIMARY KEY, lot TEXT NOT NULL REFERENCES lots(lot), heat TEXT NOT NULL, tested TEXT NOT NULL, test_condition TEXT NOT NULL, import_digest TEXT NOT NULL REFERENCES imports(digest))`,
	`CREATE TABLE measurements (specimen TEXT NOT NULL REFERENCES specimens(specimen), property TEXT NOT NULL REFERENCES properties(property), value DOUBLE PRECISION NOT NULL, PRIMARY KEY (specimen, property))`,
	`INSERT INTO schema_version (version, about) VALUES (1, 'imports, lots, specimens, measurements, properties')`,
	`INSERT INTO imports VALUES ('` + strings.Repeat("ab", 32) + `', 'old.csv', '2025-01-01T00:00:00Z', 'old user', 2, 0)`,
	`INSERT INTO properties VALUES ('tensile', 'stress', 'MPa')`,
	`INSERT INTO lots VALUES ('OLD-1', 'Old Mill', 'bar', '` + strings.Repeat("ab", 32) + `')`,
	`INSERT INTO specimens VALUES ('OLD-1-1', 'OLD-1', 'H1', '2024-12-01', 'RT', '` + strings.Repeat("ab", 32) + `')`,
	`INSERT INTO specimens VALUES ('OLD-1-2', 'OLD-1', 'H1', '2024-12-01', 'RT', '` + strings.Repeat("ab", 32) + `')`,
	`INSERT INTO measurements VALUES ('OLD-1-1', 'tensile', 1001.5)`,
	`INSERT INTO measurements VALUES ('OLD-1-2', 'tensile', 998.25)`,
}

// writeV1 writes the version 1 schema and a lot into the empty database
// at url, as a lotproof of that version would have.
func writeV1(t *testing.T, url string) {
	t.Helper()
	driver := "sqlite"
	if IsPostgres(url) {
		driver = "pgx"
	}
	raw, err := sql.Open(driver, url)
	if err != nil {
		t.Fatal(err)
	}
	defer raw.Close()
	for _, stmt := range schemaV1 {
		if _, err := raw.Exec(stmt); err != nil {
			t.Fatalf("%s: %v", stmt, err)
		}
	}
}

func TestMigrateFromVersion1(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			url := b.fresh(t)
			writeV1(t, url)
			s := open(t, url)
			v, err := s.SchemaVersion(ctx)
			if err != nil || v != 5 || Latest() != 5 {
				t.Fatalf("version after migrating: %d (%v), latest %d", v, err, Latest())
			}
			// Version 4 copied each specimen's lot onto its measurements,
			// which LotSamples groups by.
			var lot string
			var n int
			if err := s.db.QueryRowContext(ctx, `SELECT MIN(lot), COUNT(*) FROM measurements`).Scan(&lot, &n); err != nil || lot != "OLD-1" || n != 2 {
				t.Fatalf("measurements' lot after migrating: %q of %d (%v)", lot, n, err)
			}
			if ls, err := s.LotSamples(ctx, Filter{}); err != nil || len(ls) != 1 || ls[0].Lot != "OLD-1" || len(ls[0].Values) != 2 {
				t.Fatalf("lot samples after migrating: %+v (%v)", ls, err)
			}
			lv, err := s.LotData(ctx, Filter{})
			if err != nil || len(lv) != 1 || lv[0].Lot != "OLD-1" || len(lv[0].Values) != 2 || lv[0].Values[0] != 1001.5 || lv[0].Values[1] != 998.25 {
				t.Fatalf("old data after migrating: %+v (%v)", lv, err)
			}
			// Units entered before version 3 are unknown, and filled in by
			// the next import of the property.
			if eu, err := s.EnteredUnits(ctx); err != nil || len(eu) != 0 {
				t.Fatalf("entered units after migrating: %v %v", eu, err)
			}
			// The migrated database takes new imports with verdicts.
			d := dataset(t, "new.csv", synth("N", 1, 3, 4))
			if _, err := s.Record(ctx, d, []Verdict{{Lot: "N-L00000", Spec: "S", Verdict: "conforming"}}, nil, Meta{Time: t0, User: "u"}); err != nil {
				t.Fatal(err)
			}
			if eu, err := s.EnteredUnits(ctx); err != nil || eu["tensile"] != "MPa" {
				t.Fatalf("entered units after an import: %v %v", eu, err)
			}
			im, err := s.Imports(ctx)
			if err != nil || len(im) != 2 || im[0].User != "old user" {
				t.Fatalf("imports %+v (%v)", im, err)
			}
			// Opening again changes nothing.
			s.Close()
			s2 := open(t, url)
			if v, _ := s2.SchemaVersion(ctx); v != Latest() {
				t.Fatalf("version on reopening %d", v)
			}
		})
	}
}

// Child processes: the parent re-executes this test binary with
// LOTPROOF_STORE_CHILD set; the child records a dataset and exits.
const childEnv = "LOTPROOF_STORE_CHILD"

func TestChildProcess(t *testing.T) {
	job := os.Getenv(childEnv)
	if job == "" {
		t.Skip("helper process for the kill and concurrency tests")
	}
	// job: url|prefix|lots|perLot
	f := strings.Split(job, "|")
	nLots, _ := strconv.Atoi(f[2])
	perLot, _ := strconv.Atoi(f[3])
	d := dataset(t, f[1]+".csv", synth(f[1], nLots, perLot, uint64(len(f[1]))))
	s, err := Open(context.Background(), f[0])
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(3)
	}
	fmt.Println("recording")
	if _, err := s.Record(context.Background(), d, nil, nil, Meta{Time: t0, User: "child"}); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(4)
	}
	s.Close()
	os.Exit(0)
}

func child(url, prefix string, nLots, perLot int) *exec.Cmd {
	cmd := exec.Command(os.Args[0], "-test.run=^TestChildProcess$", "-test.count=1")
	cmd.Env = append(os.Environ(), fmt.Sprintf("%s=%s|%s|%d|%d", childEnv, url, prefix, nLots, perLot))
	return cmd
}

// A process killed with SIGKILL in the middle of a large import leaves no
// partial lot: the database holds nothing of that import and takes it
// again afterwards.
func TestKilledImportLeavesNothing(t *testing.T) {
	if testing.Short() {
		t.Skip("large import")
	}
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			url := b.fresh(t)
			s := open(t, url) // schema in place before the child starts
			s.Close()
			const nLots, perLot = 40000, 5
			cmd := child(url, "K", nLots, perLot)
			out, err := cmd.StdoutPipe()
			if err != nil {
				t.Fatal(err)
			}
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			line, _ := bufio.NewReader(out).ReadString('\n')
			if !strings.HasPrefix(line, "recording") {
				cmd.Process.Kill()
				cmd.Wait()
				t.Fatalf("child did not start recording: %q", line)
			}
			// Wait until the import has written a good part of its rows.
			deadline := time.Now().Add(20 * time.Second)
			for time.Now().Before(deadline) {
				if b.name == "sqlite" {
					if fi, err := os.Stat(url + "-wal"); err == nil && fi.Size() > 4<<20 {
						break
					}
				} else if n := pgUncommitted(t, url); n > 20000 {
					break
				}
				time.Sleep(20 * time.Millisecond)
			}
			if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
				t.Fatal(err)
			}
			cmd.Wait()
			ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus)
			if !ok || !ws.Signaled() || ws.Signal() != syscall.SIGKILL {
				t.Fatalf("the child was not killed in the middle of the import (state %v); make the import larger", cmd.ProcessState)
			}
			s = open(t, url)
			if c := counts(t, s); c != (Counts{}) {
				t.Fatalf("a killed import left rows behind: %+v", c)
			}
			// The same import runs to the end afterwards.
			d := dataset(t, "K.csv", synth("K", 200, perLot, 1))
			if _, err := s.Record(ctx, d, nil, nil, Meta{Time: t0, User: "u"}); err != nil {
				t.Fatal(err)
			}
			if c := counts(t, s); c.Lots != 200 || c.Specimens != 1000 {
				t.Fatalf("counts after re-import %+v", c)
			}
		})
	}
}

// pgUncommitted estimates the rows inserted so far by an open transaction
// (pg_stat_activity cannot see them; the live-tuple statistics of the
// table do, through n_tup_ins, once the backend reports them).
func pgUncommitted(t *testing.T, url string) int {
	db, err := sql.Open("pgx", url)
	if err != nil {
		return 0
	}
	defer db.Close()
	var n sql.NullInt64
	db.QueryRow(`SELECT pg_relation_size('measurements') / 40`).Scan(&n)
	return int(n.Int64)
}

// Eight concurrent processes recording distinct files leave every row
// exactly once.
func TestConcurrentWriters(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			url := b.fresh(t) // each child creates the schema itself: the migration races too
			const writers, nLots, perLot = 8, 60, 5
			var wg sync.WaitGroup
			errs := make([]error, writers)
			outs := make([][]byte, writers)
			for w := 0; w < writers; w++ {
				wg.Add(1)
				go func(w int) {
					defer wg.Done()
					outs[w], errs[w] = child(url, fmt.Sprintf("W%d", w), nLots, perLot).CombinedOutput()
				}(w)
			}
			wg.Wait()
			for w, err := range errs {
				if err != nil {
					t.Fatalf("writer %d: %v\n%s", w, err, outs[w])
				}
			}
			s := open(t, url)
			want := Counts{Imports: writers, Lots: writers * nLots, Specimens: writers * nLots * perLot, Measurements: 2 * writers * nLots * perLot}
			if c := counts(t, s); c != want {
				t.Fatalf("counts %+v, want %+v", c, want)
			}
			// Every specimen exactly once, with its own values.
			lv, err := s.LotData(ctx, Filter{Property: "tensile"})
			if err != nil {
				t.Fatal(err)
			}
			seen := map[string]int{}
			for _, l := range lv {
				for _, id := range l.IDs {
					seen[id]++
				}
			}
			for w := 0; w < writers; w++ {
				p := fmt.Sprintf("W%d", w)
				for _, r := range synth(p, nLots, perLot, uint64(len(p))) {
					if seen[r.id] != 1 {
						t.Fatalf("specimen %s stored %d times", r.id, seen[r.id])
					}
				}
			}
		})
	}
}

func TestOpenErrors(t *testing.T) {
	ctx := context.Background()
	if _, err := Open(ctx, ""); err == nil {
		t.Error("empty location accepted")
	}
	if _, err := Open(ctx, filepath.Join(t.TempDir(), "no", "such", "folder", "x.db")); err == nil {
		t.Error("missing folder accepted")
	}
	if _, err := Open(ctx, filepath.Join(t.TempDir(), "a?b.db")); err == nil {
		t.Error("file name with ? accepted")
	}
	// A database newer than this build is refused.
	p := filepath.Join(t.TempDir(), "new.db")
	s := open(t, p)
	if _, err := s.db.Exec(`INSERT INTO schema_version (version, about) VALUES (99, 'future')`); err != nil {
		t.Fatal(err)
	}
	s.Close()
	if _, err := Open(ctx, p); err == nil || !strings.Contains(err.Error(), "newer") {
		t.Errorf("future schema: %v", err)
	}
	if got := redact("postgres://u:secret@h:1/db"); got != "postgres://u:***@h:1/db" {
		t.Errorf("redact: %s", got)
	}
	t.Setenv(EnvVar, "/tmp/x.db")
	if ResolveURL("") != "/tmp/x.db" || ResolveURL("y.db") != "y.db" {
		t.Error("ResolveURL")
	}
	t.Setenv(EnvVar, "")
	if ResolveURL("") != DefaultPath {
		t.Error("default path")
	}
}

// A dataset built in code (the file reader rejects this) holding one
// specimen twice: identical rows are stored once, differing rows conflict.
func TestDuplicateSpecimenInOneDataset(t *testing.T) {
	ctx := context.Background()
	s := open(t, filepath.Join(t.TempDir(), "d.db"))
	rows := synth("D", 1, 3, 5)
	same := append(append([]specRow(nil), rows...), rows[1])
	r, err := s.Record(ctx, dataset(t, "same.csv", same), nil, nil, Meta{Time: t0, User: "u"})
	if err != nil || r.SpecimensNew != 3 || r.SpecimensSame != 1 {
		t.Fatalf("%+v %v", r, err)
	}
	diff := append(append([]specRow(nil), synth("E", 1, 3, 5)...), specRow{id: "E-L00000-1", lot: "E-L00000", supplier: "E Mill", material: "bar", tested: "2025-01-02", tensile: 1, proof: 2})
	var ce *ConflictError
	if _, err := s.Record(ctx, dataset(t, "diff.csv", diff), nil, nil, Meta{Time: t0, User: "u"}); !errors.As(err, &ce) {
		t.Fatalf("want a conflict, got %v", err)
	}
}

// Imports larger than one multi-row statement (batchRows), mixing stored
// and new specimens across statement boundaries.
func TestOverlapAcrossBatches(t *testing.T) {
	ctx := context.Background()
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			s := open(t, b.fresh(t))
			first := synth("F", 120, 5, 6) // 600 specimens
			if _, err := s.Record(ctx, dataset(t, "f1.csv", first), nil, nil, Meta{Time: t0, User: "u"}); err != nil {
				t.Fatal(err)
			}
			// Interleave new specimens among the stored ones.
			var mixed []specRow
			extra := synth("G", 70, 5, 7) // 350 new
			for i := range first {
				mixed = append(mixed, first[i])
				if i < len(extra) {
					mixed = append(mixed, extra[i])
				}
			}
			r, err := s.Record(ctx, dataset(t, "f2.csv", mixed), nil, nil, Meta{Time: t0, User: "u"})
			if err != nil {
				t.Fatal(err)
			}
			if r.SpecimensNew != 350 || r.SpecimensSame != 600 || r.LotsNew != 70 {
				t.Fatalf("%+v", r)
			}
			if c := counts(t, s); c.Specimens != 950 || c.Measurements != 1900 || c.Lots != 190 {
				t.Fatalf("counts %+v", c)
			}
		})
	}
}
