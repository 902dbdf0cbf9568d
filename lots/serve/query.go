package serve

import (
	"context"
	"database/sql"
	"math"
	"sort"
	"strings"

	"lotproof/lots/store"
)

// History is what the trend behind the overview and supplier pages reads:
// the store's query API (lots/store). *store.Store satisfies it, and so
// does *DB (the same queries over the read-only connection).
type History interface {
	LotData(ctx context.Context, f store.Filter) ([]store.LotValues, error)
	LotVerdicts(ctx context.Context) (map[string][]store.Verdict, error)
	SpecLimits(ctx context.Context) ([]store.SpecLimit, error)
}

var _ History = (*store.Store)(nil)
var _ History = (*DB)(nil)

// LotData returns, per lot and property, the recorded values, sorted by lot
// and property, as store.Store.LotData does. The earliest test date per lot
// is computed in the same query.
func (d *DB) LotData(ctx context.Context, f store.Filter) ([]store.LotValues, error) {
	query := `SELECT l.lot, l.supplier, l.material, COALESCE(t.tested, ''), m.property, p.unit, s.specimen, m.value
		FROM measurements m
		JOIN specimens s ON s.specimen = m.specimen
		JOIN lots l ON l.lot = s.lot
		JOIN properties p ON p.property = m.property
		LEFT JOIN (SELECT lot, MIN(tested) AS tested FROM specimens WHERE tested <> '' GROUP BY lot) t ON t.lot = l.lot`
	var args []any
	if f.Property != "" {
		query += ` WHERE m.property = ?`
		args = append(args, f.Property)
	}
	query += ` ORDER BY l.lot, m.property, s.specimen`
	rows, err := d.db.QueryContext(ctx, d.q(query), args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []store.LotValues
	var lot, sup, mat, tested, prop, unit, id string
	var v float64
	for rows.Next() {
		if err := rows.Scan(&lot, &sup, &mat, &tested, &prop, &unit, &id, &v); err != nil {
			return nil, err
		}
		n := len(out)
		if n == 0 || out[n-1].Lot != lot || out[n-1].Property != prop {
			out = append(out, store.LotValues{Lot: lot, Supplier: sup, Material: mat, Tested: tested, Property: prop, Unit: unit})
			n++
		}
		out[n-1].IDs = append(out[n-1].IDs, id)
		out[n-1].Values = append(out[n-1].Values, v)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	// Bytewise order on both backends (their collations differ).
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
	if sort.StringsAreSorted(ids) {
		return
	}
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

// latestFirst orders imports: later imported_at first, then larger digest
// (the rule store.Store uses to pick the verdict and limits in force).
func latestFirst(at1, dg1, at2, dg2 string) bool {
	if at1 != at2 {
		return at1 > at2
	}
	return dg1 > dg2
}

// LotVerdicts returns, per lot, the verdict of the latest import per
// specification, sorted by specification, as store.Store.LotVerdicts does.
func (d *DB) LotVerdicts(ctx context.Context) (map[string][]store.Verdict, error) {
	rows, err := d.db.QueryContext(ctx, `SELECT v.lot, v.spec, v.verdict, i.imported_at, i.digest
		FROM verdicts v JOIN imports i ON i.digest = v.import_digest`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	type rec struct {
		v      store.Verdict
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
	out := map[string][]store.Verdict{}
	for _, r := range latest {
		out[r.v.Lot] = append(out[r.v.Lot], r.v)
	}
	for _, vs := range out {
		sort.Slice(vs, func(i, j int) bool { return vs[i].Spec < vs[j].Spec })
	}
	return out, nil
}

// SpecLimits returns the specification limits of the latest import per
// (spec, material, property), sorted, as store.Store.SpecLimits does.
func (d *DB) SpecLimits(ctx context.Context) ([]store.SpecLimit, error) {
	ls, err := d.limits(ctx, "", nil)
	if err != nil {
		return nil, err
	}
	out := make([]store.SpecLimit, len(ls))
	for i, l := range ls {
		out[i] = l.SpecLimit
	}
	return out, nil
}

// importedLimit is a specification limit with the import it came with.
type importedLimit struct {
	store.SpecLimit
	Import string
}

// limits reads the limits in force (latest import per spec, material and
// property), optionally restricted by a WHERE clause on l.
func (d *DB) limits(ctx context.Context, where string, args []any) ([]importedLimit, error) {
	query := `SELECT l.spec, l.material, l.property, l.minimum, l.maximum, l.unit, i.imported_at, i.digest
		FROM spec_limits l JOIN imports i ON i.digest = l.import_digest`
	if where != "" {
		query += " WHERE " + where
	}
	rows, err := d.db.QueryContext(ctx, d.q(query), args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	type rec struct {
		l  importedLimit
		at string
	}
	latest := map[[3]string]rec{}
	for rows.Next() {
		var r rec
		var lo, hi sql.NullFloat64
		if err := rows.Scan(&r.l.Spec, &r.l.Material, &r.l.Property, &lo, &hi, &r.l.Unit, &r.at, &r.l.Import); err != nil {
			return nil, err
		}
		r.l.Minimum, r.l.Maximum = math.NaN(), math.NaN()
		if lo.Valid {
			r.l.Minimum = lo.Float64
		}
		if hi.Valid {
			r.l.Maximum = hi.Float64
		}
		k := [3]string{r.l.Spec, r.l.Material, r.l.Property}
		if old, ok := latest[k]; !ok || latestFirst(r.at, r.l.Import, old.at, old.l.Import) {
			latest[k] = r
		}
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	out := make([]importedLimit, 0, len(latest))
	for _, r := range latest {
		out = append(out, r.l)
	}
	sort.Slice(out, func(i, j int) bool {
		a, b := out[i], out[j]
		if a.Spec != b.Spec {
			return a.Spec < b.Spec
		}
		if a.Material != b.Material {
			return a.Material < b.Material
		}
		return a.Property < b.Property
	})
	return out, nil
}

// fingerprint changes whenever an import is recorded (imports are only
// ever added, in one transaction with everything they bring).
func (d *DB) fingerprint(ctx context.Context) (string, error) {
	var n int64
	var at, dg sql.NullString
	err := d.db.QueryRowContext(ctx, `SELECT COUNT(*), MAX(imported_at), MAX(digest) FROM imports`).Scan(&n, &at, &dg)
	if err != nil {
		return "", err
	}
	return strings.Join([]string{itoa(n), at.String, dg.String}, "|"), nil
}

// Import is one recorded import.
type Import struct {
	Digest      string `json:"digest"` // SHA-256 of the file
	Source      string `json:"source"`
	ImportedAt  string `json:"imported_at"`
	User        string `json:"user"`
	ToolVersion string `json:"tool_version"`
}

// lotRow is a lot as stored.
type lotRow struct {
	Lot, Supplier, Material, Import string
}

// specimenRow is a specimen as stored, with its values in stored units.
type specimenRow struct {
	Specimen, Heat, Tested, Condition, Import string
	Values                                    map[string]float64
}

// verdictRow is a verdict with the import that recorded it.
type verdictRow struct {
	Spec, Verdict, Import, ImportedAt string
}

// lotDetail is everything the lot page shows, in stored units.
type lotDetail struct {
	Lot        lotRow
	Specimens  []specimenRow
	Properties []propertyRow   // those with a value in the lot
	Verdicts   []verdictRow    // every import's verdicts, latest first
	Limits     []importedLimit // in force (latest import) for the lot's material
	AllLimits  []importedLimit // every import's, for the lot's material
	Imports    map[string]Import
}

type propertyRow struct {
	Property, Quantity, Unit string
}

// lot reads one lot, its verdicts from idx (nil: from the database); ok is
// false when there is no such lot.
func (d *DB) lot(ctx context.Context, id string, idx *index) (*lotDetail, bool, error) {
	out := &lotDetail{Imports: map[string]Import{}}
	err := d.db.QueryRowContext(ctx, d.q(`SELECT lot, supplier, material, import_digest FROM lots WHERE lot = ?`), id).
		Scan(&out.Lot.Lot, &out.Lot.Supplier, &out.Lot.Material, &out.Lot.Import)
	if err == sql.ErrNoRows {
		return nil, false, nil
	}
	if err != nil {
		return nil, false, err
	}
	rows, err := d.db.QueryContext(ctx, d.q(`SELECT specimen, heat, tested, test_condition, import_digest FROM specimens WHERE lot = ?`), id)
	if err != nil {
		return nil, false, err
	}
	index := map[string]int{}
	for rows.Next() {
		var s specimenRow
		if err := rows.Scan(&s.Specimen, &s.Heat, &s.Tested, &s.Condition, &s.Import); err != nil {
			rows.Close()
			return nil, false, err
		}
		s.Values = map[string]float64{}
		out.Specimens = append(out.Specimens, s)
	}
	if err := closeRows(rows); err != nil {
		return nil, false, err
	}
	sort.Slice(out.Specimens, func(i, j int) bool { return out.Specimens[i].Specimen < out.Specimens[j].Specimen })
	for i, s := range out.Specimens {
		index[s.Specimen] = i
	}
	rows, err = d.db.QueryContext(ctx, d.q(`SELECT m.specimen, m.property, m.value, p.quantity, p.unit
		FROM measurements m JOIN specimens s ON s.specimen = m.specimen JOIN properties p ON p.property = m.property
		WHERE s.lot = ?`), id)
	if err != nil {
		return nil, false, err
	}
	props := map[string]propertyRow{}
	for rows.Next() {
		var sp string
		var p propertyRow
		var v float64
		if err := rows.Scan(&sp, &p.Property, &v, &p.Quantity, &p.Unit); err != nil {
			rows.Close()
			return nil, false, err
		}
		if i, ok := index[sp]; ok {
			out.Specimens[i].Values[p.Property] = v
		}
		props[p.Property] = p
	}
	if err := closeRows(rows); err != nil {
		return nil, false, err
	}
	for _, p := range props {
		out.Properties = append(out.Properties, p)
	}
	sort.Slice(out.Properties, func(i, j int) bool { return out.Properties[i].Property < out.Properties[j].Property })

	if idx != nil {
		out.Verdicts = idx.verdicts[id]
	} else if out.Verdicts, err = d.lotVerdicts(ctx, id); err != nil {
		return nil, false, err
	}
	if out.Limits, err = d.limits(ctx, "l.material = ?", []any{out.Lot.Material}); err != nil {
		return nil, false, err
	}
	rows, err = d.db.QueryContext(ctx, d.q(`SELECT spec, material, property, minimum, maximum, unit, import_digest FROM spec_limits WHERE material = ?`), out.Lot.Material)
	if err != nil {
		return nil, false, err
	}
	for rows.Next() {
		var l importedLimit
		var lo, hi sql.NullFloat64
		if err := rows.Scan(&l.Spec, &l.Material, &l.Property, &lo, &hi, &l.Unit, &l.Import); err != nil {
			rows.Close()
			return nil, false, err
		}
		l.Minimum, l.Maximum = math.NaN(), math.NaN()
		if lo.Valid {
			l.Minimum = lo.Float64
		}
		if hi.Valid {
			l.Maximum = hi.Float64
		}
		out.AllLimits = append(out.AllLimits, l)
	}
	if err := closeRows(rows); err != nil {
		return nil, false, err
	}
	sort.Slice(out.AllLimits, func(i, j int) bool { return out.AllLimits[i].Property < out.AllLimits[j].Property })
	digests := map[string]bool{out.Lot.Import: true}
	for _, s := range out.Specimens {
		digests[s.Import] = true
	}
	for _, v := range out.Verdicts {
		digests[v.Import] = true
	}
	for dg := range digests {
		var im Import
		err := d.db.QueryRowContext(ctx, d.q(`SELECT digest, source, imported_at, user_name, tool_version FROM imports WHERE digest = ?`), dg).
			Scan(&im.Digest, &im.Source, &im.ImportedAt, &im.User, &im.ToolVersion)
		if err != nil && err != sql.ErrNoRows {
			return nil, false, err
		}
		if err == nil {
			out.Imports[dg] = im
		}
	}
	return out, true, nil
}

// lotVerdicts reads the verdicts of one lot, by specification, latest
// import first (a scan of the verdicts table: the schema has no index on
// their lot).
func (d *DB) lotVerdicts(ctx context.Context, id string) ([]verdictRow, error) {
	rows, err := d.db.QueryContext(ctx, d.q(`SELECT v.spec, v.verdict, v.import_digest, i.imported_at
		FROM verdicts v JOIN imports i ON i.digest = v.import_digest WHERE v.lot = ?`), id)
	if err != nil {
		return nil, err
	}
	var out []verdictRow
	for rows.Next() {
		var v verdictRow
		if err := rows.Scan(&v.Spec, &v.Verdict, &v.Import, &v.ImportedAt); err != nil {
			rows.Close()
			return nil, err
		}
		out = append(out, v)
	}
	if err := closeRows(rows); err != nil {
		return nil, err
	}
	sortVerdicts(out)
	return out, nil
}

func sortVerdicts(vs []verdictRow) {
	sort.Slice(vs, func(i, j int) bool {
		a, b := vs[i], vs[j]
		if a.Spec != b.Spec {
			return a.Spec < b.Spec
		}
		return latestFirst(a.ImportedAt, a.Import, b.ImportedAt, b.Import)
	})
}

func closeRows(rows *sql.Rows) error {
	err := rows.Err()
	if cerr := rows.Close(); err == nil {
		err = cerr
	}
	return err
}

// Hit is one search result.
type Hit struct {
	Kind     string `json:"kind"` // lot, heat or specimen
	Key      string `json:"key"`  // the lot, heat or specimen id found
	Lot      string `json:"lot"`
	Supplier string `json:"supplier"`
	Material string `json:"material"`
	Tested   string `json:"tested"`
}

// MaxHits bounds the results of each kind a search returns.
const MaxHits = 50

// likePrefix makes a LIKE pattern matching values that start with s.
func likePrefix(s string) string {
	r := strings.NewReplacer(`\`, `\\`, `%`, `\%`, `_`, `\_`)
	return r.Replace(s) + "%"
}

// search finds lots, heats and specimens whose id starts with q (letter
// case matters), exact matches first; at most MaxHits+1 of each kind (one
// more, so that the page can say the list was cut).
func (d *DB) search(ctx context.Context, q string, idx *index) ([]Hit, error) {
	pat := likePrefix(q)
	queries := []struct{ kind, sql string }{
		{"lot", `SELECT l.lot, l.lot, l.supplier, l.material, COALESCE(MIN(s.tested), '')
			FROM lots l LEFT JOIN specimens s ON s.lot = l.lot
			WHERE l.lot LIKE ? ESCAPE '\' GROUP BY l.lot, l.supplier, l.material ORDER BY l.lot LIMIT ?`},
		{"specimen", `SELECT s.specimen, l.lot, l.supplier, l.material, s.tested
			FROM specimens s JOIN lots l ON l.lot = s.lot
			WHERE s.specimen LIKE ? ESCAPE '\' ORDER BY s.specimen LIMIT ?`},
	}
	var out []Hit
	for _, qq := range queries {
		rows, err := d.db.QueryContext(ctx, d.q(qq.sql), pat, MaxHits+1)
		if err != nil {
			return nil, err
		}
		var hits []Hit
		for rows.Next() {
			h := Hit{Kind: qq.kind}
			if err := rows.Scan(&h.Key, &h.Lot, &h.Supplier, &h.Material, &h.Tested); err != nil {
				rows.Close()
				return nil, err
			}
			hits = append(hits, h)
		}
		if err := closeRows(rows); err != nil {
			return nil, err
		}
		sort.SliceStable(hits, func(i, j int) bool {
			ei, ej := hits[i].Key == q, hits[j].Key == q
			if ei != ej {
				return ei
			}
			if hits[i].Key != hits[j].Key {
				return hits[i].Key < hits[j].Key
			}
			return hits[i].Lot < hits[j].Lot
		})
		out = append(out, hits...)
		if qq.kind == "lot" {
			out = append(out, idx.heatsFrom(q, MaxHits+1)...)
		}
	}
	return out, nil
}

// index is what the lot page and the search need from the whole history,
// read once per state of the database: the schema has no index on a
// lot's verdicts or on heats, and a read-only server adds none.
type index struct {
	verdicts map[string][]verdictRow // per lot: by specification, latest import first
	heats    []Hit                   // every heat and lot, by heat then lot
}

func (d *DB) loadIndex(ctx context.Context) (*index, error) {
	idx := &index{verdicts: map[string][]verdictRow{}}
	rows, err := d.db.QueryContext(ctx, `SELECT v.lot, v.spec, v.verdict, v.import_digest, i.imported_at
		FROM verdicts v JOIN imports i ON i.digest = v.import_digest`)
	if err != nil {
		return nil, err
	}
	for rows.Next() {
		var lot string
		var v verdictRow
		if err := rows.Scan(&lot, &v.Spec, &v.Verdict, &v.Import, &v.ImportedAt); err != nil {
			rows.Close()
			return nil, err
		}
		idx.verdicts[lot] = append(idx.verdicts[lot], v)
	}
	if err := closeRows(rows); err != nil {
		return nil, err
	}
	for _, vs := range idx.verdicts {
		sortVerdicts(vs)
	}
	rows, err = d.db.QueryContext(ctx, `SELECT s.heat, l.lot, l.supplier, l.material, COALESCE(MIN(s.tested), '')
		FROM specimens s JOIN lots l ON l.lot = s.lot
		WHERE s.heat <> '' GROUP BY s.heat, l.lot, l.supplier, l.material`)
	if err != nil {
		return nil, err
	}
	for rows.Next() {
		h := Hit{Kind: "heat"}
		if err := rows.Scan(&h.Key, &h.Lot, &h.Supplier, &h.Material, &h.Tested); err != nil {
			rows.Close()
			return nil, err
		}
		idx.heats = append(idx.heats, h)
	}
	if err := closeRows(rows); err != nil {
		return nil, err
	}
	sort.Slice(idx.heats, func(i, j int) bool {
		a, b := idx.heats[i], idx.heats[j]
		if a.Key != b.Key {
			return a.Key < b.Key
		}
		return a.Lot < b.Lot
	})
	return idx, nil
}

// heatsFrom returns at most n heats starting with q (bytewise, so letter
// case matters), in order.
func (idx *index) heatsFrom(q string, n int) []Hit {
	i := sort.Search(len(idx.heats), func(i int) bool { return idx.heats[i].Key >= q })
	var out []Hit
	for ; i < len(idx.heats) && len(out) < n && strings.HasPrefix(idx.heats[i].Key, q); i++ {
		out = append(out, idx.heats[i])
	}
	return out
}
