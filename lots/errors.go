package lots

import (
	"fmt"
	"strings"
)

// MaxProblems is how many problems an input error lists before it only
// counts the rest.
const MaxProblems = 20

// Problem is one thing wrong with an input file, located as
// file:line:column (CSV, YAML) or file:sheet!cell (xlsx).
type Problem struct {
	Where string // location, e.g. "results.csv:4:17" or "results.xlsx:Sheet1!C4"
	What  string // what is wrong and what was expected
	Fix   string // what to do about it
}

func (p Problem) String() string {
	s := p.Where + ": " + p.What
	if p.Fix != "" {
		s += "; " + p.Fix
	}
	return s
}

// InputError is bad user input: a list of located problems (at most
// MaxProblems of them, with a count of the rest). Commands exit with
// status 2 on it and write nothing.
type InputError struct {
	Problems []Problem
	More     int // problems found beyond MaxProblems
}

func (e *InputError) Error() string {
	var b strings.Builder
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(p.String())
	}
	if e.More > 0 {
		fmt.Fprintf(&b, "\n... and %d more problems", e.More)
	}
	return b.String()
}

// problems collects located problems up to MaxProblems.
type problems struct {
	list []Problem
	more int
}

func (ps *problems) add(where, what, fix string) {
	if len(ps.list) >= MaxProblems {
		ps.more++
		return
	}
	ps.list = append(ps.list, Problem{Where: where, What: what, Fix: fix})
}

func (ps *problems) any() bool { return len(ps.list) > 0 }

func (ps *problems) err() error {
	if !ps.any() {
		return nil
	}
	return &InputError{Problems: ps.list, More: ps.more}
}

// Inputf makes a one-problem input error.
func Inputf(where, fix, format string, args ...any) *InputError {
	return &InputError{Problems: []Problem{{Where: where, What: fmt.Sprintf(format, args...), Fix: fix}}}
}
