package serve

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"html/template"
	"math"
	"net/http"
	"net/url"
	"sort"
	"strconv"
	"strings"

	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/report"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
	"lotproof/stats"
)

// reqCtx is what every page needs from its request.
type reqCtx struct {
	sys  units.System
	json bool
	r    *http.Request
}

// reply is a page: its JSON value, or its template and data.
type reply struct {
	json  any
	raw   []byte // JSON already encoded (cached), instead of json
	tmpl  string
	title string
	data  any
}

// httpError is an error with a status shown to the visitor as is.
type httpError struct {
	status int
	msg    string
}

func (e *httpError) Error() string { return e.msg }

func notFound(format string, args ...any) error {
	return &httpError{http.StatusNotFound, fmt.Sprintf(format, args...)}
}

func badRequest(format string, args ...any) error {
	return &httpError{http.StatusBadRequest, fmt.Sprintf(format, args...)}
}

// Frame is what the layout shows around every page.
type Frame struct {
	Title    string
	U        string // query suffix that keeps the unit system in links ("" or "?units=us")
	Units    string // "SI" or "US customary"
	Other    string // link to this page in the other unit system
	OtherSys string
	JSON     string // link to this page as JSON
	Query    string // search box text
	Cautions []string
	Version  string
	Where    string
	Body     template.HTML
}

func (s *Server) page(f func(c *reqCtx) (*reply, error)) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		c := &reqCtx{sys: units.SI, r: r}
		q := r.URL.Query()
		switch q.Get("format") {
		case "", "html":
		case "json":
			c.json = true
		default:
			s.fail(w, c, badRequest("unknown format %q: use ?format=json or leave it out for the page", q.Get("format")))
			return
		}
		if u := q.Get("units"); u != "" {
			sys, err := units.ParseSystem(u)
			if err != nil {
				s.fail(w, c, badRequest("unknown unit system %q: use ?units=si or ?units=us", u))
				return
			}
			c.sys = sys
		}
		rep, err := f(c)
		if err != nil {
			s.fail(w, c, err)
			return
		}
		if c.json && rep.raw != nil {
			w.Header().Set("Content-Type", "application/json; charset=utf-8")
			w.Write(rep.raw)
			return
		}
		if c.json {
			s.writeJSON(w, http.StatusOK, rep.json)
			return
		}
		s.writePage(w, c, http.StatusOK, rep.title, rep.tmpl, rep.data)
	}
}

