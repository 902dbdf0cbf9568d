package store

import (
	"bytes"
	"context"
	"database/sql"
	"database/sql/driver"
	"encoding/binary"
	"fmt"
	"math"
	"sort"

	"modernc.org/sqlite"
)

// LotSamples returns what LotData returns, less the specimen ids: per lot
// and property the recorded values in specimen-id order (bytewise), sorted
// by lot and property. The values are bit for bit those LotData returns,
// in the same order, so that any statistic computed from them is the same.
//
// The database groups the measurements and sends one row per lot
// (SQLite) or per lot and property (PostgreSQL) with the values packed in
// binary, instead of one row per measurement with every text column
// repeated. Within a lot the values are put in
// specimen order here (SQLite: in the aggregate function; PostgreSQL: after
// decoding), which spares the database a sort of every measurement.
func (s *Store) LotSamples(ctx context.Context, f Filter) ([]LotValues, error) {
	meta, err := s.lotMeta(ctx)
	if err != nil {
		return nil, err
	}
	units, err := s.propertyUnits(ctx)
	if err != nil {
		return nil, err
	}
	var out []LotValues
	add := func(lot string, prop string, vals []float64) error {
		m, ok := meta[lot]
		if !ok {
			return fmt.Errorf("store: lot %q has measurements but no lot record", lot)
		}
		out = append(out, LotValues{Lot: lot, Supplier: m.supplier, Material: m.material,
			Property: prop, Unit: units[prop], Values: vals})
		return nil
	}
	if s.backend == Postgres {
		err = s.samplesPostgres(ctx, f, meta, add)
	} else {
		err = s.samplesSQLite(ctx, f, meta, add)
	}
	if err != nil {
		return nil, err
	}
	for i := range out {
		out[i].Tested = meta[out[i].Lot].tested
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].Lot != out[j].Lot {
			return out[i].Lot < out[j].Lot
		}
		return out[i].Property < out[j].Property
	})
	return out, nil
}

// pgWorkMem is the work_mem of the PostgreSQL LotSamples query.
const pgWorkMem = "64MB"

type lotInfo struct{ supplier, material, tested string }

// lotMeta reads supplier and material of every lot. The earliest test date
// of a lot's specimens (empty dates ignored, as in LotData) comes with the
// values.
func (s *Store) lotMeta(ctx context.Context) (map[string]*lotInfo, error) {
	meta := map[string]*lotInfo{}
	rows, err := s.db.QueryContext(ctx, `SELECT lot, supplier, material FROM lots`)
	if err != nil {
		return nil, err
	}
	for rows.Next() {
		var lot string
		m := &lotInfo{}
		if err := rows.Scan(&lot, &m.supplier, &m.material); err != nil {
			rows.Close()
			return nil, err
		}
		meta[lot] = m
	}
	return meta, rows.Close()
}

// earlier records the earliest non-empty test date of a lot.
func (m *lotInfo) earlier(t string) {
	if t != "" && (m.tested == "" || t < m.tested) {
		m.tested = t
	}
}

