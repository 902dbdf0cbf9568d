package store

import (
	"context"
	"database/sql"
	"fmt"
	"lotproof/spec"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"lotproof/lots"
	"lotproof/lots/units"
)

// Verdict is the acceptance verdict of one lot against one specification.
type Verdict struct {
	Lot     string
	Spec    string // specification id (and revision)
	Verdict string // conforming, nonconforming, undecided, not judged
}

// SpecLimit is one property limit of a specification used in an import,
// in the property's internal unit (Unit names it). NaN: no such limit.
type SpecLimit struct {
	Spec     string
	Material string
	Property string
	Minimum  float64
	Maximum  float64
	Unit     string
}

// Meta describes an import: when and by whom. Time comes from the caller
// (an injectable clock) so that results are reproducible.
type Meta struct {
	Time    time.Time
	User    string
	Version string // lotproof version that recorded it
}

// RecordResult says what an import changed.
type RecordResult struct {
	Digest          string `json:"sha256"` // SHA-256 of the file (of the files' digests when several were combined)
	Source          string `json:"source"`
	AlreadyRecorded bool   `json:"already_recorded"` // the same file (SHA-256) was recorded before: nothing changed
	SpecimensNew    int    `json:"specimens_new"`
	SpecimensSame   int    `json:"specimens_same"`     // already stored; values agree (additions aside)
	SpecimensAdded  int    `json:"specimens_extended"` // already stored, and this file adds properties (or heat, date, condition) they had not
	ValuesAdded     int    `json:"values_added"`       // property values added to specimens already stored
	LotsNew         int    `json:"lots_new"`
	Verdicts        int    `json:"verdicts"`
	SpecLimits      int    `json:"spec_limits"`
	ImportedAt      string `json:"imported_at"`
	User            string `json:"user"`
}

// Conflict is a specimen (or lot, or property) already stored with
// different values than the file gives.
type Conflict struct {
	Kind     string `json:"kind"` // specimen, lot or property
	Key      string `json:"key"`
	Field    string `json:"field"`
	Stored   string `json:"stored"`
	Incoming string `json:"incoming"`
	Line     int    `json:"line,omitempty"`      // line of the incoming file
	StoredIn string `json:"stored_in,omitempty"` // the recorded file the specimen was first recorded from
}

func (c Conflict) String() string {
	from := ""
	if c.StoredIn != "" {
		from = " (specimen first recorded from " + c.StoredIn + ")"
	}
	return fmt.Sprintf("%s %q: %s is %s in the database%s but %s in the file", c.Kind, c.Key, c.Field, c.Stored, from, c.Incoming)
}

// ConflictError reports conflicts found during an import; nothing of the
// import was written.
type ConflictError struct {
	Source    string
	Conflicts []Conflict // at most MaxConflicts
	More      int        // conflicts beyond those listed
}

// MaxConflicts is how many conflicts an import lists before counting.
const MaxConflicts = 20

func (e *ConflictError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s conflicts with the recorded history; nothing was written", e.Source)
	for _, c := range e.Conflicts {
		b.WriteString("\n  ")
		if c.Line > 0 {
			fmt.Fprintf(&b, "%s:%d: ", e.Source, c.Line)
		}
		b.WriteString(c.String())
	}
	if e.More > 0 {
		fmt.Fprintf(&b, "\n  ... and %d more conflicts", e.More)
	}
	return b.String()
}

func (e *ConflictError) add(c Conflict) {
	if len(e.Conflicts) < MaxConflicts {
		e.Conflicts = append(e.Conflicts, c)
	} else {
		e.More++
	}
}

// LimitsOf lists the limits of the specifications in the store's form
// (internal units).
func LimitsOf(specs []*spec.Spec) []SpecLimit {
	var out []SpecLimit
	for _, s := range specs {
		for _, l := range s.Limits {
			out = append(out, SpecLimit{Spec: s.Label(), Material: s.Material, Property: l.Property,
				Minimum: l.Min, Maximum: l.Max, Unit: StoredUnit(l.Unit)})
		}
	}
	return out
}

