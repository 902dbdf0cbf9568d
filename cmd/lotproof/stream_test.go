package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/spec"
)

// pipeReader hides Seek: standard input from a pipe.
type pipeReader struct{ r io.Reader }

func (p pipeReader) Read(b []byte) (int, error) { return p.r.Read(b) }

// accept and summary read one lot at a time (lots.ScanLotsFile) and judge
// in parallel; their output must be byte for byte what reading the whole
// file (lots.ReadFile), grouping it and judging it on the Dataset gives:
// for a file grouped by lot, the same rows interleaved (read twice), from a
// pipe, grouped by heat, in every format and both unit systems (the demo
// data and the acceptance test data).
func TestStreamingSameAsWholeFile(t *testing.T) {
	demo := "../../lots/demo/data/"
	raw, err := os.ReadFile(demo + "receipts.csv")
	if err != nil {
		t.Fatal(err)
	}
	// Interleave: odd rows first, then even rows (no lot is contiguous).
	ls := strings.SplitAfter(strings.TrimSuffix(string(raw), ""), "\n")
	var mixed strings.Builder
	mixed.WriteString(ls[0])
	for start := 1; start <= 2; start++ {
		for i := start; i < len(ls); i += 2 {
			mixed.WriteString(ls[i])
		}
	}
	mixedName := filepath.Join(t.TempDir(), "mixed.csv")
	if err := os.WriteFile(mixedName, []byte(mixed.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	specNames := []string{demo + "spec-steel-bar.yaml", demo + "spec-plate.yaml"}
	cases := []struct {
		file, by string
		stdin    bool
	}{
		{demo + "receipts.csv", "lot", false},
		{mixedName, "lot", false},
		{mixedName, "lot", true},
		{demo + "receipts.csv", "heat", false},
		{mixedName, "heat", true},
		{"../../testdata/acceptance/lots.csv", "lot", false},
	}
	formats := []render.Format{render.JSON, render.CSV, render.Text}
	for ci, c := range cases {
		d, err := lots.ReadFile(c.file, lots.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		by := lots.GroupBy(c.by)
		groups, err := d.Group(by, nil)
		if err != nil {
			t.Fatal(err)
		}
		var ss []*spec.Spec
		sn := specNames
		if strings.Contains(c.file, "testdata") {
			sn = []string{"../../testdata/acceptance/spec-test.yaml"}
		}
		if ss, err = spec.ReadFiles(sn); err != nil {
			t.Fatal(err)
		}
		res, err := acceptance.Judge(d, ss, by)
		if err != nil {
			t.Fatal(err)
		}
		sum := lots.Summarize(d, groups, units.SI)
		sumUS := lots.Summarize(d, groups, units.US)
		// JSON (lossless) for every case, and the other formats and units
		// in turn.
		for _, f := range []render.Format{render.JSON, formats[ci%3]} {
			for _, sys := range []units.System{[]units.System{units.SI, units.US}[ci%2]} {
				out := output{Format: f, System: sys}
				in := inputOptions{GroupBy: c.by}
				data := c.file
				var stdin io.Reader
				if c.stdin {
					data, stdin = "-", pipeReader{bytes.NewReader([]byte(mixed.String()))}
				}
				var want, got bytes.Buffer
				name := c.file + " by " + c.by
				// Every table a CSV stream can hold (each lot's rows are
				// written as it is judged).
				tables := []string{""}
				if f == render.CSV {
					tables = acceptTableNames
				}
				for _, tn := range tables {
					want.Reset()
					got.Reset()
					to := tableOption{Name: tn, names: acceptTableNames}
					r2 := *res
					if c.stdin {
						r2.Source = "-"
						stdin = pipeReader{bytes.NewReader([]byte(mixed.String()))}
					}
					if err := writeAccept(&want, &r2, shownRes(d, out), to, out); err != nil {
						t.Fatal(err)
					}
					err := runAccept(acceptOptions{Data: data, Specs: sn, Input: in, Table: to, Out: out}, streams{In: stdin, Out: &got, Err: io.Discard})
					if _, verdict := err.(verdictError); err != nil && !verdict {
						t.Fatal(err)
					}
					if !bytes.Equal(got.Bytes(), want.Bytes()) {
						t.Errorf("accept %s (%v, %v, table %q): streamed output differs from the whole-file judgement", name, f, sys, tn)
					}
				}
				want.Reset()
				got.Reset()
				s := sum
				if sys == units.US {
					s = sumUS
				}
				if err := writeSummary(&want, s, by, shownRes(d, out), out); err != nil {
					t.Fatal(err)
				}
				if c.stdin {
					stdin = pipeReader{bytes.NewReader([]byte(mixed.String()))}
				}
				if err := runSummary(summaryOptions{Data: data, Input: in, Out: out}, streams{In: stdin, Out: &got, Err: io.Discard}); err != nil {
					t.Fatal(err)
				}
				if !bytes.Equal(got.Bytes(), want.Bytes()) {
					t.Errorf("summary %s (%v, %v): streamed output differs from the whole-file summary", name, f, sys)
				}
			}
		}
	}
}

// shownRes are the resolutions a command infers for a table people read.
func shownRes(d *lots.Dataset, out output) render.Resolutions {
	if out.Format != render.Text {
		return nil
	}
	return resolutionsOf(d, out.System)
}
