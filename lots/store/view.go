package store

import (
	"context"
	"database/sql"
	"math"
	"sort"
	"strconv"
	"strings"
)

// This file holds the queries of the history browser (lotproof serve):
// the lot view, the search and what tells that the history changed.

// latestFirst orders imports: later imported_at first, then larger digest
// (the rule store.Store uses to pick the verdict and limits in force).
func latestFirst(at1, dg1, at2, dg2 string) bool {
	if at1 != at2 {
		return at1 > at2
	}
	return dg1 > dg2
}

// ImportedLimit is a specification limit with the import it came with.
type ImportedLimit struct {
	SpecLimit
	Import string
}

// limits reads the limits in force (latest import per spec, material and
// property), optionally restricted by a WHERE clause on l.
func (s *Store) limits(ctx context.Context, where string, args []any) ([]ImportedLimit, error) {
	query := `SELECT l.spec, l.material, l.property, l.minimum, l.maximum, l.unit, i.imported_at, i.digest
		FROM spec_limits l JOIN imports i ON i.digest = l.import_digest`
	if where != "" {
		query += " WHERE " + where
	}
	rows, err := s.db.QueryContext(ctx, s.q(query), args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	type rec struct {
		l  ImportedLimit
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
	out := make([]ImportedLimit, 0, len(latest))
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

// Fingerprint changes whenever an import is recorded (imports are only
// ever added, in one transaction with everything they bring).
func (s *Store) Fingerprint(ctx context.Context) (string, error) {
	var n int64
	var at, dg sql.NullString
	err := s.db.QueryRowContext(ctx, `SELECT COUNT(*), MAX(imported_at), MAX(digest) FROM imports`).Scan(&n, &at, &dg)
	if err != nil {
		return "", err
	}
	return strings.Join([]string{strconv.FormatInt(n, 10), at.String, dg.String}, "|"), nil
}

// ImportRecord is one recorded import, as the lot view shows it.
type ImportRecord struct {
	Digest      string `json:"digest"` // SHA-256 of the file
	Source      string `json:"source"`
	ImportedAt  string `json:"imported_at"`
	User        string `json:"user"`
	ToolVersion string `json:"tool_version"`
}

// LotRecord is a lot as stored.
type LotRecord struct {
	Lot, Supplier, Material, Import string
}

// SpecimenRecord is a specimen as stored, with its values in stored units.
type SpecimenRecord struct {
	Specimen, Heat, Tested, Condition, Import string
	Values                                    map[string]float64
}

// VerdictRecord is a verdict with the import that recorded it.
type VerdictRecord struct {
	Spec, Verdict, Import, ImportedAt string
}

// LotDetail is everything recorded about one lot, in stored units.
type LotDetail struct {
	Lot        LotRecord
	Specimens  []SpecimenRecord
	Properties []PropertyRecord // those with a value in the lot
	Verdicts   []VerdictRecord  // every import's verdicts, latest first
	Limits     []ImportedLimit  // in force (latest import) for the lot's material
	AllLimits  []ImportedLimit  // every import's, for the lot's material
	Imports    map[string]ImportRecord
}

// PropertyRecord is a property with its quantity and stored unit.
type PropertyRecord struct {
	Property, Quantity, Unit string
}

// Lot reads one lot, its verdicts from idx (nil: from the database); ok is
// false when there is no such lot.
func (s *Store) Lot(ctx context.Context, id string, idx *LookupIndex) (*LotDetail, bool, error) {
	out := &LotDetail{Imports: map[string]ImportRecord{}}
	err := s.db.QueryRowContext(ctx, s.q(`SELECT lot, supplier, material, import_digest FROM lots WHERE lot = ?`), id).
		Scan(&out.Lot.Lot, &out.Lot.Supplier, &out.Lot.Material, &out.Lot.Import)
	if err == sql.ErrNoRows {
		return nil, false, nil
	}
	if err != nil {
		return nil, false, err
	}
	rows, err := s.db.QueryContext(ctx, s.q(`SELECT specimen, heat, tested, test_condition, import_digest FROM specimens WHERE lot = ?`), id)
	if err != nil {
		return nil, false, err
	}
	index := map[string]int{}
	for rows.Next() {
		var sp SpecimenRecord
		if err := rows.Scan(&sp.Specimen, &sp.Heat, &sp.Tested, &sp.Condition, &sp.Import); err != nil {
			rows.Close()
			return nil, false, err
		}
		sp.Values = map[string]float64{}
		out.Specimens = append(out.Specimens, sp)
	}
	if err := closeRows(rows); err != nil {
		return nil, false, err
	}
	sort.Slice(out.Specimens, func(i, j int) bool { return out.Specimens[i].Specimen < out.Specimens[j].Specimen })
	for i, sp := range out.Specimens {
		index[sp.Specimen] = i
	}
	rows, err = s.db.QueryContext(ctx, s.q(`SELECT m.specimen, m.property, m.value, p.quantity, p.unit
		FROM measurements m JOIN specimens s ON s.specimen = m.specimen JOIN properties p ON p.property = m.property
		WHERE s.lot = ?`), id)
	if err != nil {
		return nil, false, err
	}
	props := map[string]PropertyRecord{}
	for rows.Next() {
		var sp string
		var p PropertyRecord
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
		out.Verdicts = idx.Verdicts[id]
	} else if out.Verdicts, err = s.lotVerdicts(ctx, id); err != nil {
		return nil, false, err
	}
	if out.Limits, err = s.limits(ctx, "l.material = ?", []any{out.Lot.Material}); err != nil {
		return nil, false, err
	}
	rows, err = s.db.QueryContext(ctx, s.q(`SELECT spec, material, property, minimum, maximum, unit, import_digest FROM spec_limits WHERE material = ?`), out.Lot.Material)
	if err != nil {
		return nil, false, err
	}
	for rows.Next() {
		var l ImportedLimit
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
	for _, sp := range out.Specimens {
		digests[sp.Import] = true
	}
	for _, v := range out.Verdicts {
		digests[v.Import] = true
	}
	for dg := range digests {
		var im ImportRecord
		err := s.db.QueryRowContext(ctx, s.q(`SELECT digest, source, imported_at, user_name, tool_version FROM imports WHERE digest = ?`), dg).
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
func (s *Store) lotVerdicts(ctx context.Context, id string) ([]VerdictRecord, error) {
	rows, err := s.db.QueryContext(ctx, s.q(`SELECT v.spec, v.verdict, v.import_digest, i.imported_at
		FROM verdicts v JOIN imports i ON i.digest = v.import_digest WHERE v.lot = ?`), id)
	if err != nil {
		return nil, err
	}
	var out []VerdictRecord
	for rows.Next() {
		var v VerdictRecord
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

func sortVerdicts(vs []VerdictRecord) {
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

// Search finds lots, heats and specimens whose id starts with q (letter
// case matters; OpenView makes SQLite's LIKE case-sensitive), exact
// matches first; at most MaxHits+1 of each kind (one more, so that the
// page can say the list was cut). Heats come from idx.
func (s *Store) Search(ctx context.Context, q string, idx *LookupIndex) ([]Hit, error) {
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
		rows, err := s.db.QueryContext(ctx, s.q(qq.sql), pat, MaxHits+1)
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
			out = append(out, idx.HeatsFrom(q, MaxHits+1)...)
		}
	}
	return out, nil
}

// LookupIndex is what the lot view and the search need from the whole
// history, read once per state of the database: the schema has no index
// on a lot's verdicts or on heats, and a read-only reader adds none.
type LookupIndex struct {
	Verdicts map[string][]VerdictRecord // per lot: by specification, latest import first
	Heats    []Hit                      // every heat and lot, by heat then lot
}

// LoadIndex reads the LookupIndex.
func (s *Store) LoadIndex(ctx context.Context) (*LookupIndex, error) {
	idx := &LookupIndex{Verdicts: map[string][]VerdictRecord{}}
	rows, err := s.db.QueryContext(ctx, `SELECT v.lot, v.spec, v.verdict, v.import_digest, i.imported_at
		FROM verdicts v JOIN imports i ON i.digest = v.import_digest`)
	if err != nil {
		return nil, err
	}
	for rows.Next() {
		var lot string
		var v VerdictRecord
		if err := rows.Scan(&lot, &v.Spec, &v.Verdict, &v.Import, &v.ImportedAt); err != nil {
			rows.Close()
			return nil, err
		}
		idx.Verdicts[lot] = append(idx.Verdicts[lot], v)
	}
	if err := closeRows(rows); err != nil {
		return nil, err
	}
	for _, vs := range idx.Verdicts {
		sortVerdicts(vs)
	}
	rows, err = s.db.QueryContext(ctx, `SELECT s.heat, l.lot, l.supplier, l.material, COALESCE(MIN(s.tested), '')
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
		idx.Heats = append(idx.Heats, h)
	}
	if err := closeRows(rows); err != nil {
		return nil, err
	}
	sort.Slice(idx.Heats, func(i, j int) bool {
		a, b := idx.Heats[i], idx.Heats[j]
		if a.Key != b.Key {
			return a.Key < b.Key
		}
		return a.Lot < b.Lot
	})
	return idx, nil
}

// HeatsFrom returns at most n heats starting with q (bytewise, so letter
// case matters), in order.
func (idx *LookupIndex) HeatsFrom(q string, n int) []Hit {
	i := sort.Search(len(idx.Heats), func(i int) bool { return idx.Heats[i].Key >= q })
	var out []Hit
	for ; i < len(idx.Heats) && len(out) < n && strings.HasPrefix(idx.Heats[i].Key, q); i++ {
		out = append(out, idx.Heats[i])
	}
	return out
}
