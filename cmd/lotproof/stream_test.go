package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/equivalence"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/spec"
	"lotproof/stats"
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

// equivalence reads one lot at a time too: on the demo receipts as they
// are, interleaved (read twice) and from a pipe, by lot and by heat, with
// and without a material filter (a lot holding a specimen of the other
// material keeps only the chosen one's), each lot's n, mean and minimum
// must be those of the plain grouping of the whole file (Dataset.Group
// with the same filter), its limits M - k S with the factors of
// stats.MeanMinFactors for its size (Vangel 2002), and the table for
// people the same from a file and from a pipe.
func TestEquivalenceStreamed(t *testing.T) {
	raw, err := os.ReadFile("../../lots/demo/data/receipts.csv")
	if err != nil {
		t.Fatal(err)
	}
	ls := strings.SplitAfter(string(raw), "\n")
	// A specimen of the third data row is given the plate's material: its
	// lot (steel bar) becomes mixed.
	ls[3] = strings.Replace(ls[3], "QT bar OH-S42", "Plate OH-A61", 1)
	var inter strings.Builder
	inter.WriteString(ls[0])
	for start := 1; start <= 2; start++ {
		for i := start; i < len(ls); i += 2 {
			inter.WriteString(ls[i])
		}
	}
	dir := t.TempDir()
	files := map[string]string{"grouped": strings.Join(ls, ""), "interleaved": inter.String()}
	for name, text := range files {
		if err := os.WriteFile(filepath.Join(dir, name+".csv"), []byte(text), 0o600); err != nil {
			t.Fatal(err)
		}
	}
	const mu, sd = 900.0, 40.0
	factors := map[int]stats.EquivalenceFactors{}
	for _, name := range []string{"grouped", "interleaved"} {
		file := filepath.Join(dir, name+".csv")
		d, err := lots.ReadFile(file, lots.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		for _, by := range []lots.GroupBy{lots.ByLot, lots.ByHeat} {
			for _, mat := range []string{"QT bar OH-S42", "plate oh-a61", ""} {
				o := equivalence.Options{Mean: mu, SD: sd, Alpha: 0.05, Property: "tensile", Material: mat, AllMaterials: mat == ""}
				what := fmt.Sprintf("%s by %s, material %q", name, by, mat)
				var keep func(*lots.Specimen) bool
				if mat != "" {
					keep = func(s *lots.Specimen) bool { return strings.EqualFold(s.Material, mat) }
				}
				groups, err := d.Group(by, keep)
				if err != nil {
					t.Fatal(err)
				}
				var got bytes.Buffer
				err = runEquivalence(equivalenceOptions{Data: file, Test: o, Input: inputOptions{GroupBy: string(by)}, Out: output{Format: render.JSON, System: units.SI}},
					streams{Out: &got, Err: io.Discard})
				if _, verdict := err.(verdictError); err != nil && !verdict {
					t.Fatalf("%s: %v", what, err)
				}
				var res equivalence.Result
				if err := json.Unmarshal(got.Bytes(), &res); err != nil {
					t.Fatal(err)
				}
				if len(res.Lots) != len(groups) {
					t.Fatalf("%s: %d lots, want %d", what, len(res.Lots), len(groups))
				}
				p := d.Property("tensile")
				for i, g := range groups {
					vals, _ := d.Values(p, g.Specimens)
					l := res.Lots[i]
					mean, mn := 0.0, math.Inf(1)
					for _, v := range vals {
						mean += v / float64(len(vals))
						mn = math.Min(mn, v)
					}
					if l.Lot != g.Key || l.N != len(vals) || len(vals) >= 2 && (math.Abs(float64(l.Mean)-mean) > 1e-9*mean || float64(l.Min) != mn) {
						t.Errorf("%s: lot %d is %s n %d mean %v min %v, want %s n %d mean %v min %v", what, i, l.Lot, l.N, l.Mean, l.Min, g.Key, len(vals), mean, mn)
						continue
					}
					if len(vals) < 2 {
						continue
					}
					f, ok := factors[len(vals)]
					if !ok {
						if f, err = stats.MeanMinFactors(len(vals), 0.05); err != nil {
							t.Fatal(err)
						}
						factors[len(vals)] = f
					}
					if math.Abs(float64(l.MeanLimit)-(mu-f.KMean*sd)) > 1e-9*mu || math.Abs(float64(l.MinLimit)-(mu-f.KMin*sd)) > 1e-9*mu {
						t.Errorf("%s: lot %s limits %v %v", what, l.Lot, l.MeanLimit, l.MinLimit)
					}
				}
				// The table for people: the same from the file and from a
				// pipe (read into the column store at once).
				if mat == "" {
					continue
				}
				var fromFile, fromPipe bytes.Buffer
				out := output{Format: render.Text, System: units.SI}
				runEquivalence(equivalenceOptions{Data: file, Test: o, Input: inputOptions{GroupBy: string(by)}, Out: out}, streams{Out: &fromFile, Err: io.Discard})
				runEquivalence(equivalenceOptions{Data: "-", Test: o, Input: inputOptions{GroupBy: string(by)}, Out: out},
					streams{In: pipeReader{strings.NewReader(files[name])}, Out: &fromPipe, Err: io.Discard})
				a := strings.ReplaceAll(fromFile.String(), file, "-")
				if a != fromPipe.String() || !strings.Contains(a, "Lots (tensile)") {
					t.Errorf("%s: the table from the file and from a pipe differ:\n%s\n---\n%s", what, a, fromPipe.String())
				}
			}
		}
	}
}

// The ordered sink writes results in the order they are put, on its own
// goroutine; after the writer fails, put refuses more and stop returns
// the writer's own error.
func TestOrderedSink(t *testing.T) {
	var got []string
	boom := errors.New("disk full")
	s := newOrderedSink(func(r *acceptance.LotResult) error {
		if r.Lot == "L3" {
			return boom
		}
		got = append(got, r.Lot)
		return nil
	})
	refused := false
	for i := range 200 {
		if err := s.put(&acceptance.LotResult{Lot: fmt.Sprint("L", i)}); err != nil {
			refused = true
			break
		}
	}
	if err := s.stop(); err != boom {
		t.Errorf("stop: %v, want the writer's error", err)
	}
	if strings.Join(got, " ") != "L0 L1 L2" {
		t.Errorf("written %v, want L0 L1 L2", got)
	}
	if !refused {
		t.Log("every put was taken before the failure was seen (the channel holds 64)")
	}
	if s.stop() != nil || (*orderedSink)(nil).stop() != nil {
		t.Error("stop again, or on no sink: an error")
	}
}
