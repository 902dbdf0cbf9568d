package spec

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"lotproof/lots"
	"lotproof/lots/input"
	"lotproof/lots/units"
)

// Spec is a validated purchase specification.
type Spec struct {
	Source     string  // file name as given
	ID         string  // specification id, e.g. "OHP-MS-101"
	Revision   string  // revision label, e.g. "C"
	Title      string  // optional free text
	Material   string  // material the specification governs (matched to the data's material column)
	Limits     []Limit // per property, in file order
	Acceptance Rule
}

// Limit is the requirement on one property. Min and Max are in the
// internal unit of the property's quantity (see package units); a bound
// that is not given is NaN.
type Limit struct {
	Property string
	Unit     units.Unit // unit the limits were written in
	Min, Max float64
	Where    string // file:line:column of the property entry
}

// HasMin reports whether the limit has a minimum.
func (l Limit) HasMin() bool { return !math.IsNaN(l.Min) }

// HasMax reports whether the limit has a maximum.
func (l Limit) HasMax() bool { return !math.IsNaN(l.Max) }

// Rule is the acceptance rule of a specification.
type Rule struct {
	Content          float64 // p: proportion of the lot that must lie within the limits
	Confidence       float64 // gamma: confidence with which that must be shown
	MinSpecimens     int     // fewest specimens per lot for a "conforming" verdict
	IndividualReject bool    // an individual value beyond a limit rejects the lot
	Retests          int     // number of retests allowed after a failed lot
	RetestFactor     int     // a retest tests this many times the original specimens
}

// Label is "ID rev R".
func (s *Spec) Label() string {
	if s.Revision == "" {
		return s.ID
	}
	return s.ID + " rev " + s.Revision
}

// Limit returns the limit on the named property (case is ignored).
func (s *Spec) Limit(property string) (Limit, bool) {
	for _, l := range s.Limits {
		if strings.EqualFold(l.Property, strings.TrimSpace(property)) {
			return l, true
		}
	}
	return Limit{}, false
}

// Default acceptance rule values (see SCHEMA.md).
const (
	DefaultContent      = 0.90
	DefaultConfidence   = 0.90
	DefaultMinSpecimens = 5
)

// ReadFile reads and validates a specification file.
func ReadFile(name string) (*Spec, error) {
	b, err := lots.ReadInput(name, input.Spec, nil)
	if err != nil {
		return nil, err
	}
	return Parse(name, b)
}

// ReadFiles reads and validates several specification files and checks
// that they can be used together (CheckSet: one specification per
// material).
func ReadFiles(names []string) ([]*Spec, error) {
	var specs []*Spec
	for _, n := range names {
		s, err := ReadFile(n)
		if err != nil {
			return nil, err
		}
		specs = append(specs, s)
	}
	if len(specs) > 1 {
		if err := CheckSet(specs); err != nil {
			return nil, err
		}
	}
	return specs, nil
}

type parser struct {
	file string
	ps   []lots.Problem
	more int
}

func (p *parser) at(n *yaml.Node) string {
	return fmt.Sprintf("%s:%d:%d", p.file, n.Line, n.Column)
}

func (p *parser) add(n *yaml.Node, fix, format string, args ...any) {
	if len(p.ps) >= lots.MaxProblems {
		p.more++
		return
	}
	p.ps = append(p.ps, lots.Problem{Where: p.at(n), What: fmt.Sprintf(format, args...), Fix: fix})
}

// MaxProperties is the most properties a specification may list.
const MaxProperties = 10000