// batchRows is the number of rows per multi-row INSERT (at most 6 values
// per row, far below the SQLite and PostgreSQL parameter limits).
const batchRows = 256

// placeholders writes n groups of k placeholders: (?, ?), (?, ?), ...
func placeholders(n, k int) string {
	var b strings.Builder
	b.Grow(n * (3*k + 3))
	for i := 0; i < n; i++ {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteByte('(')
		for j := 0; j < k; j++ {
			if j > 0 {
				b.WriteString(", ")
			}
			b.WriteByte('?')
		}
		b.WriteByte(')')
	}
	return b.String()
}

// StoredUnit is the unit values of a property are stored in: the internal
// unit of its quantity, except for hardness (scales are never converted, so
// the scale symbol is kept) and dimensionless values.
func StoredUnit(u units.Unit) string {
	if u.Quantity == units.Hardness || u.Quantity == units.Dimensionless {
		return u.Symbol
	}
	return units.Internal(u.Quantity).Symbol
}

// fmtValue writes a stored or incoming value for a conflict message.
func fmtValue(v float64, present bool, unit string) string {
	if !present || math.IsNaN(v) {
		return "missing"
	}
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if unit != "" {
		s += " " + unit
	}
	return s
}

// Record stores the dataset's specimens and lots, the verdicts and the
// specification limits used, in one transaction. When the file's SHA-256
// was recorded before, nothing changes and the result says so. A specimen
// stored before is compared: a property (or heat, test date, condition) it
// has no value for yet is an addition and is stored (hardness recorded
// first, tensile results of the same specimens later); an empty cell adds
// nothing; a different value is a conflict: Record returns a
// *ConflictError and writes nothing.
func (s *Store) Record(ctx context.Context, d *lots.Dataset, verdicts []Verdict, limits []SpecLimit, meta Meta) (*RecordResult, error) {
	if d == nil {
		return nil, fmt.Errorf("store: no dataset")
	}
	return s.RecordStream(ctx, DatasetInput(d), verdicts, limits, meta)
}

// DatasetInput is the RecordInput of a dataset held in memory.
func DatasetInput(d *lots.Dataset) RecordInput {
	return RecordInput{Digest: d.Digest, Source: d.Source, Properties: d.Properties, Specimens: d.Len(),
		Each: func(fn func(*lots.Specimen) error) error {
			var s lots.Specimen // one for all: fn does not keep it
			for i := range d.Len() {
				s = d.Specimen(i)
				if err := fn(&s); err != nil {
					return err
				}
			}
			return nil
		}}
}

// RecordInput is a results file to record without holding it in memory:
// its digest, source, properties and number of specimens (known from a
// first reading, e.g. lots.ScanLotsFile), and Each, which reads the
// specimens again in file order and calls fn for each (fn may keep nothing
// of the specimen it is given; an error from fn or from reading ends the
// recording, and nothing is written).
type RecordInput struct {
	Digest     string
	Source     string
	Properties []lots.Property
	Specimens  int
	Each       func(fn func(*lots.Specimen) error) error
}

