package report

// Status marks a value or a decision. It is shown as a symbol and a word,
// with a restrained colour on screen, so that it reads the same when the
// report is printed in black and white.
type Status string

// Statuses a cell, summary item or audit step can carry.
const (
	None      Status = ""
	OK        Status = "ok"        // accepted, passed, within limits
	Fail      Status = "fail"      // rejected, failed, outside limits
	Undecided Status = "undecided" // the data cannot decide either way
	Warn      Status = "warn"      // passed with a caution, or a signal to look at
	Info      Status = "info"      // informative only
)

// symbol is the print-safe mark for a status.
func (s Status) symbol() string {
	switch s {
	case OK:
		return "✓"
	case Fail:
		return "✗"
	case Undecided:
		return "?"
	case Warn:
		return "!"
	case Info:
		return "i"
	}
	return ""
}

// word is the status spelled out for screen readers and for the legend.
func (s Status) word() string {
	switch s {
	case OK:
		return "pass"
	case Fail:
		return "fail"
	case Undecided:
		return "undecided"
	case Warn:
		return "caution"
	case Info:
		return "note"
	}
	return ""
}

// class is the CSS class of a status ("" for None and unknown values).
func (s Status) class() string {
	if s.symbol() == "" {
		return ""
	}
	return "st-" + string(s)
}

// Document is a whole report.
type Document struct {
	Title    string
	Subtitle string
	Meta     Meta
	// Summary is the box at the top: the few results a reader needs first.
	Summary []KV
	// Cautions are shown prominently under the summary (for example the
	// statement that statistical values support, and never replace, the
	// governing specification and engineering judgement).
	Cautions []string
	Sections []Section
}

// Meta is what makes the report traceable.
type Meta struct {
	Inputs  []Input
	Version string // tool version (lots.Version)
	Date    string // date of the run, as the caller wants it shown; never read from the clock here
	Seed    string // random seed, empty when nothing random was used
	Extra   []KV   // other facts of the run (options, spec file, database)
}

// Input is one input file and its digest.
type Input struct {
	Name   string
	Digest string // SHA-256, hex
	Bytes  int64  // 0 when unknown
}

// KV is a labelled value, optionally with a status.
type KV struct {
	Key    string
	Value  string
	Status Status
}

// Section is a numbered major section; it starts on a new page in print.
type Section struct {
	Title  string
	Intro  string
	Blocks []Block
}

// Block is one piece of a section: Paragraph, List, KeyValues, *Table,
// *Figure or *Audit.
type Block interface{ isBlock() }

// Paragraph is a paragraph of plain text.
type Paragraph string

// List is a bulleted list with an optional title.
type List struct {
	Title string
	Items []string
}

// KeyValues is a list of labelled values with an optional title.
type KeyValues struct {
	Title string
	Items []KV
}

// Table is a numbered table. Columns marked Numeric are right-aligned.
type Table struct {
	Title   string
	Columns []Column
	Rows    [][]Cell
	Note    string // shown under the table
}

// Column is a table heading.
type Column struct {
	Label   string
	Numeric bool
}

// Cell is a table cell: text and an optional status.
type Cell struct {
	Text   string
	Status Status
}

// Figure is a numbered figure: an SVG drawing, a title and a caption. The
// SVG comes from this package's plot functions or from another lotproof
// package (for example a stress-strain curve); it is checked before it is
// embedded (no scripts, no event handlers, no external references) and its
// ids are prefixed so that figures cannot clash.
type Figure struct {
	Title   string
	Caption string
	SVG     []byte
}

// Audit is an audit trail: the steps that led to a decision.
type Audit struct {
	Title string
	Steps []Step
}

// Step is one audited step.
type Step struct {
	Step      string // what was done
	Statistic string // the value computed
	Threshold string // what it was compared with
	Decision  string // what followed
	Reason    string // why (method, source)
	Status    Status
}

func (Paragraph) isBlock() {}
func (List) isBlock()      {}
func (KeyValues) isBlock() {}
func (*Table) isBlock()    {}
func (*Figure) isBlock()   {}
func (*Audit) isBlock()    {}

// Cells makes a row of plain cells.
func Cells(texts ...string) []Cell {
	out := make([]Cell, len(texts))
	for i, t := range texts {
		out[i] = Cell{Text: t}
	}
	return out
}

// Cols makes columns from labels; a label starting with ">" is numeric
// (right-aligned) and the ">" is dropped.
func Cols(labels ...string) []Column {
	out := make([]Column, len(labels))
	for i, l := range labels {
		if len(l) > 0 && l[0] == '>' {
			out[i] = Column{Label: l[1:], Numeric: true}
		} else {
			out[i] = Column{Label: l}
		}
	}
	return out
}