// Parse validates the YAML text of a specification; name is used in error
// locations. Every problem is reported as a lots.Problem located at
// file:line:column, all in one *lots.InputError.
func Parse(name string, data []byte) (*Spec, error) {
	p := &parser{file: filepath.Base(name)}
	if name == "-" {
		p.file = "-"
	}
	if int64(len(data)) > input.Spec.MaxBytes {
		return nil, lots.Inputf(p.file, input.Spec.Fix, "the specification is larger than the limit of %s", input.Size(input.Spec.MaxBytes))
	}
	var doc yaml.Node
	dec := yaml.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&doc); err != nil {
		return nil, p.yamlError(err)
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err == nil {
		p.add(&extra, "put one specification per file", "a second YAML document starts here")
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		n := &doc
		if len(doc.Content) == 1 {
			n = doc.Content[0]
		}
		p.add(n, "see spec/SCHEMA.md", "a specification must be a YAML mapping of keys to values")
		return nil, p.err()
	}
	s := &Spec{Source: name}
	top := doc.Content[0]
	fields := p.fields(top, map[string]bool{"specification": true, "revision": true, "title": true, "material": true, "properties": true, "acceptance": true}, "top level")
	if n, ok := fields["specification"]; ok {
		s.ID = p.text(n, "specification")
	} else {
		p.add(top, "add `specification: <id>`", "the specification id is missing")
	}
	if n, ok := fields["revision"]; ok {
		s.Revision = p.text(n, "revision")
	} else {
		p.add(top, "add `revision: <label>`", "the revision is missing")
	}
	if n, ok := fields["title"]; ok {
		s.Title = p.text(n, "title")
	}
	if n, ok := fields["material"]; ok {
		s.Material = p.text(n, "material")
	} else {
		p.add(top, "add `material: <name as in the data's material column>`", "the material is missing")
	}
	if n, ok := fields["properties"]; ok {
		s.Limits = p.limits(n)
	} else {
		p.add(top, "add a `properties:` mapping", "no properties are specified")
	}
	s.Acceptance = Rule{Content: DefaultContent, Confidence: DefaultConfidence, MinSpecimens: DefaultMinSpecimens, IndividualReject: true}
	if n, ok := fields["acceptance"]; ok {
		p.rule(n, &s.Acceptance)
	} else {
		p.add(top, "add an `acceptance:` mapping (content, confidence, min_specimens, individual_reject, retests, retest_factor)", "the acceptance rule is missing")
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return s, nil
}

func (p *parser) err() error {
	if len(p.ps) == 0 {
		return nil
	}
	return &lots.InputError{Problems: p.ps, More: p.more}
}

// yamlError turns a syntax error of the YAML decoder into a located problem.
func (p *parser) yamlError(err error) error {
	msg := err.Error()
	line := 1
	// yaml errors read "yaml: line N: ...".
	if i := strings.Index(msg, "line "); i >= 0 {
		rest := msg[i+5:]
		j := strings.IndexByte(rest, ':')
		if j > 0 {
			if v, e := strconv.Atoi(rest[:j]); e == nil {
				line = v
				msg = strings.TrimSpace(rest[j+1:])
			}
		}
	}
	msg = strings.TrimPrefix(msg, "yaml: ")
	if err.Error() == "EOF" {
		msg = "the file is empty"
	}
	return &lots.InputError{Problems: []lots.Problem{{Where: fmt.Sprintf("%s:%d:1", p.file, line), What: "not valid YAML: " + msg, Fix: "see spec/SCHEMA.md"}}}
}

// fields checks that n is a mapping with string keys from allowed, no key
// twice, and returns the value nodes by key.
func (p *parser) fields(n *yaml.Node, allowed map[string]bool, what string) map[string]*yaml.Node {
	out := map[string]*yaml.Node{}
	if n.Kind != yaml.MappingNode {
		p.add(n, "see spec/SCHEMA.md", "%s must be a mapping of keys to values", what)
		return out
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			p.add(k, "use plain keys", "a key in %s must be a plain word", what)
			continue
		}
		if !allowed[k.Value] {
			p.add(k, "allowed keys: "+keyList(allowed), "unknown key %q in %s", k.Value, what)
			continue
		}
		if _, dup := out[k.Value]; dup {
			p.add(k, "give each key once", "key %q appears twice in %s", k.Value, what)
			continue
		}
		out[k.Value] = v
	}
	return out
}

func keyList(m map[string]bool) string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	// stable order
	for i := 1; i < len(ks); i++ {
		for j := i; j > 0 && ks[j] < ks[j-1]; j-- {
			ks[j], ks[j-1] = ks[j-1], ks[j]
		}
	}
	return strings.Join(ks, ", ")
}

func (p *parser) text(n *yaml.Node, key string) string {
	if n.Kind != yaml.ScalarNode || n.Tag == "!!null" || strings.TrimSpace(n.Value) == "" {
		p.add(n, "give a non-empty text value", "%s must be a non-empty text", key)
		return ""
	}
	if off, bad, fix := lots.TextProblem(n.Value); off >= 0 {
		p.add(n, fix, "%s %s", key, bad)
		return ""
	}
	return strings.TrimSpace(n.Value)
}

