package store

import (
	"context"
	"database/sql"
	"sort"
)

// LotValues are the recorded values of one property in one lot.
type LotValues struct {
	Lot      string
	Supplier string
	Material string
	Tested   string // earliest test date of the lot's specimens (YYYY-MM-DD), "" when none
	Property string
	Unit     string    // internal unit of the property
	IDs      []string  // specimen ids, sorted
	Values   []float64 // values in the order of IDs
}

// Filter selects what LotData returns. Empty fields select everything.
type Filter struct {
	Property string // one property (exact name)
}

// LotData returns, per lot and property, the recorded values, sorted by
// lot and property. Specimens without a value for a property are left out
// of that property.
func (s *Store) LotData(ctx context.Context, f Filter) ([]LotValues, error) {
	// Earliest test date per lot (empty dates ignored).
	tested := map[string]string{}
	rows, err := s.db.QueryContext(ctx, `SELECT lot, MIN(tested) FROM specimens WHERE tested <> '' GROUP BY lot`)
	if err != nil {
		return nil, err
	}
	for rows.Next() {
		var lot string
		var t sql.NullString
		if err := rows.Scan(&lot, &t); err != nil {
			rows.Close()
			return nil, err
		}
		tested[lot] = t.String
	}
	if err := rows.Close(); err != nil {
		return nil, err
	}
	query := `SELECT l.lot, l.supplier, l.material, m.property, p.unit, s.specimen, m.value
		FROM measurements m
		JOIN specimens s ON s.specimen = m.specimen
		JOIN lots l ON l.lot = s.lot
		JOIN properties p ON p.property = m.property`
	var args []any
	if f.Property != "" {
		query += ` WHERE m.property = ?`
		args = append(args, f.Property)
	}
	query += ` ORDER BY l.lot, m.property, s.specimen`
	rows, err = s.db.QueryContext(ctx, s.q(query), args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []LotValues
	for rows.Next() {
		var lot, sup, mat, prop, unit, id string
		var v float64
		if err := rows.Scan(&lot, &sup, &mat, &prop, &unit, &id, &v); err != nil {
			return nil, err
		}
		n := len(out)
		if n == 0 || out[n-1].Lot != lot || out[n-1].Property != prop {
			out = append(out, LotValues{Lot: lot, Supplier: sup, Material: mat, Tested: tested[lot], Property: prop, Unit: unit})
			n++
		}
		out[n-1].IDs = append(out[n-1].IDs, id)
		out[n-1].Values = append(out[n-1].Values, v)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	// The two backends may collate text differently; sort bytewise so both
	// give the same order.
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].Lot != out[j].Lot {
			return out[i].Lot < out[j].Lot
		}
		return out[i].Property < out[j].Property
	})
	for k := range out {
		sortByID(out[k].IDs, out[k].Values)
	}
	return out, nil
}

func sortByID(ids []string, vals []float64) {
	idx := make([]int, len(ids))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return ids[idx[a]] < ids[idx[b]] })
	ci := append([]string(nil), ids...)
	cv := append([]float64(nil), vals...)
	for k, i := range idx {
		ids[k], vals[k] = ci[i], cv[i]
	}
}

// LotVerdicts returns, per lot, the verdicts recorded for it (the latest
// import's verdict per specification), sorted by specification.
func (s *Store) LotVerdicts(ctx context.Context) (map[string][]Verdict, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT v.lot, v.spec, v.verdict, i.imported_at, i.digest
		FROM verdicts v JOIN imports i ON i.digest = v.import_digest`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	type rec struct {
		v      Verdict
		at, dg string
	}
	latest := map[[2]string]rec{}
	for rows.Next() {
		var r rec
		if err := rows.Scan(&r.v.Lot, &r.v.Spec, &r.v.Verdict, &r.at, &r.dg); err != nil {
			return nil, err
		}
		k := [2]string{r.v.Lot, r.v.Spec}
		if old, ok := latest[k]; !ok || latestFirst(r.at, r.dg, old.at, old.dg) {
			latest[k] = r
		}
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	out := map[string][]Verdict{}
	for _, r := range latest {
		out[r.v.Lot] = append(out[r.v.Lot], r.v)
	}
	for _, vs := range out {
		sort.Slice(vs, func(i, j int) bool { return vs[i].Spec < vs[j].Spec })
	}
	return out, nil
}

// SpecLimits returns the specification limits recorded with the imports,
// the latest import's per (spec, material, property), sorted.
func (s *Store) SpecLimits(ctx context.Context) ([]SpecLimit, error) {
	ls, err := s.limits(ctx, "", nil)
	if err != nil {
		return nil, err
	}
	var out []SpecLimit
	for _, l := range ls {
		out = append(out, l.SpecLimit)
	}
	return out, nil
}

// Counts are row counts of the main tables.
type Counts struct {
	Imports, Lots, Specimens, Measurements, Verdicts int
}

// Count counts the rows of the main tables.
func (s *Store) Count(ctx context.Context) (Counts, error) {
	var c Counts
	for _, t := range []struct {
		table string
		n     *int
	}{{"imports", &c.Imports}, {"lots", &c.Lots}, {"specimens", &c.Specimens}, {"measurements", &c.Measurements}, {"verdicts", &c.Verdicts}} {
		if err := s.db.QueryRowContext(ctx, `SELECT COUNT(*) FROM `+t.table).Scan(t.n); err != nil {
			return c, err
		}
	}
	return c, nil
}
