package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/acceptance"
	"lotproof/lots/render"
	"lotproof/lots/units"
	"lotproof/spec"
)

type acceptOptions struct {
	Data  string
	Specs []string
	Input inputOptions
	Table tableOption
	Out   output
}

func newAcceptCmd(g *globalOptions, st streams) *cobra.Command {
	var o acceptOptions
	cmd := &cobra.Command{
		Use:   "accept DATA [DATA...] --spec SPEC.yaml [--spec SPEC2.yaml ...]",
		Short: "Judge every lot against its purchase specification with stated confidence",
		Long: `accept judges every lot (or heat) of a specimen results file against the
specification whose material matches the lot's material (see spec/SCHEMA.md).

For each lot and limit it prints n, mean, SD, the extreme individual value,
a one-sided confidence bound on the mean, the one-sided normal tolerance
bound at the specification's content p and confidence gamma, the estimated
fraction beyond the limit (Lieberman-Resnikoff minimum-variance unbiased
estimator) with its upper confidence bound (noncentral t), and a verdict:

  conforming     the tolerance bound meets the limit (at least p of the lot
                 meets it with confidence gamma), with enough specimens and
                 no rejecting individual value;
  nonconforming  an individual value is beyond the limit (when the
                 specification rejects on individual values), or the data
                 show with confidence gamma that more than 1-p of the lot is
                 beyond the limit;
  undecided      neither: the confidence is not reached. The number of
                 specimens that would reach it at the observed mean and SD
                 is given, or "not reachable" when the mean is too close to
                 the limit.

The lot's verdict is its worst limit's. Each lot is screened with the
maximum normed residual test (alpha 0.05); flagged values are reported and
kept. Exit status: 0 when every lot conforms, 1 when any lot is
nonconforming, undecided or not judged, 2 on bad input.`,
		Args: dataArgs,
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			o.Data, o.Input.More = args[0], args[1:]
			return runAccept(o, st)
		}),
	}
	cmd.Flags().StringArrayVar(&o.Specs, "spec", nil, "specification file (YAML); repeat for several materials")
	cmd.Long += multiFileHelp
	addInputFlags(cmd, &o.Input)
	addTableFlag(cmd, &o.Table, acceptTableNames...)
	return cmd
}

func init() { register(newAcceptCmd) }

// readSpecs reads the specification files a judgement needs (at least one).
func readSpecs(names []string) ([]*spec.Spec, error) {
	if len(names) == 0 {
		return nil, usageError{fmt.Errorf("give at least one --spec file")}
	}
	return spec.ReadFiles(names)
}

func runAccept(o acceptOptions, st streams) error {
	o.Table.names = acceptTableNames
	if err := o.Table.check(); err != nil {
		return err
	}
	specs, err := readSpecs(o.Specs)
	if err != nil {
		return err
	}
	var res *acceptance.Result
	switch o.Out.Format {
	case render.CSV, render.JSON:
		// Each lot is written as soon as it is judged and dropped, so
		// that memory does not grow with the number of lots.
		res, err = acceptStreamed(o, st, specs)
	default:
		res, err = acceptKept(o, st, specs)
	}
	if err != nil {
		return err
	}
	if c := res.Counts; c.Nonconforming+c.Undecided+c.NotJudged > 0 {
		n := c.Conforming + c.Nonconforming + c.Undecided + c.NotJudged
		return verdictError{fmt.Sprintf("%d of %d lots conforming, %d nonconforming, %d undecided, %d not judged",
			c.Conforming, n, c.Nonconforming, c.Undecided, c.NotJudged)}
	}
	return nil
}

// acceptKept judges every lot, keeps the results and writes them (a table
// for people: the values' resolutions are known only at the end).
func acceptKept(o acceptOptions, st streams, specs []*spec.Spec) (*acceptance.Result, error) {
	var rs render.Resolutions // for tables people read only
	if o.Out.Format == render.Text {
		rs = render.Resolutions{}
	}
	res, err := judgeStream(o.Data, o.Input, st, specs, rs, o.Out.System, func() {}, nil)
	if err != nil {
		return nil, err
	}
	// The judgement is only shown: convert it in place (no second copy of
	// a large result).
	res.DisplayInPlace(o.Out.System)
	return res, emit(st.Out, func(w io.Writer) error { return writeShown(w, res, rs, o.Table, o.Out) })
}