func (p *parser) number(n *yaml.Node, key string) (float64, bool) {
	if n.Kind != yaml.ScalarNode || (n.Tag != "!!int" && n.Tag != "!!float") {
		p.add(n, "write a plain number such as 930 or 0.9", "%s must be a number, got %q", key, n.Value)
		return math.NaN(), false
	}
	v, err := strconv.ParseFloat(strings.ReplaceAll(n.Value, "_", ""), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		p.add(n, "write a finite number", "%s must be a finite number, got %q", key, n.Value)
		return math.NaN(), false
	}
	return v, true
}

func (p *parser) integer(n *yaml.Node, key string) (int, bool) {
	if n.Kind != yaml.ScalarNode || n.Tag != "!!int" {
		p.add(n, "write a whole number such as 5", "%s must be a whole number, got %q", key, n.Value)
		return 0, false
	}
	v, err := strconv.Atoi(strings.ReplaceAll(n.Value, "_", ""))
	if err != nil {
		p.add(n, "write a whole number such as 5", "%s must be a whole number, got %q", key, n.Value)
		return 0, false
	}
	return v, true
}

func (p *parser) boolean(n *yaml.Node, key string) (bool, bool) {
	if n.Kind != yaml.ScalarNode || n.Tag != "!!bool" {
		p.add(n, "write true or false", "%s must be true or false, got %q", key, n.Value)
		return false, false
	}
	var b bool
	if err := n.Decode(&b); err != nil {
		p.add(n, "write true or false", "%s must be true or false, got %q", key, n.Value)
		return false, false
	}
	return b, true
}

func (p *parser) limits(n *yaml.Node) []Limit {
	if n.Kind != yaml.MappingNode || len(n.Content) == 0 {
		p.add(n, "list each property as `name: {unit: MPa, min: 930}`", "properties must be a non-empty mapping from property name to its limits")
		return nil
	}
	if len(n.Content)/2 > MaxProperties {
		p.add(n, "a specification lists the properties it limits; check that the right file was named", "%d properties, more than the limit of %d", len(n.Content)/2, MaxProperties)
		return nil
	}
	var out []Limit
	seen := map[string]bool{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		name := strings.TrimSpace(k.Value)
		if k.Kind != yaml.ScalarNode || name == "" {
			p.add(k, "use the property name as in the data's column heading (without the unit)", "a property name must be a plain text")
			continue
		}
		if off, bad, fix := lots.TextProblem(name); off >= 0 {
			p.add(k, fix, "the property name %s", bad)
			continue
		}
		if seen[strings.ToLower(name)] {
			p.add(k, "give each property once", "property %q appears twice", name)
			continue
		}
		seen[strings.ToLower(name)] = true
		l := Limit{Property: name, Min: math.NaN(), Max: math.NaN(), Where: p.at(k)}
		f := p.fields(v, map[string]bool{"unit": true, "min": true, "max": true}, "property "+strconv.Quote(name))
		un, ok := f["unit"]
		if !ok {
			if v.Kind == yaml.MappingNode {
				p.add(v, "add `unit: <symbol>`, e.g. MPa, %, HBW", "property %q has no unit", name)
			}
			continue
		}
		u, err := units.Parse(un.Value)
		if err != nil || un.Kind != yaml.ScalarNode {
			p.add(un, "use one of: "+strings.Join(units.Symbols(), ", "), "property %q: unknown unit %q", name, un.Value)
			continue
		}
		l.Unit = u
		for _, b := range []struct {
			key string
			dst *float64
		}{{"min", &l.Min}, {"max", &l.Max}} {
			bn, ok := f[b.key]
			if !ok {
				continue
			}
			x, ok := p.number(bn, name+" "+b.key)
			if !ok {
				continue
			}
			iv := u.ToInternal(x)
			if msg := units.CheckValue(u.Quantity, iv); msg != "" {
				p.add(bn, "correct the limit", "property %q %s %g %s is impossible: %s", name, b.key, x, u.Symbol, msg)
				continue
			}
			if u.Quantity == units.Strain && iv > 10 {
				p.add(bn, "a strain limit is written in % or mm/mm", "property %q %s %g %s is an impossible strain (over 1000 %%)", name, b.key, x, u.Symbol)
				continue
			}
			*b.dst = iv
		}
		_, hasMin := f["min"]
		_, hasMax := f["max"]
		if !hasMin && !hasMax {
			p.add(k, "give `min:`, `max:` or both", "property %q has neither a minimum nor a maximum", name)
			continue
		}
		if l.HasMin() && l.HasMax() && !(l.Min < l.Max) {
			p.add(f["max"], "the maximum must exceed the minimum", "property %q: max %g is not above min %g", name, u.FromInternal(l.Max), u.FromInternal(l.Min))
			continue
		}
		out = append(out, l)
	}
	return out
}

