package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/user"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/render"
	"lotproof/lots/store"
	"lotproof/spec"
)

type recordOptions struct {
	Data  string
	Input inputOptions
	Specs []string // specification files
	DB    string   // database URL or SQLite file ("" = $LOTPROOF_DB or lotproof.db)
	Out   output
	Now   func() time.Time // clock (injected by tests); nil = time.Now
	User  string           // who records ("" = $USER or the login name)
}

func newRecordCmd(g *globalOptions, st streams) *cobra.Command {
	var o recordOptions
	cmd := &cobra.Command{
		Use:   "record DATA [DATA...] [--spec S.yaml ...] [--db URL]",
		Short: "Add a results file (and, with a specification, its lot verdicts) to the lot history",
		Long: `record stores the specimens and lots of a results file in the lot history
database, with the time, the user and the file's SHA-256. With --spec it also
stores each lot's verdict against its specification and the limits used, so
that trend can compute Ppk against the minimum.

The database is a SQLite file: lotproof.db in the current folder, or the file
named by $LOTPROOF_DB, or by --db. --db postgres://user@host:port/name uses a
shared PostgreSQL server instead.

One file is one transaction: it is stored completely or not at all.
Recording the same file again changes nothing (matched on its SHA-256); a
specimen already stored with identical values is skipped. A specimen id
already stored with different values is a conflict: both values are shown,
nothing is written and the exit status is 2.`,
		Args: dataArgs,
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			o.Data, o.Input.More = args[0], args[1:]
			return runRecord(o, st)
		}),
	}
	cmd.Long += multiFileHelp
	addInputFlags(cmd, &o.Input)
	cmd.Flags().StringArrayVar(&o.Specs, "spec", nil, "purchase specification file (YAML); repeat for several materials")
	cmd.Flags().StringVar(&o.DB, "db", "", "database: a SQLite file or postgres://... URL (default: $LOTPROOF_DB or lotproof.db)")
	return cmd
}

func init() { register(newRecordCmd) }

// recordResult is what record reports.
type recordResult struct {
	Database string `json:"database"`
	Schema   int    `json:"schema_version"`
	store.RecordResult
	Specs  []string `json:"specs"`
	Judged bool     `json:"judged"` // verdicts were computed and stored
	Note   string   `json:"note,omitempty"`
}

// currentUser is $USER, else the login name from the system, else "unknown".
func currentUser() string {
	if u := os.Getenv("USER"); u != "" {
		return u
	}
	if u, err := user.Current(); err == nil && u.Username != "" {
		return u.Username
	}
	return "unknown"
}

func runRecord(o recordOptions, st streams) error {
	// Problems with the data are reported before those with the
	// specifications (which are then not used for reading).
	specs, specErr := spec.ReadFiles(o.Specs)
	if specErr != nil {
		specs = nil
	}
	var err error
	var in store.RecordInput
	var verdicts []store.Verdict
	var judged bool
	var note string
	if o.Data != "-" && len(o.Input.More) == 0 && !strings.EqualFold(filepath.Ext(o.Data), ".xlsx") {
		in, verdicts, judged, note, err = streamRecordInput(o, st, specs)
	} else {
		in, verdicts, judged, note, err = readRecordInput(o, st, specs)
	}
	if err != nil {
		return err
	}
	if in.Specimens == 0 {
		return lots.Inputf(in.Source, "give a file with at least one specimen row", "no specimens to record")
	}
	if specErr != nil {
		return specErr
	}
	now := o.Now
	if now == nil {
		now = time.Now
	}
	who := o.User
	if who == "" {
		who = currentUser()
	}
	ctx := context.Background()
	s, err := store.Open(ctx, store.ResolveURL(o.DB))
	if err != nil {
		return usageError{err}
	}
	defer s.Close()
	r, err := s.RecordStream(ctx, in, verdicts, store.LimitsOf(specs), store.Meta{Time: now(), User: who, Version: lots.Version})
	if err != nil {
		var ce *store.ConflictError
		if errors.As(err, &ce) {
			return conflictProblems(ce)
		}
		return err
	}
	v, err := s.SchemaVersion(ctx)
	if err != nil {
		return err
	}
	res := recordResult{Database: s.Where(), Schema: v, RecordResult: *r, Judged: judged, Note: note, Specs: []string{}}
	for _, sp := range specs {
		res.Specs = append(res.Specs, sp.Label())
	}
	if r.AlreadyRecorded {
		fmt.Fprintf(st.Err, "lotproof: %s (SHA-256 %s) was already recorded on %s by %s; nothing changed\n", in.Source, in.Digest[:12], r.ImportedAt, r.User)
	} else {
		fmt.Fprintf(st.Err, "lotproof: recorded %s in %s: %d new specimens, %d already stored (%d of them given %d new values), %d new lots, %d verdicts\n",
			in.Source, s.Where(), r.SpecimensNew, r.SpecimensSame, r.SpecimensAdded, r.ValuesAdded, r.LotsNew, r.Verdicts)
	}
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		return writeTables(w, o.Out.Format, recordTable(res))
	})
}