// acceptStreamed judges the lots and writes each one's CSV rows or JSON as
// soon as it is judged, into a spill buffer (nothing partial is written
// when the input turns out bad), and then writes the whole.
func acceptStreamed(o acceptOptions, st streams, specs []*spec.Spec) (*acceptance.Result, error) {
	defer streamingGC()()
	by, _ := lots.ParseGroupBy(o.Input.GroupBy)
	var buf *spillBuffer
	defer func() { buf.close() }()
	var lay *acceptLayout
	var cw *csv.Writer
	var items *render.JSONItems
	dis := acceptance.NewDisplay(o.Out.System)
	table := o.Table.Name
	if table == "" {
		table = acceptTableNames[0]
	}
	// write makes one lot's rows or item.
	write := func(l *acceptance.LotResult) error {
		if items != nil {
			dis.Lot(l)
			return items.Add(l)
		}
		if table != "lots" { // the lots table shows no values in units
			dis.Lot(l)
		}
		lay.add(l)
		return lay.table(table).WriteCSVRows(cw)
	}
	// The rows or items are made on a goroutine of their own, in the
	// order of the lots, so that encoding (JSON especially) does not hold
	// up the reading.
	var sink *orderedSink
	// begin starts over (the input is read again when it turns out not
	// to be grouped by lot).
	begin := func() {
		sink.stop()
		defer func() { sink = newOrderedSink(write) }() // once the writers are set up
		buf.close()
		buf = &spillBuffer{}
		if o.Out.Format == render.JSON {
			items = render.NewJSONItems(buf)
			return
		}
		lay = newAcceptLayout(string(by), nil, specs, func(name string) bool { return name == table })
		lay.table(table).CSVOnly = true
		cw = csv.NewWriter(buf)
		cw.Write(lay.table(table).Columns)
	}
	deliver := func(l *acceptance.LotResult) error { return sink.put(l) }
	res, err := judgeStream(o.Data, o.Input, st, specs, nil, o.Out.System, begin, deliver)
	if e := sink.stop(); e != nil {
		err = e // the writer's own error, rather than its echo
	}
	if err != nil {
		return nil, err
	}
	if buf == nil { // no pass over the input began
		begin()
		sink.stop()
	}
	if items != nil && items.Len() == 0 {
		return res, render.WriteJSON(st.Out, res)
	}
	if items != nil {
		if err := items.Flush(); err != nil {
			return nil, err
		}
		return res, render.WriteJSONListItems(st.Out, res, "lots", items.Len(), buf.writeTo)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return nil, err
	}
	return res, buf.writeTo(st.Out)
}

// writeAccept writes a judgement in the output's format and units; rs are
// the properties' resolutions for the tables people read.
func writeAccept(w io.Writer, res *acceptance.Result, rs render.Resolutions, table tableOption, out output) error {
	return writeShown(w, res.Display(out.System), rs, table, out)
}

// writeShown writes a judgement already in display units.
func writeShown(w io.Writer, shown *acceptance.Result, rs render.Resolutions, table tableOption, out output) error {
	if out.Format == render.JSON {
		// The lots one at a time: the text of a hundred thousand lots
		// need not be built whole in memory.
		if len(shown.Lots) == 0 {
			return render.WriteJSON(w, shown)
		}
		head := *shown
		head.Lots = nil
		return render.WriteJSONList(w, &head, "lots", len(shown.Lots), func(i int) any { return &shown.Lots[i] })
	}
	tables, err := table.pick(out.Format, acceptTables(shown, rs, func(name string) bool { return table.wanted(out.Format, name) }))
	if err != nil {
		return err
	}
	return writeTables(w, out.Format, tables...)
}