func (p *parser) rule(n *yaml.Node, r *Rule) {
	f := p.fields(n, map[string]bool{"content": true, "confidence": true, "min_specimens": true, "individual_reject": true, "retests": true, "retest_factor": true}, "acceptance")
	prob := func(key string, dst *float64) {
		v, ok := f[key]
		if !ok {
			p.add(n, fmt.Sprintf("add `%s:` (e.g. 0.90)", key), "acceptance %s is missing", key)
			return
		}
		x, ok := p.number(v, "acceptance "+key)
		if !ok {
			return
		}
		if !(x >= 0.5 && x < 1) {
			p.add(v, "give a proportion between 0.5 and 1 (exclusive), e.g. 0.90", "acceptance %s %g is outside [0.5, 1)", key, x)
			return
		}
		*dst = x
	}
	prob("content", &r.Content)
	prob("confidence", &r.Confidence)
	if v, ok := f["min_specimens"]; ok {
		if x, ok := p.integer(v, "acceptance min_specimens"); ok {
			if x < 2 || x > 10000 {
				p.add(v, "give a whole number from 2 (a tolerance bound needs a standard deviation) to 10000", "acceptance min_specimens %d is impossible", x)
			} else {
				r.MinSpecimens = x
			}
		}
	} else if n.Kind == yaml.MappingNode {
		p.add(n, "add `min_specimens:` (e.g. 5)", "acceptance min_specimens is missing")
	}
	if v, ok := f["individual_reject"]; ok {
		if b, ok := p.boolean(v, "acceptance individual_reject"); ok {
			r.IndividualReject = b
		}
	}
	r.Retests, r.RetestFactor = 0, 2
	if v, ok := f["retests"]; ok {
		if x, ok := p.integer(v, "acceptance retests"); ok {
			if x < 0 || x > 10 {
				p.add(v, "give a whole number from 0 to 10", "acceptance retests %d is impossible", x)
			} else {
				r.Retests = x
			}
		}
	}
	if v, ok := f["retest_factor"]; ok {
		if x, ok := p.integer(v, "acceptance retest_factor"); ok {
			if x < 1 || x > 10 {
				p.add(v, "give a whole number from 1 to 10 (2: twice the specimens)", "acceptance retest_factor %d is impossible", x)
			} else {
				r.RetestFactor = x
			}
		}
	}
}

// ForMaterial picks the specification that governs a lot of the given
// material from specs. The rules (see SCHEMA.md, "Which specification
// judges a lot"):
//
//  1. a specification whose material equals the lot's material (case and
//     surrounding space ignored) governs it;
//  2. a lot with no material (the data has no material column, or the cell
//     is empty) is judged by the only specification when exactly one is
//     given, and by none otherwise;
//  3. a lot no specification covers is not judged; the returned reason
//     says why.
//
// Two specifications for the same material are rejected by CheckSet.
func ForMaterial(specs []*Spec, material string) (*Spec, string) {
	m := strings.TrimSpace(material)
	if m == "" {
		if len(specs) == 1 {
			return specs[0], ""
		}
		return nil, fmt.Sprintf("the lot has no material and %d specifications were given, so none can be chosen", len(specs))
	}
	for _, s := range specs {
		if strings.EqualFold(strings.TrimSpace(s.Material), m) {
			return s, ""
		}
	}
	have := make([]string, len(specs))
	for i, s := range specs {
		have[i] = fmt.Sprintf("%s (%s)", s.Label(), s.Material)
	}
	return nil, fmt.Sprintf("no specification covers material %q (given: %s)", m, strings.Join(have, ", "))
}

// CheckSet verifies that no two specifications govern the same material.
func CheckSet(specs []*Spec) error {
	seen := map[string]*Spec{}
	var ps []lots.Problem
	for _, s := range specs {
		k := strings.ToLower(strings.TrimSpace(s.Material))
		if o, dup := seen[k]; dup {
			ps = append(ps, lots.Problem{Where: s.Source, What: fmt.Sprintf("%s and %s (%s) both govern material %q", s.Label(), o.Label(), o.Source, s.Material), Fix: "give one specification per material"})
			continue
		}
		seen[k] = s
	}
	if len(ps) > 0 {
		return &lots.InputError{Problems: ps}
	}
	return nil
}
