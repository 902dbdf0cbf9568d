package main

import (
	"bytes"
	"database/sql"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"lotproof/lots/store"

	"lotproof/lots/store/pgtest"
)

const recordCSV = `specimen,lot,heat,supplier,material,tested,tensile [MPa],proof [MPa]
A-1,L-1,H1,North Mill,bar,2025-01-10,1001.5,880.0
A-2,L-1,H1,North Mill,bar,2025-01-10,998.0,875.5
B-1,L-2,H2,North Mill,bar,2025-04-12,1010.0,890.0
B-2,L-2,H2,North Mill,bar,2025-04-12,1007.5,
`

func recordOpts(t *testing.T, data, db string) recordOptions {
	return recordOptions{Data: data, DB: db, Input: inputOptions{GroupBy: "lot"},
		Now:  func() time.Time { return time.Date(2026, 3, 4, 5, 6, 7, 0, time.UTC) },
		User: "tester"}
}

func TestRecordThenAgainThenConflict(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "h.db")
	data := writeFile(t, "r.csv", recordCSV)
	o := recordOpts(t, data, db)
	o.Out.Format = "json"
	var out, errb bytes.Buffer
	if err := runRecord(o, streams{Out: &out, Err: &errb}); err != nil {
		t.Fatal(err)
	}
	var r map[string]any
	if err := json.Unmarshal(out.Bytes(), &r); err != nil {
		t.Fatal(err)
	}
	if r["specimens_new"] != 4.0 || r["lots_new"] != 2.0 || r["already_recorded"] != false || r["user"] != "tester" ||
		r["imported_at"] != "2026-03-04T05:06:07Z" || r["schema_version"] != float64(store.Latest()) || len(r["sha256"].(string)) != 64 || r["digest"] != nil {
		t.Fatalf("first record: %s", out.String())
	}
	// Again: nothing changes, and it says so.
	out.Reset()
	errb.Reset()
	o.Now = func() time.Time { return time.Date(2027, 1, 1, 0, 0, 0, 0, time.UTC) }
	if err := runRecord(o, streams{Out: &out, Err: &errb}); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out.String(), `"already_recorded": true`) || !strings.Contains(out.String(), `"specimens_new": 0,`) || !strings.Contains(errb.String(), "already recorded on 2026-03-04T05:06:07Z by tester; nothing changed") {
		t.Fatalf("second record: %s / %s", out.String(), errb.String())
	}
	// A changed value under the same specimen id: exit 2, both values
	// shown, nothing on stdout, nothing written.
	bad := writeFile(t, "bad.csv", strings.Replace(recordCSV, "998.0", "989.0", 1)+"C-1,L-3,H3,North Mill,bar,2025-07-01,1000,880\n")
	code, stdout, stderr := run(t, "", "record", bad, "--db", db)
	if code != 2 || stdout != "" || !strings.Contains(stderr, `specimen "A-2": tensile is 998 MPa in the database (specimen first recorded from `+data+`) but 989 MPa in the file`) || !strings.Contains(stderr, "bad.csv:3") {
		t.Fatalf("conflict: exit %d\nstdout %q\nstderr %s", code, stdout, stderr)
	}
	s, err := store.Open(t.Context(), db)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	c, _ := s.Count(t.Context())
	if c != (store.Counts{Imports: 1, Lots: 2, Specimens: 4, Measurements: 7}) {
		t.Fatalf("counts after conflict %+v", c)
	}
}

func TestRecordDefaultDatabaseAndErrors(t *testing.T) {
	dir := t.TempDir()
	t.Setenv(store.EnvVar, filepath.Join(dir, "env.db"))
	data := writeFile(t, "r.csv", recordCSV)
	code, _, stderr := run(t, "", "record", data, "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "env.db")); err != nil {
		t.Fatalf("$%s not used: %v", store.EnvVar, err)
	}
	for _, args := range [][]string{
		{"record"},
		{"record", filepath.Join(dir, "missing.csv")},
		{"record", data, "--db", filepath.Join(dir, "no", "such", "dir", "x.db")},
		{"record", data, "--spec", filepath.Join(dir, "missing.yaml")},
		{"trend", "--every", "week"},
		{"trend", "--baseline", "2025-Q1-2025-Q4"},
		{"trend", "--baseline", "2025-Q4..2025-Q1"},
		{"trend", "--since", "2025-13-01"},
		{"trend", "--property", "no such property"},
		{"trend", "--by", "heat"},
		{"trend", "extra"},
	} {
		code, stdout, stderr := run(t, "", args...)
		if code != 2 || stdout != "" || stderr == "" {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, stdout, stderr)
		}
	}
}