// judgeStream reads the results file one lot at a time and judges the lots
// in parallel as they come (acceptance.Judging); the errors are those of
// reading the whole file and then calling acceptance.Judge. The values'
// resolutions in the units of sys go into rs (when not nil). begin is
// called before every pass over the input (what was delivered before is
// void then). With deliver, each lot's result goes to it as soon as it is
// judged (in order) instead of into the result.
func judgeStream(name string, in inputOptions, st streams, specs []*spec.Spec, rs render.Resolutions, sys units.System, begin func(), deliver func(*acceptance.LotResult) error) (*acceptance.Result, error) {
	var j *acceptance.Judging
	var props []lots.Property
	var specErr error
	by, _ := lots.ParseGroupBy(in.GroupBy)
	d, _, err := scanLots(name, in, st, func(d *lots.Dataset) {
		if j != nil {
			j.Stop()
		}
		begin()
		j, specErr = acceptance.Start(d, specs, by)
		if j != nil && deliver != nil {
			j.Deliver(deliver)
		}
		props = d.Properties
	}, func(l *lots.Lot) error {
		if rs != nil {
			addLotResolutions(rs, props, l, sys)
		}
		if j != nil {
			j.Add(l)
		}
		return nil
	})
	if j != nil && (err != nil || specErr != nil) {
		j.Stop()
	}
	var ge *lots.GroupError
	switch {
	case err != nil && !errors.As(err, &ge):
		return nil, err
	case specErr != nil:
		return nil, specErr
	case ge != nil:
		where := strings.Join(append([]string{name}, in.More...), " + ") // the source, as lots.Merge names it
		return nil, lots.Inputf(where, "group by lot, or fill the heat column", "%v", err)
	}
	return j.Finish(d)
}

// acceptTables lays the result out as a lot table, a limit table and an
// outlier table (hidden in text when no value was flagged).
// acceptTableNames are the tables of accept, the first the default for CSV.
var acceptTableNames = []string{"lots", "limits", "outliers"}

func acceptTables(r *acceptance.Result, rs render.Resolutions, want func(name string) bool) []*render.Table {
	lay := newAcceptLayout(r.GroupBy, rs, nil, want)
	lay.minN = r.MinSpecimens
	for i := range r.Lots {
		lay.add(&r.Lots[i])
	}
	return lay.finish(r)
}

// acceptLayout lays lots out as rows of the lot, limit and outlier tables,
// one lot at a time; finish adds the notes.
type acceptLayout struct {
	lt, pt, ot          *render.Table
	wantL, wantP, wantO bool
	rs                  render.Resolutions
	minN                func(spec string) int
	retests             []string
	n                   int
}

// newAcceptLayout makes the tables (by is the grouping column); only the
// tables want names get rows (a CSV stream holds one: formatting the
// others is most of the time spent here). The fewest specimens of a lot's
// specification come from specs.
func newAcceptLayout(by string, rs render.Resolutions, specs []*spec.Spec, want func(name string) bool) *acceptLayout {
	lt := render.NewTable("Lot verdicts", by, "supplier", "material", "spec", ">n", "verdict", "reasons")
	pt := render.NewTable("Limits", by, "property", "side", "unit", ">limit", ">n", ">mean", ">sd", ">extreme", ">mean bound", ">k", ">tol. bound", ">frac. est", ">frac. upper", "verdict", ">needed n")
	lt.Name, pt.Name = "lots", "limits"
	ot := render.NewTable("Values flagged by the maximum normed residual test (alpha 0.05; kept in the figures)", by, "specimen", "property", "unit", ">value", ">MNR", ">critical", ">line")
	ot.Name = "outliers"
	minN := map[string]int{}
	for _, s := range specs {
		minN[s.Label()] = s.Acceptance.MinSpecimens
	}
	return &acceptLayout{lt: lt, pt: pt, ot: ot, wantL: want(lt.Name), wantP: want(pt.Name), wantO: want(ot.Name), rs: rs,
		minN: func(spec string) int { return minN[spec] }}
}

// table returns the table called name.
func (a *acceptLayout) table(name string) *render.Table {
	switch name {
	case a.pt.Name:
		return a.pt
	case a.ot.Name:
		return a.ot
	}
	return a.lt
}