func (s *Server) writeJSON(w http.ResponseWriter, status int, v any) {
	var b bytes.Buffer
	if err := render.WriteJSON(&b, v); err != nil {
		fmt.Fprintf(s.log, "lotproof serve: writing JSON: %v\n", err)
		http.Error(w, "lotproof serve: internal error", http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.WriteHeader(status)
	w.Write(b.Bytes())
}

func (s *Server) writePage(w http.ResponseWriter, c *reqCtx, status int, title, name string, data any) {
	var body bytes.Buffer
	if err := pages.ExecuteTemplate(&body, name, data); err != nil {
		fmt.Fprintf(s.log, "lotproof serve: page %s: %v\n", name, err)
		http.Error(w, "lotproof serve: internal error", http.StatusInternalServerError)
		return
	}
	fr := s.frame(c, title)
	fr.Body = template.HTML(body.String()) // made by the html/template above
	var b bytes.Buffer
	if err := pages.ExecuteTemplate(&b, "layout", fr); err != nil {
		fmt.Fprintf(s.log, "lotproof serve: layout: %v\n", err)
		http.Error(w, "lotproof serve: internal error", http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.WriteHeader(status)
	// Declared UTF-8: invalid bytes of stored ids show as U+FFFD.
	w.Write(bytes.ToValidUTF8(b.Bytes(), []byte("\uFFFD")))
}

func (s *Server) frame(c *reqCtx, title string) Frame {
	fr := Frame{Title: title, Version: lots.Version, Where: s.db.Where(), Units: "SI", OtherSys: "US customary",
		Cautions: []string{lots.Caution}}
	if c.sys == units.US {
		fr.U, fr.Units, fr.OtherSys = "?units=us", "US customary", "SI"
	}
	q := c.r.URL.Query()
	fr.Query = q.Get("q")
	q.Del("format")
	if c.sys == units.US {
		q.Del("units")
	} else {
		q.Set("units", "us")
	}
	fr.Other = withQuery(c.r.URL.EscapedPath(), q)
	q = c.r.URL.Query()
	q.Set("format", "json")
	fr.JSON = withQuery(c.r.URL.EscapedPath(), q)
	return fr
}

func withQuery(path string, q url.Values) string {
	if len(q) == 0 {
		return path
	}
	return path + "?" + q.Encode()
}

// fail answers with an error page (or JSON {"error": ...}).
func (s *Server) fail(w http.ResponseWriter, c *reqCtx, err error) {
	var he *httpError
	if !errors.As(err, &he) {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			he = &httpError{http.StatusServiceUnavailable, "the request was cancelled or took too long"}
		} else {
			fmt.Fprintf(s.log, "lotproof serve: %s: %v\n", c.r.URL.Path, err)
			he = &httpError{http.StatusInternalServerError, "the lot history could not be read; the server log says why"}
		}
	}
	if c.json {
		s.writeJSON(w, he.status, map[string]string{"error": he.msg})
		return
	}
	s.writePage(w, c, he.status, http.StatusText(he.status), "error", struct{ Msg string }{he.msg})
}

// view returns the trend view of the database as it is now.
func (s *Server) view(c *reqCtx) (*view, error) {
	snap, err := s.cache.get(c.r.Context())
	if err != nil {
		return nil, err
	}
	return snap.view(c.sys, s.opt.Recent), nil
}

// ---- overview ----

type overviewData struct {
	*Overview
	U string
}

func (s *Server) overview(c *reqCtx) (*reply, error) {
	v, err := s.view(c)
	if err != nil {
		return nil, err
	}
	return &reply{json: v.overview, tmpl: "overview", title: "Suppliers by " + v.trend.Every, data: overviewData{v.overview, uq(c)}}, nil
}

func uq(c *reqCtx) string {
	if c.sys == units.US {
		return "?units=us"
	}
	return ""
}

// ---- supplier ----

// SupplierPage is the supplier page.
type SupplierPage struct {
	Supplier   string         `json:"supplier"`
	Period     string         `json:"period"` // the period chosen, "" for all
	Every      string         `json:"every"`
	Units      string         `json:"units"`
	Materials  []string       `json:"materials"`
	Periods    []trend.Period `json:"periods"`
	Signals    []trend.Signal `json:"signals"`
	Series     []trend.Series `json:"series"`     // with a period chosen, the points of its lots only
	Lots       []LotRef       `json:"lots"`       // latest first; the chosen period's lots, or the latest MaxLatestLots
	LotsTotal  int            `json:"lots_total"` // lots of the supplier (in the chosen period)
	Methods    []string       `json:"methods"`
	Warnings   []string       `json:"warnings"`
	Caution    string         `json:"caution"`
	Cautions   []string       `json:"cautions"`
	ChartsNote string         `json:"-"`
}

// MaxLatestLots is how many latest lots the supplier page lists; MaxChartLots
// how many latest lots its charts show.
const (
	MaxLatestLots = 30
	MaxChartLots  = 120
)

type supplierData struct {
	*SupplierPage
	U       string
	Figures []figureGroup
}

type figureGroup struct {
	Title   string
	Figures []shownFigure
	Notes   []string
}

type shownFigure struct {
	Num            int
	Title, Caption string
	SVG            template.HTML
}

func (s *Server) supplier(c *reqCtx) (*reply, error) {
	v, err := s.view(c)
	if err != nil {
		return nil, err
	}
	g := c.r.PathValue("name")
	if _, ok := v.rows[g]; !ok {
		return nil, notFound("no supplier %q in the lot history", g)
	}
	period := c.r.URL.Query().Get("period")
	if c.json && period == "" {
		if b, ok := v.supplierJSON.Load(g); ok {
			return &reply{raw: b.([]byte)}, nil
		}
	}
	r := v.trend
	p := &SupplierPage{Supplier: g, Period: period, Every: r.Every, Units: string(v.sys), Periods: []trend.Period{}, Signals: []trend.Signal{},
		Series: []trend.Series{}, Materials: v.overviewRow(g).Materials, Methods: r.Methods, Warnings: r.Warnings, Caution: r.Caution,
		Cautions: []string{lots.Caution, r.Caution}}
	known := false
	for _, i := range v.rows[g] {
		p.Periods = append(p.Periods, r.Periods[i])
		known = known || r.Periods[i].Period == period
	}
	if period != "" && !known {
		return nil, notFound("supplier %q has no lots in period %q", g, period)
	}
	for _, i := range v.signals[g] {
		if period == "" || r.Signals[i].Period == period {
			p.Signals = append(p.Signals, r.Signals[i])
		}
	}
	for _, i := range v.series[g] {
		sr := r.Series[i]
		if period != "" { // the chosen period's lots only
			var pts []trend.Point
			for _, pt := range sr.Points {
				if pt.Period == period {
					pts = append(pts, pt)
				}
			}
			sr.Points = pts
		}
		p.Series = append(p.Series, sr)
	}
	for _, l := range v.lotsOf[g] {
		if period != "" && l.Period != period {
			continue
		}
		p.LotsTotal++
		if period != "" || len(p.Lots) < MaxLatestLots {
			p.Lots = append(p.Lots, l)
		}
	}
	if c.json && period == "" {
		// The whole series of a supplier is large and the same for every
		// request on this state of the database: encoded once.
		var buf bytes.Buffer
		if err := render.WriteJSON(&buf, p); err != nil {
			return nil, err
		}
		if v.keep(buf.Len()) {
			if _, dup := v.supplierJSON.LoadOrStore(g, buf.Bytes()); dup {
				v.cached.Add(-int64(buf.Len()))
			}
		}
		return &reply{raw: buf.Bytes()}, nil
	}
	if c.json {
		return &reply{json: p}, nil
	}
	figs, err := v.supplierFigures(g)
	if err != nil {
		return nil, err
	}
	title := "Supplier " + g
	if period != "" {
		title += ", " + period
	}
	return &reply{tmpl: "supplier", title: title, data: supplierData{p, uq(c), figs}}, nil
}

func (v *view) overviewRow(g string) SupplierRow {
	for _, r := range v.overview.Suppliers {
		if r.Supplier == g {
			return r
		}
	}
	return SupplierRow{}
}

// supplierFigures draws (once per view) the charts of every series of a
// supplier, over its latest MaxChartLots lots, with the report's charts.
func (v *view) supplierFigures(g string) ([]figureGroup, error) {
	if f, ok := v.figures.Load(g); ok {
		return f.([]figureGroup), nil
	}
	var out []figureGroup
	n := 0
	for _, si := range v.series[g] {
		s := v.trend.Series[si]
		fg := figureGroup{Title: s.Property + " of " + s.Material + unitIn(s.Unit), Notes: s.Notes}
		if len(s.Points) > MaxChartLots {
			fg.Notes = append([]string{fmt.Sprintf("The charts show the latest %d of %d lots; the JSON of this page has them all.", MaxChartLots, len(s.Points))}, fg.Notes...)
			s.Points = s.Points[len(s.Points)-MaxChartLots:]
		}
		figs, err := report.SeriesFigures(v.trend, s)
		if err != nil {
			return nil, err
		}
		for _, f := range figs {
			n++
			svg, err := report.EmbedSVG(f.SVG, "f"+strconv.Itoa(n)+"-")
			if err != nil {
				return nil, err
			}
			fg.Figures = append(fg.Figures, shownFigure{Num: n, Title: f.Title, Caption: f.Caption, SVG: template.HTML(svg)}) // checked by EmbedSVG
		}
		out = append(out, fg)
	}
	size := 0
	for _, fg := range out {
		for _, f := range fg.Figures {
			size += len(f.SVG)
		}
	}
	if v.keep(size) {
		if _, dup := v.figures.LoadOrStore(g, out); dup {
			v.cached.Add(-int64(size))
		}
	}
	return out, nil
}

func unitIn(u string) string {
	if u == "" {
		return ""
	}
	return " [" + u + "]"
}

// ---- lot ----

// LotPage is the lot page.
type LotPage struct {
	Lot        string        `json:"lot"`
	Supplier   string        `json:"supplier"`
	Material   string        `json:"material"`
	Units      string        `json:"units"`
	Import     Import        `json:"import"` // the import that first recorded the lot
	Properties []LotProperty `json:"properties"`
	Specimens  []LotSpecimen `json:"specimens"`
	Verdicts   []LotVerdict  `json:"verdicts"`
	SpecLimits []LotLimit    `json:"spec_limits"`
	Imports    []Import      `json:"imports"`
	Note       string        `json:"note"`
	Cautions   []string      `json:"cautions"`
}

// LotProperty is one property measured on the lot, with what its values
// show against the specification limits in force.
type LotProperty struct {
	Property string     `json:"property"`
	Unit     string     `json:"unit"`
	N        int        `json:"n"`
	Mean     lots.Float `json:"mean"`
	SD       lots.Float `json:"sd"`
	Lowest   lots.Float `json:"lowest"`
	Highest  lots.Float `json:"highest"`
}

// LotSpecimen is one specimen and its values (display units; a property
// without a value is absent).
type LotSpecimen struct {
	Specimen  string                `json:"specimen"`
	Heat      string                `json:"heat"`
	Tested    string                `json:"tested"`
	Condition string                `json:"test_condition"`
	Import    string                `json:"import_digest"`
	Values    map[string]lots.Float `json:"values"`
	Cells     []valueCell           `json:"-"`
}

type valueCell struct {
	Text   string
	Status string
}

// LotVerdict is a recorded verdict, with what the stored values show
// against that specification's limits.
type LotVerdict struct {
	Spec       string   `json:"spec"`
	Verdict    string   `json:"verdict"`
	InForce    bool     `json:"in_force"` // the latest import's verdict for this specification
	Import     string   `json:"import_digest"`
	ImportedAt string   `json:"imported_at"`
	Reasons    []string `json:"reasons"`
}

// LotLimit is a specification limit in force for the lot's material.
type LotLimit struct {
	Spec     string     `json:"spec"`
	Property string     `json:"property"`
	Minimum  lots.Float `json:"minimum"`
	Maximum  lots.Float `json:"maximum"`
	Unit     string     `json:"unit"`
	Import   string     `json:"import_digest"`
}

// lotNote says what the history keeps of a verdict.
const lotNote = "The history keeps each verdict and the specification limits it was judged against, not the acceptance rule (content, confidence, minimum specimens) of the specification: the reasons below are what the stored values show against those limits. lotproof accept on the imported file, with its specification, gives the full reasoning."

type conv struct {
	sym string
	f   func(float64) float64
}

// convFor converts values stored in unit stored to the display unit of sys
// (as trend.Result.Display does); unknown units are shown as stored.
func convFor(stored string, sys units.System) conv {
	if u, err := units.Parse(stored); err == nil {
		d := u.Display(sys)
		return conv{d.Symbol, func(v float64) float64 { return d.FromInternal(u.ToInternal(v)) }}
	}
	return conv{stored, func(v float64) float64 { return v }}
}

func (c conv) lf(v float64) lots.Float {
	if math.IsNaN(v) {
		return lots.NaN
	}
	return lots.Float(c.f(v))
}

func (s *Server) lot(c *reqCtx) (*reply, error) {
	id := c.r.PathValue("id")
	snap, err := s.cache.get(c.r.Context())
	if err != nil {
		return nil, err
	}
	idx := snap.index
	if s.cache.stale(snap) {
		idx = nil // the history changed since: read the verdicts afresh
	}
	d, ok, err := s.db.Lot(c.r.Context(), id, idx)
	if err != nil {
		return nil, err
	}
	if !ok {
		return nil, notFound("no lot %q in the lot history", id)
	}
	p := &LotPage{Lot: d.Lot.Lot, Supplier: d.Lot.Supplier, Material: d.Lot.Material, Units: string(c.sys), Import: d.Imports[d.Lot.Import],
		Properties: []LotProperty{}, Specimens: []LotSpecimen{}, Verdicts: []LotVerdict{}, SpecLimits: []LotLimit{}, Imports: []Import{},
		Note: lotNote, Cautions: []string{lots.Caution}}
	convs := map[string]conv{}
	for _, pr := range d.Properties {
		cv := convFor(pr.Unit, c.sys)
		convs[pr.Property] = cv
		var vals []float64
		for _, sp := range d.Specimens {
			if v, ok := sp.Values[pr.Property]; ok {
				vals = append(vals, v)
			}
		}
		lp := LotProperty{Property: pr.Property, Unit: cv.sym, N: len(vals), Mean: lots.NaN, SD: lots.NaN, Lowest: lots.NaN, Highest: lots.NaN}
		if len(vals) == 1 {
			lp.Mean, lp.Lowest, lp.Highest = cv.lf(vals[0]), cv.lf(vals[0]), cv.lf(vals[0])
		} else if st, err := stats.Describe(vals); err == nil {
			lp.Mean, lp.Lowest, lp.Highest, lp.SD = cv.lf(st.Mean), cv.lf(st.Min), cv.lf(st.Max), cv.lf(st.SD)
		}
		p.Properties = append(p.Properties, lp)
	}
	for _, l := range d.Limits {
		cv, ok := convs[l.Property]
		if !ok {
			cv = convFor(l.Unit, c.sys)
		}
		p.SpecLimits = append(p.SpecLimits, LotLimit{Spec: l.Spec, Property: l.Property, Minimum: cv.lf(l.Minimum), Maximum: cv.lf(l.Maximum), Unit: cv.sym, Import: l.Import})
	}
	for _, sp := range d.Specimens {
		ls := LotSpecimen{Specimen: sp.Specimen, Heat: sp.Heat, Tested: sp.Tested, Condition: sp.Condition, Import: sp.Import, Values: map[string]lots.Float{}}
		for _, pr := range d.Properties {
			v, ok := sp.Values[pr.Property]
			if !ok {
				ls.Cells = append(ls.Cells, valueCell{Text: "-"})
				continue
			}
			ls.Values[pr.Property] = convs[pr.Property].lf(v)
			cell := valueCell{Text: render.Num(convs[pr.Property].f(v), 5)}
			for _, l := range d.Limits {
				if l.Property == pr.Property && (v < l.Minimum || v > l.Maximum) {
					cell.Status = "fail"
				}
			}
			ls.Cells = append(ls.Cells, cell)
		}
		p.Specimens = append(p.Specimens, ls)
	}
	seen := map[string]bool{}
	for _, v := range d.Verdicts {
		lv := LotVerdict{Spec: v.Spec, Verdict: v.Verdict, InForce: !seen[v.Spec], Import: v.Import, ImportedAt: v.ImportedAt,
			Reasons: reasons(d, limitsFor(d, v), convs)}
		seen[v.Spec] = true
		p.Verdicts = append(p.Verdicts, lv)
	}
	var digests []string
	for dg := range d.Imports {
		digests = append(digests, dg)
	}
	sort.Strings(digests)
	for _, dg := range digests {
		p.Imports = append(p.Imports, d.Imports[dg])
	}
	sort.SliceStable(p.Imports, func(i, j int) bool { return p.Imports[i].ImportedAt < p.Imports[j].ImportedAt })
	return &reply{json: p, tmpl: "lot", title: "Lot " + p.Lot, data: lotData{p, uq(c)}}, nil
}

type lotData struct {
	*LotPage
	U string
}

// limitsFor picks the limits a verdict was judged against: those recorded
// with its import for its specification, else those in force.
func limitsFor(d *store.LotDetail, v store.VerdictRecord) []store.ImportedLimit {
	var own, now []store.ImportedLimit
	for _, l := range d.AllLimits {
		if l.Spec == v.Spec && l.Import == v.Import {
			own = append(own, l)
		}
	}
	if len(own) > 0 {
		return own
	}
	for _, l := range d.Limits {
		if l.Spec == v.Spec {
			now = append(now, l)
		}
	}
	return now
}

// reasons says, per property limited by the specification, what the
// stored values of the lot show against the limits.
func reasons(d *store.LotDetail, limits []store.ImportedLimit, convs map[string]conv) []string {
	var out []string
	if len(limits) == 0 {
		return []string{"no limits of this specification for " + d.Lot.Material + " are recorded"}
	}
	for _, l := range limits {
		cv, ok := convs[l.Property]
		if !ok {
			out = append(out, fmt.Sprintf("%s: no values recorded for this lot", l.Property))
			continue
		}
		var vals []float64
		below, above := 0, 0
		for _, sp := range d.Specimens {
			v, ok := sp.Values[l.Property]
			if !ok {
				continue
			}
			vals = append(vals, v)
			if v < l.Minimum {
				below++
			}
			if v > l.Maximum {
				above++
			}
		}
		if len(vals) == 0 {
			out = append(out, fmt.Sprintf("%s: no values recorded for this lot", l.Property))
			continue
		}
		lo, hi := vals[0], vals[0]
		for _, v := range vals {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		var parts []string
		if !math.IsNaN(l.Minimum) {
			parts = append(parts, fmt.Sprintf("%d of %d values below the minimum %s %s (lowest %s)", below, len(vals),
				render.Num(cv.f(l.Minimum), 5), cv.sym, render.Num(cv.f(lo), 5)))
		}
		if !math.IsNaN(l.Maximum) {
			parts = append(parts, fmt.Sprintf("%d of %d values above the maximum %s %s (highest %s)", above, len(vals),
				render.Num(cv.f(l.Maximum), 5), cv.sym, render.Num(cv.f(hi), 5)))
		}
		if len(parts) > 0 {
			out = append(out, l.Property+": "+strings.Join(parts, "; "))
		}
	}
	return out
}

// ---- search ----

// SearchPage is the search page.
type SearchPage struct {
	Query     string   `json:"query"`
	Hits      []Hit    `json:"hits"`
	Truncated []string `json:"truncated"` // kinds with more than MaxHits matches (only MaxHits shown)
	Cautions  []string `json:"cautions"`
}

// MaxQuery bounds the length of a search.
const MaxQuery = 200

func (s *Server) search(c *reqCtx) (*reply, error) {
	q := strings.TrimSpace(c.r.URL.Query().Get("q"))
	p := &SearchPage{Query: q, Hits: []Hit{}, Truncated: []string{}, Cautions: []string{lots.Caution}}
	if len(q) > MaxQuery {
		return nil, badRequest("the search text is longer than %d bytes", MaxQuery)
	}
	if q != "" {
		snap, err := s.cache.get(c.r.Context())
		if err != nil {
			return nil, err
		}
		hits, err := s.db.Search(c.r.Context(), q, snap.index)
		if err != nil {
			return nil, err
		}
		count := map[string]int{}
		for _, h := range hits {
			count[h.Kind]++
			if count[h.Kind] <= MaxHits {
				p.Hits = append(p.Hits, h)
			} else if count[h.Kind] == MaxHits+1 {
				p.Truncated = append(p.Truncated, h.Kind)
			}
		}
	}
	title := "Search"
	if q != "" {
		title = "Search: " + q
	}
	return &reply{json: p, tmpl: "search", title: title, data: searchData{p, uq(c)}}, nil
}

type searchData struct {
	*SearchPage
	U string
}