// conflictProblems turns a store conflict into an input error.
func conflictProblems(ce *store.ConflictError) error {
	e := &lots.InputError{More: ce.More}
	for _, c := range ce.Conflicts {
		where := ce.Source
		if c.Line > 0 {
			where += ":" + strconv.Itoa(c.Line)
		}
		e.Problems = append(e.Problems, lots.Problem{Where: where, What: c.String(),
			Fix: "nothing was written; correct the file, or give the specimen a new id if it is a different specimen"})
	}
	return e
}

func recordTable(r recordResult) *render.Table {
	t := render.NewTable("Recorded", "item", "value")
	t.Add("database", r.Database)
	t.Add("schema version", strconv.Itoa(r.Schema))
	t.Add("file", r.Source)
	t.Add("sha256", r.Digest)
	t.Add("already recorded", strconv.FormatBool(r.AlreadyRecorded))
	t.Add("recorded at", r.ImportedAt)
	t.Add("recorded by", r.User)
	t.Add("specimens new", strconv.Itoa(r.SpecimensNew))
	t.Add("specimens already stored", strconv.Itoa(r.SpecimensSame))
	t.Add("of them given new values", strconv.Itoa(r.SpecimensAdded))
	t.Add("values added", strconv.Itoa(r.ValuesAdded))
	t.Add("lots new", strconv.Itoa(r.LotsNew))
	t.Add("verdicts stored", strconv.Itoa(r.Verdicts))
	t.Add("spec limits stored", strconv.Itoa(r.SpecLimits))
	if r.Note != "" {
		t.Note("%s", r.Note)
	}
	return t
}

// readRecordInput reads the data whole (several files combined by
// specimen id, a workbook, standard input) and judges its lots.
func readRecordInput(o recordOptions, st streams, specs []*spec.Spec) (store.RecordInput, []store.Verdict, bool, string, error) {
	d, by, err := readData(o.Data, o.Input, st)
	if err != nil {
		return store.RecordInput{}, nil, false, "", err
	}
	verdicts, judged, note, err := judgeLots(d, specs, by)
	return store.DatasetInput(d), verdicts, judged, note, err
}

// streamRecordInput reads one results file lot by lot (lots.ScanLotsFile,
// bounded memory), judging the lots as they come, and returns a
// RecordInput that reads the file again as it is recorded
// (lots.RescanFile, which checks that the file is unchanged).
func streamRecordInput(o recordOptions, st streams, specs []*spec.Spec) (store.RecordInput, []store.Verdict, bool, string, error) {
	by, err := lots.ParseGroupBy(o.Input.GroupBy)
	if err != nil {
		return store.RecordInput{}, nil, false, "", usageError{err}
	}
	judge := len(specs) > 0 && by == lots.ByLot
	var j *acceptance.Judging
	var specErr error
	count := 0
	scanIn := o.Input
	scanIn.GroupBy = string(lots.ByLot) // verdicts are per lot; heats need not be given
	d, _, err := scanLots(o.Data, scanIn, st, func(d *lots.Dataset) {
		count = 0
		if j != nil {
			j.Stop()
			j = nil
		}
		if judge && specErr == nil {
			j, specErr = acceptance.Start(d, specs, by)
		}
	}, func(l *lots.Lot) error {
		count += l.Len()
		if j != nil {
			j.Add(l)
		}
		return nil
	})
	if err == nil {
		err = specErr
	}
	if err != nil {
		if j != nil {
			j.Stop()
		}
		return store.RecordInput{}, nil, false, "", err
	}
	in := store.RecordInput{Digest: d.Digest, Source: d.Source, Properties: d.Properties, Specimens: count,
		Each: func(fn func(*lots.Specimen) error) error { return lots.RescanFile(o.Data, d.Digest, fn) }}
	if len(specs) == 0 {
		return in, nil, false, "", nil
	}
	if !judge {
		return in, nil, false, headingNote, nil
	}
	res, err := j.Finish(d)
	if err != nil {
		return store.RecordInput{}, nil, false, "", err
	}
	verdicts, note := verdictsOf(res)
	return in, verdicts, true, note, nil
}

// judgeLots computes each lot's verdict against its specification with
// package acceptance. Verdicts are stored per lot, so a file judged by
// heat stores its limits but no verdicts.
func judgeLots(d *lots.Dataset, specs []*spec.Spec, by lots.GroupBy) ([]store.Verdict, bool, string, error) {
	if len(specs) == 0 {
		return nil, false, "", nil
	}
	if by != lots.ByLot {
		return nil, false, headingNote, nil
	}
	res, err := acceptance.Judge(d, specs, by)
	if err != nil {
		return nil, false, "", err
	}
	out, note := verdictsOf(res)
	return out, true, note, nil
}

// headingNote says why a file judged by heat has no verdicts stored.
const headingNote = "verdicts are recorded per lot; with --group-by heat only the specification limits were stored"

// verdictsOf returns the lots' verdicts to store and the note that counts them.
func verdictsOf(res *acceptance.Result) ([]store.Verdict, string) {
	out := make([]store.Verdict, 0, len(res.Lots))
	for _, l := range res.Lots {
		out = append(out, store.Verdict{Lot: l.Lot, Spec: l.Spec, Verdict: l.Verdict})
	}
	return out, fmt.Sprintf("verdicts: %d conforming, %d nonconforming, %d undecided, %d not judged (lotproof accept shows the reasons)",
		res.Counts.Conforming, res.Counts.Nonconforming, res.Counts.Undecided, res.Counts.NotJudged)
}