// add lays out one lot (in display units).
func (a *acceptLayout) add(l *acceptance.LotResult) {
	a.n++
	why, retest := acceptance.DecisiveReasons(*l, a.minN(l.Spec))
	if retest != "" && !slices.Contains(a.retests, retest) {
		a.retests = append(a.retests, retest)
	}
	if a.wantL {
		a.lt.Add(l.Lot, l.Supplier, l.Material, l.Spec, strconv.Itoa(l.N), l.Verdict, why)
	}
	for _, p := range l.Properties {
		if !a.wantP {
			break
		}
		need := ""
		switch {
		case p.NeededN < 0:
			need = "not reachable"
		case p.NeededN > acceptance.MaxPlannedSpecimens:
			need = ">" + strconv.Itoa(acceptance.MaxPlannedSpecimens)
		case p.NeededN > 0:
			need = strconv.Itoa(p.NeededN)
		}
		r := a.rs.Of(l.Material, p.Property)
		a.pt.Add(l.Lot, p.Property, p.Side, p.Unit, r.Given(float64(p.Limit)), strconv.Itoa(p.N),
			r.Stat(float64(p.Mean)), r.Spread(float64(p.SD)), r.Given(float64(p.Extreme)),
			r.Stat(float64(p.MeanBound)), render.Factor(float64(p.K)), r.Stat(float64(p.ToleranceBound)),
			render.Fraction(float64(p.FractionEstimate)), render.Fraction(float64(p.FractionUpper)), p.Verdict, need)
	}
	for _, f := range l.Outliers {
		if !a.wantO {
			break
		}
		a.ot.Add(l.Lot, f.Specimen, f.Property, f.Unit, a.rs.Of(l.Material, f.Property).Given(float64(f.Value)), render.Factor(f.MNR), render.Factor(f.Critical), strconv.Itoa(f.Line))
	}
}

// finish adds the notes of r (its lots laid out) and returns the tables.
func (a *acceptLayout) finish(r *acceptance.Result) []*render.Table {
	lt, pt, ot := a.lt, a.pt, a.ot
	c := r.Counts
	lt.Note("%d lots: %d conforming, %d nonconforming, %d undecided, %d not judged.", a.n, c.Conforming, c.Nonconforming, c.Undecided, c.NotJudged)
	for _, s := range r.Specs {
		lt.Note("Specification %s rev %s (%s): content %g, confidence %g, at least %d specimens.", s.ID, s.Revision, s.Material, s.Content, s.Confidence, s.MinN)
	}
	for _, rt := range a.retests {
		lt.Note("Retest: %s (for a lot that is not conforming).", rt)
	}
	lt.Note("Source %s, SHA-256 %s.", r.Source, r.Digest)
	pt.Note("Method: %s.", r.Method)
	ot.Hidden = len(ot.Rows) == 0
	last := ot
	if ot.Hidden {
		last = pt
	}
	for _, c := range r.Cautions {
		last.Note("Caution: %s", c)
	}
	return []*render.Table{lt, pt, ot}
}

// orderedSink hands results to fn on a goroutine of its own, in the order
// they are put.
type orderedSink struct {
	ch     chan acceptance.LotResult
	done   chan struct{}
	err    error // fn's first error; read after done
	failed atomic.Bool
}

// errSinkFailed is what put returns once fn has failed; stop returns
// fn's error itself.
var errSinkFailed = errors.New("writing the output failed")

func newOrderedSink(fn func(*acceptance.LotResult) error) *orderedSink {
	s := &orderedSink{ch: make(chan acceptance.LotResult, 64), done: make(chan struct{})}
	go func() {
		defer close(s.done)
		for r := range s.ch {
			if s.err == nil {
				if s.err = fn(&r); s.err != nil {
					s.failed.Store(true)
				}
			}
		}
	}()
	return s
}

// put queues a copy of r (the caller may reuse r; what it points to is
// left alone from then on).
func (s *orderedSink) put(r *acceptance.LotResult) error {
	if s.failed.Load() {
		return errSinkFailed
	}
	s.ch <- *r
	return nil
}

// stop waits until every result is written and returns fn's error. It
// does nothing on a nil or stopped sink.
func (s *orderedSink) stop() error {
	if s == nil || s.ch == nil {
		return nil
	}
	close(s.ch)
	<-s.done
	s.ch = nil
	return s.err
}
