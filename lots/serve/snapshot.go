package serve

import (
	"context"
	"fmt"
	"io"
	"math"
	"slices"
	"sort"
	"sync"
	"sync/atomic"
	"time"

	"lotproof/lots"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
)

// snapshot is the trend of one state of the database (one fingerprint),
// and its views in each unit system, made on first use.
type snapshot struct {
	key      string
	base     *trend.Result // internal units; never changed after it is made
	index    *store.LookupIndex
	computed time.Duration

	mu    sync.Mutex
	views map[units.System]*view
}

// view is the trend in one unit system with what the pages need from it,
// indexed once.
type view struct {
	sys          units.System
	trend        *trend.Result
	periods      []string            // every period, in order
	suppliers    []string            // every group, in order
	series       map[string][]int    // group -> indices into trend.Series
	rows         map[string][]int    // group -> indices into trend.Periods
	signals      map[string][]int    // group -> indices into trend.Signals
	overview     *Overview           // the overview page data
	figures      sync.Map            // group -> []figureGroup (rendered on first use)
	supplierJSON sync.Map            // group -> encoded supplier page without a period (on first use)
	cached       atomic.Int64        // bytes held in figures and supplierJSON, at most CacheBudget
	lotsOf       map[string][]LotRef // group -> lots, latest first
}

// LotRef is one lot in a supplier's list.
type LotRef struct {
	Lot       string `json:"lot"`
	Material  string `json:"material"`
	Tested    string `json:"tested"`
	Period    string `json:"period"`
	Specimens int    `json:"specimens"` // most specimens of any property
	Verdict   string `json:"verdict"`
	Signals   int    `json:"signals"`
}

// CacheBudget bounds the bytes of rendered figures and encoded supplier
// pages a view keeps (per unit system); beyond it pages are made afresh on
// every request, so memory stays bounded with any number of suppliers.
const CacheBudget = 64 << 20

// keep reports whether n more bytes fit the view's cache budget, and
// counts them when they do.
func (v *view) keep(n int) bool {
	if v.cached.Add(int64(n)) > CacheBudget {
		v.cached.Add(-int64(n))
		return false
	}
	return true
}

func (s *snapshot) view(sys units.System, recent int) *view {
	s.mu.Lock()
	defer s.mu.Unlock()
	if v, ok := s.views[sys]; ok {
		return v
	}
	r := cloneTrend(s.base)
	r.Display(sys)
	v := newView(sys, r, recent)
	s.views[sys] = v
	return v
}

// cloneTrend copies a trend result deeply enough for Display, which
// changes numbers and unit symbols in place.
func cloneTrend(r *trend.Result) *trend.Result {
	c := *r
	c.Periods = slices.Clone(r.Periods)
	c.Signals = slices.Clone(r.Signals)
	c.Series = slices.Clone(r.Series)
	for i := range c.Series {
		c.Series[i].Points = slices.Clone(r.Series[i].Points)
	}
	return &c
}

func newView(sys units.System, r *trend.Result, recent int) *view {
	v := &view{sys: sys, trend: r, series: map[string][]int{}, rows: map[string][]int{}, signals: map[string][]int{}, lotsOf: map[string][]LotRef{}}
	seenP := map[string]bool{}
	for i, p := range r.Periods {
		if _, ok := v.rows[p.Group]; !ok {
			v.suppliers = append(v.suppliers, p.Group)
		}
		v.rows[p.Group] = append(v.rows[p.Group], i)
		if !seenP[p.Period] {
			seenP[p.Period] = true
			v.periods = append(v.periods, p.Period)
		}
	}
	sort.Strings(v.periods)
	sort.Strings(v.suppliers)
	for i, s := range r.Series {
		v.series[s.Group] = append(v.series[s.Group], i)
	}
	sigByLot := map[[2]string]int{}
	for i, s := range r.Signals {
		v.signals[s.Group] = append(v.signals[s.Group], i)
		if s.Lot != "" {
			sigByLot[[2]string{s.Group, s.Lot}]++
		}
	}
	for _, g := range v.suppliers {
		at := map[string]int{}
		var refs []LotRef
		for _, si := range v.series[g] {
			s := r.Series[si]
			for _, p := range s.Points {
				i, ok := at[p.Lot]
				if !ok {
					i = len(refs)
					at[p.Lot] = i
					refs = append(refs, LotRef{Lot: p.Lot, Material: s.Material, Tested: p.Tested, Period: p.Period, Verdict: p.Verdict, Signals: sigByLot[[2]string{g, p.Lot}]})
				}
				refs[i].Specimens = max(refs[i].Specimens, p.N)
			}
		}
		sort.Slice(refs, func(i, j int) bool {
			if refs[i].Tested != refs[j].Tested {
				return refs[i].Tested > refs[j].Tested
			}
			return refs[i].Lot > refs[j].Lot
		})
		v.lotsOf[g] = refs
	}
	v.overview = v.makeOverview(recent)
	return v
}