// propertyUnits reads the unit of every property.
func (s *Store) propertyUnits(ctx context.Context) (map[string]string, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT property, unit FROM properties`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	units := map[string]string{}
	for rows.Next() {
		var p, u string
		if err := rows.Scan(&p, &u); err != nil {
			return nil, err
		}
		units[p] = u
	}
	return units, rows.Err()
}

// lotDates sets the earliest non-empty test date of every lot in meta,
// over all its specimens (with or without measurements).
func lotDates(ctx context.Context, db interface {
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
}, meta map[string]*lotInfo) error {
	dates, err := db.QueryContext(ctx, `SELECT lot, MIN(NULLIF(tested, '')) FROM specimens GROUP BY lot`)
	if err != nil {
		return err
	}
	defer dates.Close()
	for dates.Next() {
		var lot string
		var tested sql.NullString
		if err := dates.Scan(&lot, &tested); err != nil {
			return err
		}
		if m, ok := meta[lot]; ok {
			m.earlier(tested.String)
		}
	}
	return dates.Close()
}

// samplesSQLite reads the earliest test date of every lot (specimens
// without measurements count, as in lotMeta) and then the values grouped
// by the lot each measurement carries (schema version 4), both from
// covering indexes (version 5): per lot, the lotValues aggregate packs the
// values per property in specimen-id order.
func (s *Store) samplesSQLite(ctx context.Context, f Filter, meta map[string]*lotInfo, add func(lot, prop string, vals []float64) error) error {
	if err := lotDates(ctx, s.db, meta); err != nil {
		return err
	}
	where := ``
	var args []any
	if f.Property != "" {
		where = ` WHERE property = ?`
		args = append(args, f.Property)
	}
	rows, err := s.db.QueryContext(ctx, `SELECT lot, `+lotValuesFunc+`(specimen, property, value) FROM measurements`+where+` GROUP BY lot`, args...)
	if err != nil {
		return err
	}
	defer rows.Close()
	for rows.Next() {
		var lot string
		var blob []byte
		if err := rows.Scan(&lot, &blob); err != nil {
			return err
		}
		if err := decodeLotValues(blob, func(prop string, vals []float64) error { return add(lot, prop, vals) }); err != nil {
			return fmt.Errorf("store: lot %q: %w", lot, err)
		}
	}
	return rows.Err()
}

// samplesPostgres groups the measurements by the lot they carry (schema
// version 4) and property in PostgreSQL, without joining the specimens:
// per group the values as concatenated IEEE 754 binary64 in specimen-id
// order, bytewise (COLLATE "C", as SQLite's BINARY and Go compare), from
// a sorted subquery. The
// earliest test date of each lot comes from a second, small query over
// the specimens (specimens without measurements count, as in lotMeta).
func (s *Store) samplesPostgres(ctx context.Context, f Filter, meta map[string]*lotInfo, add func(lot, prop string, vals []float64) error) error {
	where := ``
	var args []any
	if f.Property != "" {
		where = ` WHERE property = $1`
		args = append(args, f.Property)
	}
	// One read-only transaction whose work_mem lets the sort of a large
	// history stay in memory; with the server's default of 4 MB it spills
	// to temporary files. Any role may set work_mem, and SET LOCAL ends
	// with the transaction.
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return err
	}
	defer tx.Rollback()
	if _, err := tx.ExecContext(ctx, `SET LOCAL work_mem = '`+pgWorkMem+`'`); err != nil {
		return err
	}
	if err := lotDates(ctx, tx, meta); err != nil {
		return err
	}
	// The values come in specimen-id order from a sorted subquery (the
	// covering index measurements_lot gives that order without a sort)
	// rather than an ORDER BY inside string_agg, which sorts each of the
	// groups again (PostgreSQL before 16): half the server time. The
	// order is kept through the aggregation when the outer query does
	// nothing but group the sorted rows (PostgreSQL manual, "Aggregate
	// Functions", on sorted subqueries) and no parallel plan combines
	// partial aggregates, which is ruled out here.
	// TestLotSamplesMatchesLotData checks the order against LotData.
	if _, err := tx.ExecContext(ctx, `SET LOCAL max_parallel_workers_per_gather = 0`); err != nil {
		return err
	}
	rows, err := tx.QueryContext(ctx, `SELECT lot, property, COUNT(*), string_agg(float8send(value), ''::bytea)
		FROM (SELECT lot, property, value FROM measurements`+where+` ORDER BY lot, property, specimen COLLATE "C") sorted
		GROUP BY lot, property`, args...)
	if err != nil {
		return err
	}
	defer rows.Close()
	for rows.Next() {
		var lot, prop string
		var n int
		var vb []byte
		if err := rows.Scan(&lot, &prop, &n, &vb); err != nil {
			return err
		}
		if len(vb) != 8*n {
			return fmt.Errorf("store: lot %q, %s: packed values malformed", lot, prop)
		}
		vals := make([]float64, n)
		for k := range vals {
			vals[k] = math.Float64frombits(binary.BigEndian.Uint64(vb[8*k:]))
		}
		if err := add(lot, prop, vals); err != nil {
			return err
		}
	}
	return rows.Err()
}

// lotValuesFunc is the SQLite aggregate lotValues(specimen, property,
// value): it collects a lot's values per property and returns them packed,
// per property in order of name: uvarint name length, name, uvarint count,
// count big-endian binary64 values in specimen-id order (bytewise, as
// SQLite's BINARY collation).
const lotValuesFunc = "lotproof_lot_values"

// The function is registered with the driver before any connection is
// opened (a connection sees the functions registered when it was made).
func init() {
	err := sqlite.RegisterFunction(lotValuesFunc, &sqlite.FunctionImpl{
		NArgs:         3,
		Deterministic: true,
		VolatileArgs:  true, // Step copies what it keeps
		MakeAggregate: func(sqlite.FunctionContext) (sqlite.AggregateFunction, error) { return &lotValues{}, nil },
	})
	if err != nil {
		panic("store: registering " + lotValuesFunc + ": " + err.Error())
	}
}

type propValues struct {
	name   string
	vals   []float64
	ids    []byte // specimen ids, concatenated
	ends   []int  // ids[ends[k-1]:ends[k]] is the id of vals[k]
	sorted bool   // ids arrived in increasing order so far
}

type lotValues struct {
	props []*propValues
	last  *propValues
}

func (a *lotValues) Step(_ *sqlite.FunctionContext, args []driver.Value) error {
	if args[1] == nil {
		return nil // no measurement (not written by this package)
	}
	id, ok1 := args[0].(string)
	prop, ok2 := args[1].(string)
	v, ok3 := args[2].(float64)
	if !ok1 || !ok2 {
		return fmt.Errorf("%s: specimen and property must be text", lotValuesFunc)
	}
	if !ok3 {
		// A REAL column holds an integral value as REAL; anything else is
		// not a measurement this package wrote.
		iv, ok := args[2].(int64)
		if !ok {
			return fmt.Errorf("%s: value %v of %s is not a number", lotValuesFunc, args[2], id)
		}
		v = float64(iv)
	}
	p := a.last
	if p == nil || p.name != prop {
		p = nil
		for _, q := range a.props {
			if q.name == prop {
				p = q
				break
			}
		}
		if p == nil {
			p = &propValues{name: string([]byte(prop)), sorted: true}
			a.props = append(a.props, p)
		}
		a.last = p
	}
	start := len(p.ids)
	if k := len(p.ends); k > 0 && p.sorted {
		if string(p.ids[p.idStart(k-1):p.ends[k-1]]) > id {
			p.sorted = false
		}
	}
	p.ids = append(p.ids, id...)
	p.ends = append(p.ends, start+len(id))
	p.vals = append(p.vals, v)
	return nil
}

// idStart is where id k starts in ids.
func (p *propValues) idStart(k int) int {
	if k == 0 {
		return 0
	}
	return p.ends[k-1]
}

func (a *lotValues) WindowInverse(*sqlite.FunctionContext, []driver.Value) error {
	return fmt.Errorf("%s: not a window function", lotValuesFunc)
}

func (a *lotValues) WindowValue(*sqlite.FunctionContext) (driver.Value, error) {
	sort.Slice(a.props, func(i, j int) bool { return a.props[i].name < a.props[j].name })
	var b []byte
	for _, p := range a.props {
		vals := p.vals
		if !p.sorted {
			idx := make([]int, len(vals))
			for i := range idx {
				idx[i] = i
			}
			sort.SliceStable(idx, func(i, j int) bool {
				return bytes.Compare(p.ids[p.idStart(idx[i]):p.ends[idx[i]]], p.ids[p.idStart(idx[j]):p.ends[idx[j]]]) < 0
			})
			vals = make([]float64, len(idx))
			for k, i := range idx {
				vals[k] = p.vals[i]
			}
		}
		b = binary.AppendUvarint(b, uint64(len(p.name)))
		b = append(b, p.name...)
		b = binary.AppendUvarint(b, uint64(len(vals)))
		for _, v := range vals {
			b = binary.BigEndian.AppendUint64(b, math.Float64bits(v))
		}
	}
	return b, nil
}

func (a *lotValues) Final(*sqlite.FunctionContext) {}

// decodeLotValues reads what lotValues returns.
func decodeLotValues(b []byte, fn func(prop string, vals []float64) error) error {
	for len(b) > 0 {
		n, k := binary.Uvarint(b)
		if k <= 0 || uint64(len(b)-k) < n {
			return fmt.Errorf("packed values malformed")
		}
		name := string(b[k : k+int(n)])
		b = b[k+int(n):]
		c, k := binary.Uvarint(b)
		if k <= 0 || uint64(len(b)-k)/8 < c {
			return fmt.Errorf("packed values malformed")
		}
		b = b[k:]
		vals := make([]float64, c)
		for i := range vals {
			vals[i] = math.Float64frombits(binary.BigEndian.Uint64(b[8*i:]))
		}
		b = b[8*c:]
		if err := fn(name, vals); err != nil {
			return err
		}
	}
	return nil
}