// A record run from the demo specification stores its limits, and trend
// reads them back; the JSON holds one object per group, property and
// period and a signals list.
func TestRecordSpecThenTrendJSON(t *testing.T) {
	db := filepath.Join(t.TempDir(), "h.db")
	spec := writeFile(t, "s.yaml", `specification: T-1
revision: A
material: QT bar OH-S42
properties:
  tensile:
    unit: MPa
    min: 930
  proof:
    unit: MPa
    min: 800
acceptance:
  content: 0.90
  confidence: 0.90
  min_specimens: 2
`)
	data := writeFile(t, "r.csv", strings.ReplaceAll(recordCSV, ",bar,", ",QT bar OH-S42,"))
	code, out, stderr := run(t, "", "record", data, "--db", db, "--spec", spec, "--format", "json")
	if code != 0 {
		t.Fatalf("record: exit %d: %s", code, stderr)
	}
	var rec map[string]any
	if err := json.Unmarshal([]byte(out), &rec); err != nil {
		t.Fatal(err)
	}
	// Two lots judged (package acceptance), the two limits stored.
	if rec["judged"] != true || rec["verdicts"] != 2.0 || rec["spec_limits"] != 2.0 || rec["specs"].([]any)[0] != "T-1 rev A" {
		t.Fatalf("record with --spec: %s", out)
	}
	code, out, stderr = run(t, "", "trend", "--db", db, "--format", "json", "--property", "tensile")
	if code != 0 {
		t.Fatalf("trend: exit %d: %s", code, stderr)
	}
	var r struct {
		Periods []map[string]any `json:"periods"`
		Signals []map[string]any `json:"signals"`
		Caution string           `json:"caution"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Periods) != 2 || r.Periods[0]["period"] != "2025-Q1" || r.Periods[1]["period"] != "2025-Q2" || r.Periods[0]["minimum"] != 930.0 ||
		r.Periods[0]["specimens"] != 2.0 || r.Periods[0]["mean"] != 999.75 || r.Periods[0]["lots_judged"] != 1.0 || r.Signals == nil || r.Caution == "" {
		t.Fatalf("trend JSON: %s", out)
	}
	// US units: the mean in ksi (1 ksi = 6.894757293168361 MPa, NIST SP 811).
	code, out, _ = run(t, "", "trend", "--db", db, "--format", "json", "--property", "tensile", "--units", "us")
	if code != 0 {
		t.Fatal(out)
	}
	json.Unmarshal([]byte(out), &r)
	if m := r.Periods[0]["mean"].(float64); r.Periods[0]["unit"] != "ksi" || m < 999.75/6.894757293168361-1e-9 || m > 999.75/6.894757293168361+1e-9 {
		t.Fatalf("US units: %v %v", r.Periods[0]["unit"], r.Periods[0]["mean"])
	}
	// Same input, byte-identical output.
	_, out2, _ := run(t, "", "trend", "--db", db, "--format", "json", "--property", "tensile", "--units", "us")
	if out2 != out {
		t.Fatal("trend output differs between two runs")
	}
	// A baseline with no recorded lots is an error naming the range and
	// the recorded periods; the baseline used is shown in the table.
	code, out, stderr = run(t, "", "trend", "--db", db, "--baseline", "2030-Q1..2030-Q4")
	if code != exitInput || out != "" || !strings.Contains(stderr, "the baseline 2030-Q1..2030-Q4 holds no recorded lots") || !strings.Contains(stderr, "(2025-Q1..2025-Q2)") {
		t.Errorf("empty baseline: exit %d, %q, %s", code, out, stderr)
	}
	_, out, _ = run(t, "", "trend", "--db", db, "--format", "table", "--baseline", "2025-Q1..2025-Q1")
	_, def, _ := run(t, "", "trend", "--db", db, "--format", "table")
	if !strings.Contains(out, "Control limits from the baseline 2025-Q1..2025-Q1") || !strings.Contains(def, "each series' first 4 periods (the default") {
		t.Errorf("baseline not shown:\n%s\n%s", out, def)
	}
}

// Child process for TestConcurrentRecordProcesses.
const recordChildEnv = "LOTPROOF_RECORD_CHILD"

func TestRecordChildProcess(t *testing.T) {
	args := os.Getenv(recordChildEnv)
	if args == "" {
		t.Skip("helper process for TestConcurrentRecordProcesses")
	}
	os.Exit(execute(strings.Split(args, "\x1f"), streams{In: os.Stdin, Out: os.Stdout, Err: os.Stderr}))
}

// Eight `lotproof record` processes with distinct files at once leave
// every specimen exactly once (SQLite, and PostgreSQL when
// LOTPROOF_TEST_PG is set).
func TestConcurrentRecordProcesses(t *testing.T) {
	dbs := map[string]string{"sqlite": filepath.Join(t.TempDir(), "c.db")}
	if pg := os.Getenv("LOTPROOF_TEST_PG"); pg != "" {
		dbs["postgres"] = pgtest.Fresh(t, pg)
	} else {
		t.Log("LOTPROOF_TEST_PG is not set: PostgreSQL half skipped")
	}
	for name, db := range dbs {
		t.Run(name, func(t *testing.T) {
			const writers, perFile = 8, 40
			run := fmt.Sprintf("%d", time.Now().UnixNano())
			var files []string
			for w := 0; w < writers; w++ {
				var b strings.Builder
				b.WriteString("specimen,lot,supplier,material,tested,tensile [MPa]\n")
				for i := 0; i < perFile; i++ {
					fmt.Fprintf(&b, "R%s-W%d-S%d,R%s-W%d-L%d,Mill %d,bar,2025-0%d-01,%d\n", run, w, i, run, w, i/5, w, 1+i%9, 1000+i)
				}
				files = append(files, writeFile(t, fmt.Sprintf("w%d.csv", w), b.String()))
			}
			var wg sync.WaitGroup
			outs := make([][]byte, writers)
			errs := make([]error, writers)
			for w := 0; w < writers; w++ {
				wg.Add(1)
				go func(w int) {
					defer wg.Done()
					cmd := exec.Command(os.Args[0], "-test.run=^TestRecordChildProcess$", "-test.count=1")
					cmd.Env = append(os.Environ(), recordChildEnv+"="+strings.Join([]string{"record", files[w], "--db", db, "--format", "json"}, "\x1f"))
					outs[w], errs[w] = cmd.CombinedOutput()
				}(w)
			}
			wg.Wait()
			for w := range errs {
				if errs[w] != nil {
					t.Fatalf("writer %d: %v\n%s", w, errs[w], outs[w])
				}
			}
			s, err := store.Open(t.Context(), db)
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			lv, err := s.LotData(t.Context(), store.Filter{Property: "tensile"})
			if err != nil {
				t.Fatal(err)
			}
			seen := map[string]int{}
			for _, l := range lv {
				for _, id := range l.IDs {
					if strings.HasPrefix(id, "R"+run+"-") {
						seen[id]++
					}
				}
			}
			if len(seen) != writers*perFile {
				t.Fatalf("%d specimens stored, want %d", len(seen), writers*perFile)
			}
			for id, n := range seen {
				if n != 1 {
					t.Fatalf("specimen %s stored %d times", id, n)
				}
			}
		})
	}
}

// TestTrendKeepsEnteredUnit: a modulus entered in GPa is trended in GPa
// (Msi in US units), as summary shows it, not in the stored MPa.
// 1 Msi = 6.894757293168361 GPa (NIST SP 811 psi definition).
func TestTrendKeepsEnteredUnit(t *testing.T) {
	db := filepath.Join(t.TempDir(), "m.db")
	data := writeFile(t, "m.csv", "specimen,lot,material,tested,modulus [GPa],tensile [MPa]\n"+
		"M-1,L1,Plate,2026-01-10,70.1,310\nM-2,L1,Plate,2026-01-10,70.5,312\nM-3,L2,Plate,2026-04-10,71.3,315\nM-4,L2,Plate,2026-04-10,70.9,311\n")
	if code, _, errs := run(t, "", "record", data, "--db", db); code != 0 {
		t.Fatalf("record: %s", errs)
	}
	for _, c := range []struct {
		units, unit string
		mean        float64
	}{{"si", "GPa", 70.3}, {"us", "Msi", 70.3 / 6.894757293168361}} {
		_, out, _ := run(t, "", "trend", "--db", db, "--property", "modulus", "--by", "material", "--format", "csv", "--units", c.units)
		rows := csvRows(t, out)
		if len(rows) != 2 || rows[0]["unit"] != c.unit {
			t.Fatalf("%s:\n%s", c.units, out)
		}
		if m, _ := strconv.ParseFloat(rows[0]["mean"], 64); math.Abs(m-c.mean) > 1e-9*c.mean {
			t.Errorf("%s: mean %s %s, want %g", c.units, rows[0]["mean"], c.unit, c.mean)
		}
		_, sum, _ := run(t, "", "summary", data, "--format", "csv", "--units", c.units)
		if !strings.Contains(sum, ",modulus,"+c.unit+",") {
			t.Errorf("summary and trend disagree on the unit:\n%s", sum)
		}
	}
	// Tensile stays in MPa.
	_, out, _ := run(t, "", "trend", "--db", db, "--property", "tensile", "--format", "csv")
	if rows := csvRows(t, out); len(rows) == 0 || rows[0]["unit"] != "MPa" {
		t.Errorf("tensile:\n%s", out)
	}
}

// TestRecordStreamedSameAsWhole: recording a file read lot by lot and
// again as it is written (one file on disk) stores exactly what recording
// it read whole does (standard input takes the whole-file path), table by
// table, for the demo receipts with their specifications (verdicts), and
// the result reports the same counts.
func TestRecordStreamedSameAsWhole(t *testing.T) {
	dir := t.TempDir()
	data := "../../lots/demo/data/receipts.csv"
	raw, err := os.ReadFile(data)
	if err != nil {
		t.Fatal(err)
	}
	specs := []string{"../../lots/demo/data/spec-steel-bar.yaml", "../../lots/demo/data/spec-plate.yaml"}
	dump := func(db string) string {
		sdb, err := sql.Open("sqlite", db) // the driver the store registers (modernc.org/sqlite)
		if err != nil {
			t.Fatal(err)
		}
		defer sdb.Close()
		var b strings.Builder
		for _, q := range []string{
			`SELECT lot, supplier, material FROM lots ORDER BY lot`,
			`SELECT specimen, lot, heat, tested, test_condition FROM specimens ORDER BY specimen`,
			`SELECT specimen, property, value FROM measurements ORDER BY specimen, property`,
			`SELECT lot, spec, verdict FROM verdicts ORDER BY lot, spec`,
			`SELECT spec, material, property, minimum, maximum, unit FROM spec_limits ORDER BY spec, material, property`,
		} {
			rows, err := sdb.QueryContext(t.Context(), q)
			if err != nil {
				t.Fatal(err)
			}
			cols, _ := rows.Columns()
			fmt.Fprintln(&b, "==", q)
			for rows.Next() {
				v := make([]any, len(cols))
				p := make([]any, len(cols))
				for i := range v {
					p[i] = &v[i]
				}
				if err := rows.Scan(p...); err != nil {
					t.Fatal(err)
				}
				fmt.Fprintln(&b, v...)
			}
			rows.Close()
		}
		return b.String()
	}
	var outs [2]string
	var dumps [2]string
	for i, name := range []string{data, "-"} {
		db := filepath.Join(dir, fmt.Sprintf("h%d.db", i))
		o := recordOpts(t, name, db)
		o.Specs = specs
		o.Out.Format = "json"
		var out, errb bytes.Buffer
		st := streams{In: bytes.NewReader(raw), Out: &out, Err: &errb}
		if err := runRecord(o, st); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		outs[i] = strings.Replace(out.String(), `"source": "-"`, `"source": "`+data+`"`, 1)
		outs[i] = strings.Replace(outs[i], db, "DB", 1)
		dumps[i] = dump(db)
	}
	if dumps[0] != dumps[1] {
		t.Errorf("the database differs between the streamed and the whole-file recording")
	}
	if outs[0] != outs[1] {
		t.Errorf("the reports differ:\nstreamed: %s\nwhole: %s", outs[0], outs[1])
	}
	// Independently of the store: every row of the file is a specimen,
	// every non-empty property cell a measurement (encoding/csv).
	recs, err := csv.NewReader(bytes.NewReader(raw)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	wantSpec, wantVals := len(recs)-1, 0
	for _, r := range recs[1:] {
		for j, h := range recs[0] {
			if strings.Contains(h, "[") && strings.TrimSpace(r[j]) != "" {
				wantVals++
			}
		}
	}
	var got struct {
		New int `json:"specimens_new"`
	}
	if err := json.Unmarshal([]byte(outs[0]), &got); err != nil {
		t.Fatal(err)
	}
	sec := strings.Split(dumps[0], "== ")[3] // the measurements
	nVals := strings.Count(sec, "\n") - 1    // less its heading

	if got.New != wantSpec || nVals != wantVals {
		t.Errorf("recorded %d specimens and %d values; the file has %d and %d", got.New, nVals, wantSpec, wantVals)
	}
}