// Overview is the overview page: suppliers by recent periods.
type Overview struct {
	By        string        `json:"by"`
	Every     string        `json:"every"`
	Units     string        `json:"units"`
	Periods   []string      `json:"periods"` // the recent periods shown, oldest first
	Suppliers []SupplierRow `json:"suppliers"`
	Methods   []string      `json:"methods"`
	Warnings  []string      `json:"warnings"`
	Caution   string        `json:"caution"`
	Cautions  []string      `json:"cautions"`
}

// SupplierRow is one supplier across the recent periods.
type SupplierRow struct {
	Supplier  string   `json:"supplier"`
	Materials []string `json:"materials"`
	Lots      int      `json:"lots"`    // every period
	Signals   int      `json:"signals"` // every period
	Cells     []Cell   `json:"cells"`   // one per recent period
}

// Cell is one supplier in one period. Ppk is that of the property with the
// lowest lower bound (the weakest one) in the period.
type Cell struct {
	Period       string     `json:"period"`
	Lots         int        `json:"lots"`
	LotsJudged   int        `json:"lots_judged"`
	LotsRejected int        `json:"lots_rejected"`
	Signals      int        `json:"signals"`
	Property     string     `json:"property"` // whose Ppk is shown; "" when none
	Material     string     `json:"material"`
	Ppk          lots.Float `json:"ppk"`
	PpkLower     lots.Float `json:"ppk_lower"`
}

func (v *view) makeOverview(recent int) *Overview {
	r := v.trend
	o := &Overview{By: r.By, Every: r.Every, Units: string(v.sys), Periods: v.periods, Suppliers: []SupplierRow{},
		Methods: r.Methods, Warnings: r.Warnings, Caution: r.Caution, Cautions: []string{lots.Caution, r.Caution}}
	if recent > 0 && len(o.Periods) > recent {
		o.Periods = o.Periods[len(o.Periods)-recent:]
	}
	col := map[string]int{}
	for i, p := range o.Periods {
		col[p] = i
	}
	for _, g := range v.suppliers {
		row := SupplierRow{Supplier: g, Materials: []string{}, Cells: make([]Cell, len(o.Periods)), Signals: len(v.signals[g])}
		for i, p := range o.Periods {
			row.Cells[i] = Cell{Period: p, Ppk: lots.NaN, PpkLower: lots.NaN}
		}
		mats := map[string]bool{}
		for _, l := range v.lotsOf[g] {
			row.Lots++
			if !mats[l.Material] {
				mats[l.Material] = true
				row.Materials = append(row.Materials, l.Material)
			}
			c, ok := col[l.Period]
			if !ok {
				continue
			}
			cell := &row.Cells[c]
			cell.Lots++
			if l.Verdict != "" && l.Verdict != "not judged" {
				cell.LotsJudged++
			}
			if l.Verdict == "nonconforming" {
				cell.LotsRejected++
			}
		}
		sort.Strings(row.Materials)
		for _, si := range v.signals[g] {
			if c, ok := col[r.Signals[si].Period]; ok {
				row.Cells[c].Signals++
			}
		}
		for _, pi := range v.rows[g] {
			p := r.Periods[pi]
			c, ok := col[p.Period]
			if !ok || math.IsNaN(float64(p.Ppk)) {
				continue
			}
			cell := &row.Cells[c]
			if weaker(p.PpkLower, p.Ppk, cell.PpkLower, cell.Ppk) {
				cell.Ppk, cell.PpkLower, cell.Property, cell.Material = p.Ppk, p.PpkLower, p.Property, p.Material
			}
		}
		o.Suppliers = append(o.Suppliers, row)
	}
	return o
}