// RecordStream is Record for a file read as it is recorded: memory holds
// one batch of specimens and the keys of the lots met, not the file.
func (s *Store) RecordStream(ctx context.Context, in RecordInput, verdicts []Verdict, limits []SpecLimit, meta Meta) (*RecordResult, error) {
	if len(in.Digest) != 64 {
		return nil, fmt.Errorf("store: dataset %s has no SHA-256 digest", in.Source)
	}
	if in.Each == nil {
		return nil, fmt.Errorf("store: no specimens to read")
	}
	if meta.Time.IsZero() {
		return nil, fmt.Errorf("store: import time not set")
	}
	if meta.User == "" {
		meta.User = "unknown"
	}
	verdicts = dedupeVerdicts(verdicts)
	limits = dedupeLimits(limits)
	res := &RecordResult{}
	err := s.inTx(ctx, func(tx *sql.Tx) error {
		r, err := s.record(ctx, tx, in, verdicts, limits, meta)
		if err == nil {
			*res = *r
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	return res, nil
}

func dedupeVerdicts(in []Verdict) []Verdict {
	seen := map[[2]string]int{}
	var out []Verdict
	for _, v := range in {
		k := [2]string{v.Lot, v.Spec}
		if i, ok := seen[k]; ok {
			out[i] = v
			continue
		}
		seen[k] = len(out)
		out = append(out, v)
	}
	return out
}

func dedupeLimits(in []SpecLimit) []SpecLimit {
	seen := map[[3]string]int{}
	var out []SpecLimit
	for _, l := range in {
		k := [3]string{l.Spec, l.Material, l.Property}
		if i, ok := seen[k]; ok {
			out[i] = l
			continue
		}
		seen[k] = len(out)
		out = append(out, l)
	}
	return out
}

func nullable(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

func (s *Store) record(ctx context.Context, tx *sql.Tx, d RecordInput, verdicts []Verdict, limits []SpecLimit, meta Meta) (*RecordResult, error) {
	res := &RecordResult{
		Digest:     d.Digest,
		Source:     d.Source,
		ImportedAt: meta.Time.UTC().Format(time.RFC3339Nano),
		User:       meta.User,
	}
	var one int
	err := tx.QueryRowContext(ctx, s.q(`SELECT 1 FROM imports WHERE digest = ?`), d.Digest).Scan(&one)
	if err == nil {
		res.AlreadyRecorded = true
		var at, user string
		if err := tx.QueryRowContext(ctx, s.q(`SELECT imported_at, user_name FROM imports WHERE digest = ?`), d.Digest).Scan(&at, &user); err != nil {
			return nil, err
		}
		// The counts say what this run did: nothing new, every specimen
		// already stored. When and by whom are those of the first import.
		res.ImportedAt, res.User, res.SpecimensNew, res.SpecimensSame = at, user, 0, d.Specimens
		return res, nil
	}
	if err != sql.ErrNoRows {
		return nil, err
	}
	if _, err := tx.ExecContext(ctx, s.q(`INSERT INTO imports (digest, source, imported_at, user_name, specimens_new, specimens_same, tool_version) VALUES (?, ?, ?, ?, 0, 0, ?)`),
		d.Digest, d.Source, res.ImportedAt, meta.User, meta.Version); err != nil {
		return nil, err
	}
	conf := &ConflictError{Source: d.Source}

	// Properties: the same name must keep the same quantity.
	unitOf := make([]string, len(d.Properties))
	for i, p := range d.Properties {
		unitOf[i] = StoredUnit(p.Unit)
		if _, err := tx.ExecContext(ctx, s.q(`INSERT INTO properties (property, quantity, unit) VALUES (?, ?, ?) ON CONFLICT (property) DO NOTHING`),
			p.Name, p.Unit.Quantity.String(), unitOf[i]); err != nil {
			return nil, err
		}
		var q, u string
		if err := tx.QueryRowContext(ctx, s.q(`SELECT quantity, unit FROM properties WHERE property = ?`), p.Name).Scan(&q, &u); err != nil {
			return nil, err
		}
		if q != p.Unit.Quantity.String() || u != unitOf[i] {
			conf.add(Conflict{Kind: "property", Key: p.Name, Field: "quantity", Stored: q + " [" + u + "]", Incoming: p.Unit.Quantity.String() + " [" + p.Unit.Symbol + "]"})
		} else if err := s.noteEnteredUnit(ctx, tx, p.Name, p.Unit.Symbol); err != nil {
			return nil, err
		}
	}

	// Lots: the same lot must keep its supplier and material. A lot is
	// written when its first specimen is met (before that specimen), with
	// that specimen's supplier and material, as lots.Dataset.Group takes
	// them. Its conflicts are listed before those of specimens, as when
	// the lots were written first.
	lotStmt, err := tx.PrepareContext(ctx, s.q(`INSERT INTO lots (lot, supplier, material, import_digest) VALUES (?, ?, ?, ?) ON CONFLICT (lot) DO NOTHING`))
	if err != nil {
		return nil, err
	}
	defer lotStmt.Close()
	lotConf := &ConflictError{Source: d.Source}
	metLots := map[string]bool{}
	addLot := func(sp *lots.Specimen) error {
		if metLots[sp.Lot] {
			return nil
		}
		key := strings.Clone(sp.Lot)
		metLots[key] = true
		r, err := lotStmt.ExecContext(ctx, key, sp.Supplier, sp.Material, d.Digest)
		if err != nil {
			return err
		}
		if n, _ := r.RowsAffected(); n == 1 {
			res.LotsNew++
			return nil
		}
		var sup, mat string
		if err := tx.QueryRowContext(ctx, s.q(`SELECT supplier, material FROM lots WHERE lot = ?`), key).Scan(&sup, &mat); err != nil {
			return err
		}
		// A supplier or material not recorded yet is an addition; an
		// empty one in the file changes nothing.
		for _, f := range []struct{ name, stored, incoming string }{{"supplier", sup, sp.Supplier}, {"material", mat, sp.Material}} {
			switch {
			case f.stored == f.incoming || f.incoming == "":
			case f.stored == "":
				if _, err := tx.ExecContext(ctx, s.q(`UPDATE lots SET `+f.name+` = ? WHERE lot = ?`), f.incoming, key); err != nil {
					return err
				}
			default:
				lotConf.add(Conflict{Kind: "lot", Key: key, Field: f.name, Stored: strconv.Quote(f.stored), Incoming: strconv.Quote(f.incoming), Line: sp.Line})
			}
		}
		return nil
	}
	conflicts := func() bool { return len(conf.Conflicts) > 0 || len(lotConf.Conflicts) > 0 }

	// Specimens and their values, in multi-row statements of up to
	// batchRows rows. RETURNING (SQLite >= 3.35, PostgreSQL) tells which
	// specimens were new; the others were stored before and are compared.
	specSQL := func(n int) string {
		return s.q(`INSERT INTO specimens (specimen, lot, heat, tested, test_condition, import_digest) VALUES ` +
			placeholders(n, 6) + ` ON CONFLICT (specimen) DO NOTHING RETURNING specimen`)
	}
	valSQL := func(n int) string {
		return s.q(`INSERT INTO measurements (specimen, property, value, lot) VALUES ` + placeholders(n, 4))
	}
	var fullSpec, fullVal *sql.Stmt
	defer func() {
		if fullSpec != nil {
			fullSpec.Close()
		}
		if fullVal != nil {
			fullVal.Close()
		}
	}()
	args := make([]any, 0, 6*batchRows)
	vals := make([]any, 0, 4*batchRows)
	flushVals := func() error {
		n := len(vals) / 4
		if n == 0 {
			return nil
		}
		var err error
		if n == batchRows {
			if fullVal == nil {
				if fullVal, err = tx.PrepareContext(ctx, valSQL(batchRows)); err != nil {
					return err
				}
			}
			_, err = fullVal.ExecContext(ctx, vals...)
		} else {
			_, err = tx.ExecContext(ctx, valSQL(n), vals...)
		}
		vals = vals[:0]
		return err
	}
	inserted := map[string]bool{}
	chunk := make([]lots.Specimen, 0, batchRows)
	flushChunk := func() error {
		if err := ctx.Err(); err != nil {
			return err
		}
		args = args[:0]
		for i := range chunk {
			sp := &chunk[i]
			args = append(args, sp.ID, sp.Lot, sp.Heat, sp.Tested, sp.Condition, d.Digest)
		}
		var rows *sql.Rows
		if len(chunk) == batchRows {
			if fullSpec == nil {
				if fullSpec, err = tx.PrepareContext(ctx, specSQL(batchRows)); err != nil {
					return err
				}
			}
			rows, err = fullSpec.QueryContext(ctx, args...)
		} else {
			rows, err = tx.QueryContext(ctx, specSQL(len(chunk)), args...)
		}
		if err != nil {
			return err
		}
		clear(inserted)
		for rows.Next() {
			var id string
			if err := rows.Scan(&id); err != nil {
				rows.Close()
				return err
			}
			inserted[id] = true
		}
		if err := rows.Close(); err != nil {
			return err
		}
		for i := range chunk {
			sp := &chunk[i]
			if !inserted[sp.ID] {
				if !conflicts() {
					if err := flushVals(); err != nil { // the stored specimen may be from this chunk
						return err
					}
				}
				added, err := s.compare(ctx, tx, d, sp, unitOf, conf, func(pi int, lot string) error {
					vals = append(vals, sp.ID, d.Properties[pi].Name, sp.Values[pi], lot) // the stored lot
					if len(vals) == 4*batchRows {
						return flushVals()
					}
					return nil
				})
				if err != nil {
					return err
				}
				res.SpecimensSame++
				if added > 0 {
					res.SpecimensAdded++
					res.ValuesAdded += added
				}
				continue
			}
			// A specimen id twice in one file: the second is compared.
			delete(inserted, sp.ID)
			res.SpecimensNew++
			if conflicts() {
				continue // nothing will be written; only look for more conflicts
			}
			for pi, v := range sp.Values {
				if math.IsNaN(v) {
					continue
				}
				vals = append(vals, sp.ID, d.Properties[pi].Name, v, sp.Lot)
				if len(vals) == 4*batchRows {
					if err := flushVals(); err != nil {
						return err
					}
				}
			}
		}
		// Write the values before comparing the next chunk, which may
		// hold this chunk's specimen ids again.
		if !conflicts() {
			if err := flushVals(); err != nil {
				return err
			}
		}
		return nil
	}
	err = d.Each(func(sp *lots.Specimen) error {
		if err := addLot(sp); err != nil {
			return err
		}
		chunk = append(chunk, cloneSpecimen(sp))
		if len(chunk) == batchRows {
			err := flushChunk()
			chunk = chunk[:0]
			return err
		}
		return nil
	})
	if err == nil && len(chunk) > 0 {
		err = flushChunk()
	}
	if err != nil {
		return nil, err
	}
	if len(lotConf.Conflicts) > 0 {
		lotConf.Conflicts = append(lotConf.Conflicts, conf.Conflicts...)
		conf = lotConf
	}
	if len(conf.Conflicts) > 0 {
		return nil, conf
	}

	for _, v := range verdicts {
		if _, err := tx.ExecContext(ctx, s.q(`INSERT INTO verdicts (import_digest, lot, spec, verdict) VALUES (?, ?, ?, ?)`), d.Digest, v.Lot, v.Spec, v.Verdict); err != nil {
			return nil, fmt.Errorf("store: verdict of lot %q: %w", v.Lot, err)
		}
		res.Verdicts++
	}
	for _, l := range limits {
		if _, err := tx.ExecContext(ctx, s.q(`INSERT INTO spec_limits (import_digest, spec, material, property, minimum, maximum, unit) VALUES (?, ?, ?, ?, ?, ?, ?)`),
			d.Digest, l.Spec, l.Material, l.Property, nullable(l.Minimum), nullable(l.Maximum), l.Unit); err != nil {
			return nil, err
		}
		res.SpecLimits++
	}
	if _, err := tx.ExecContext(ctx, s.q(`UPDATE imports SET specimens_new = ?, specimens_same = ? WHERE digest = ?`), res.SpecimensNew, res.SpecimensSame, d.Digest); err != nil {
		return nil, err
	}
	return res, nil
}

// compare checks a specimen already stored against the incoming one. A
// value the stored specimen lacks is an addition: identity fields are
// filled in at once, property values handed to addValue (written with the
// import unless a conflict turns up). It returns the number of additions.
func (s *Store) compare(ctx context.Context, tx *sql.Tx, d RecordInput, sp *lots.Specimen, unitOf []string, conf *ConflictError, addValue func(pi int, lot string) error) (int, error) {
	var lot, heat, tested, cond, from string
	if err := tx.QueryRowContext(ctx, s.q(`SELECT s.lot, s.heat, s.tested, s.test_condition, i.source FROM specimens s JOIN imports i ON i.digest = s.import_digest WHERE s.specimen = ?`), sp.ID).Scan(&lot, &heat, &tested, &cond, &from); err != nil {
		return 0, err
	}
	add := func(field, stored, incoming string) {
		conf.add(Conflict{Kind: "specimen", Key: sp.ID, Field: field, Stored: stored, Incoming: incoming, Line: sp.Line, StoredIn: from})
	}
	added := 0
	for _, f := range []struct{ name, col, a, b string }{{"lot", "lot", lot, sp.Lot}, {"heat", "heat", heat, sp.Heat}, {"tested", "tested", tested, sp.Tested}, {"condition", "test_condition", cond, sp.Condition}} {
		switch {
		case f.a == f.b || f.b == "":
		case f.a == "" && f.col != "lot":
			if _, err := tx.ExecContext(ctx, s.q(`UPDATE specimens SET `+f.col+` = ? WHERE specimen = ?`), f.b, sp.ID); err != nil {
				return 0, err
			}
			added++
		default:
			add(f.name, strconv.Quote(f.a), strconv.Quote(f.b))
		}
	}
	rows, err := tx.QueryContext(ctx, s.q(`SELECT property, value FROM measurements WHERE specimen = ?`), sp.ID)
	if err != nil {
		return 0, err
	}
	stored := map[string]float64{}
	for rows.Next() {
		var p string
		var v float64
		if err := rows.Scan(&p, &v); err != nil {
			rows.Close()
			return 0, err
		}
		stored[p] = v
	}
	if err := rows.Close(); err != nil {
		return 0, err
	}
	for pi, p := range d.Properties {
		v := sp.Values[pi]
		sv, ok := stored[p.Name]
		switch {
		case math.IsNaN(v): // an empty cell adds nothing and changes nothing
		case !ok:
			if err := addValue(pi, lot); err != nil {
				return 0, err
			}
			added++
		case sv != v:
			add(p.Name, fmtValue(sv, ok, unitOf[pi]), fmtValue(v, true, unitOf[pi]))
		}
	}
	return added, nil
}

// Import is one recorded file.
type Import struct {
	Digest        string `json:"digest"`
	Source        string `json:"source"`
	ImportedAt    string `json:"imported_at"`
	User          string `json:"user"`
	SpecimensNew  int    `json:"specimens_new"`
	SpecimensSame int    `json:"specimens_same"`
}

// Imports lists the recorded files in the order they were recorded.
func (s *Store) Imports(ctx context.Context) ([]Import, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT digest, source, imported_at, user_name, specimens_new, specimens_same FROM imports ORDER BY imported_at, digest`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []Import
	for rows.Next() {
		var im Import
		if err := rows.Scan(&im.Digest, &im.Source, &im.ImportedAt, &im.User, &im.SpecimensNew, &im.SpecimensSame); err != nil {
			return nil, err
		}
		out = append(out, im)
	}
	return out, rows.Err()
}

// cloneSpecimen copies a specimen whose strings and values may live in a
// reader's buffers.
func cloneSpecimen(sp *lots.Specimen) lots.Specimen {
	c := *sp
	c.ID, c.Lot, c.Heat, c.Supplier, c.Material = strings.Clone(sp.ID), strings.Clone(sp.Lot), strings.Clone(sp.Heat), strings.Clone(sp.Supplier), strings.Clone(sp.Material)
	c.Tested, c.Condition = strings.Clone(sp.Tested), strings.Clone(sp.Condition)
	c.Values = slices.Clone(sp.Values)
	return c
}