// weaker reports whether a capability (lower bound lo, estimate est) is
// weaker than the one held (clo, cest): a lower bound below the held one
// (a missing bound counts as weaker than none held only by its estimate).
func weaker(lo, est, clo, cest lots.Float) bool {
	if math.IsNaN(float64(cest)) {
		return true
	}
	a, b := float64(lo), float64(clo)
	switch {
	case !math.IsNaN(a) && !math.IsNaN(b):
		return a < b
	case math.IsNaN(a) && math.IsNaN(b):
		return est < cest
	}
	return !math.IsNaN(a) // a bound beats none
}

// cache keeps the latest snapshot and makes a new one when the database
// changed. Only one computation runs at a time. Until the first snapshot
// exists, requests wait for it; after that, a request that finds the
// database changed starts the new computation in the background and is
// served the previous snapshot, so that an import never stalls the pages
// (they lag it by the computation's time).
type cache struct {
	compute func(ctx context.Context) (*trend.Result, *store.LookupIndex, error)
	finger  func(ctx context.Context) (string, error)
	every   time.Duration // how often the fingerprint is read at most
	log     io.Writer

	mu         sync.Mutex
	snap       *snapshot
	checked    time.Time
	key        string // the fingerprint read at checked
	refreshing bool   // a background computation is running
	busy       chan struct{}
}

func newCache(compute func(context.Context) (*trend.Result, *store.LookupIndex, error), finger func(context.Context) (string, error), log io.Writer) *cache {
	return &cache{compute: compute, finger: finger, every: time.Second, log: log, busy: make(chan struct{}, 1)}
}

// get returns the latest snapshot: that of the database as it is now (read
// at most c.every ago), or the previous one while the new one is computed.
func (c *cache) get(ctx context.Context) (*snapshot, error) {
	c.mu.Lock()
	snap, key, fresh := c.snap, c.key, time.Since(c.checked) < c.every
	c.mu.Unlock()
	if !fresh || snap == nil {
		k, err := c.finger(ctx)
		if err != nil {
			return nil, err
		}
		c.mu.Lock()
		c.key, c.checked, key = k, time.Now(), k
		c.mu.Unlock()
	}
	if snap != nil {
		if snap.key != key {
			c.mu.Lock()
			if !c.refreshing {
				c.refreshing = true
				go c.refresh(key)
			}
			c.mu.Unlock()
		}
		return snap, nil
	}
	select {
	case c.busy <- struct{}{}:
	case <-ctx.Done():
		return nil, ctx.Err()
	}
	defer func() { <-c.busy }()
	c.mu.Lock()
	snap = c.snap
	c.mu.Unlock()
	if snap != nil {
		return snap, nil // computed while this request waited
	}
	// The computation outlives a request that gives up: the next one
	// needs it too.
	return c.make(context.WithoutCancel(ctx), key)
}

// stale reports whether snap is older than the database as last read.
func (c *cache) stale(snap *snapshot) bool {
	c.mu.Lock()
	defer c.mu.Unlock()
	return snap.key != c.key
}

// make computes the snapshot for fingerprint key and keeps it; the caller
// holds c.busy.
func (c *cache) make(ctx context.Context, key string) (*snapshot, error) {
	start := time.Now()
	r, idx, err := c.compute(ctx)
	if err != nil {
		return nil, err
	}
	snap := &snapshot{key: key, base: r, index: idx, computed: time.Since(start), views: map[units.System]*view{}}
	c.mu.Lock()
	c.snap = snap
	c.mu.Unlock()
	return snap, nil
}

// refresh computes the snapshot for key in the background.
func (c *cache) refresh(key string) {
	c.busy <- struct{}{}
	defer func() {
		<-c.busy
		c.mu.Lock()
		c.refreshing = false
		c.mu.Unlock()
	}()
	if _, err := c.make(context.Background(), key); err != nil {
		fmt.Fprintf(c.log, "lotproof serve: updating the trend after a change of the history: %v (the previous state is shown)\n", err)
	}
}
