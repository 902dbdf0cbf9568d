package main

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/progress"
	"lotproof/lots/render"
)

// inputOptions are the flags of every command that reads a specimen
// results file.
type inputOptions struct {
	Sheet   string   // xlsx sheet
	GroupBy string   // lot or heat
	More    []string // further results files, combined with the first by specimen id
}

// dataArgs accepts one or more results files.
func dataArgs(cmd *cobra.Command, args []string) error {
	if len(args) == 0 {
		return usageError{fmt.Errorf("%s expects one or more results files (CSV, .xlsx or - for standard input); several files are combined by specimen id; see lotproof %s --help", cmd.Name(), cmd.Name())}
	}
	stdin := 0
	for _, a := range args {
		if a == "-" {
			stdin++
		}
	}
	if stdin > 1 {
		return usageError{fmt.Errorf("standard input (-) can be read only once")}
	}
	return nil
}

// readData reads a results file ("-" is standard input) and, when
// in.More names further files, combines them all by specimen id
// (lots.Merge): a specimen's properties may come from different files, and
// a value given differently in two files is an error located in both.
func readData(name string, in inputOptions, st streams) (*lots.Dataset, lots.GroupBy, error) {
	by, err := lots.ParseGroupBy(in.GroupBy)
	if err != nil {
		return nil, "", usageError{err}
	}
	if len(in.More) > 0 {
		names := append([]string{name}, in.More...)
		ds := make([]*lots.Dataset, len(names))
		for i, n := range names {
			if ds[i], _, err = readData(n, inputOptions{Sheet: in.Sheet, GroupBy: in.GroupBy}, st); err != nil {
				return nil, "", err
			}
		}
		var src []string
		for _, d := range ds {
			src = append(src, d.Source)
		}
		d, err := lots.Merge(strings.Join(src, " + "), ds...)
		if err != nil {
			return nil, "", err
		}
		return d, by, nil
	}
	ro := lots.ReadOptions{Sheet: in.Sheet, Stdin: st.In}
	// A bar over the bytes of a large file, on a terminal only.
	if fi, err := os.Stat(name); err == nil && name != "-" && fi.Size() > 32<<20 {
		bar := progress.New(st.Err, st.ErrTerminal, fi.Size(), "read "+filepath.Base(name))
		defer bar.Finish()
		var last int64
		ro.Progress = func(n int64) { bar.Add(n - last); last = n }
	}
	d, err := lots.ReadFile(name, ro)
	if err != nil {
		return nil, "", err
	}
	return d, by, nil
}

// emit renders everything into memory first and writes it to w only when
// rendering succeeded, so a failing command writes nothing partial.
func emit(w io.Writer, render func(io.Writer) error) error {
	var b spillBuffer
	defer b.close()
	if err := render(&b); err != nil {
		return err
	}
	return b.writeTo(w)
}

// spillBuffer holds output until it is complete: up to spillAt bytes in
// memory (in chunks, so that nothing is copied as it grows), the rest in a
// temporary file (unlinked at once, so it goes away with the process), so
// that a large result (JSON of a hundred thousand lots) does not have to
// fit in memory twice. When no temporary file can be made it keeps
// everything in memory.
type spillBuffer struct {
	mem  [][]byte // chunks of spillChunk bytes (the last one filling)
	n    int      // bytes in mem
	f    *os.File
	fw   *bufio.Writer
	fail bool // no temporary file could be made
}

const (
	spillAt    = 8 << 20
	spillChunk = 256 << 10
)

func (b *spillBuffer) Write(p []byte) (int, error) {
	if b.f == nil && !b.fail && b.n+len(p) > spillAt {
		if f, err := os.CreateTemp("", "lotproof-out-*"); err != nil {
			b.fail = true
		} else {
			os.Remove(f.Name())
			b.f, b.fw = f, bufio.NewWriterSize(f, 1<<16)
			for _, c := range b.mem {
				if _, err := b.fw.Write(c); err != nil {
					return 0, err
				}
			}
			b.mem, b.n = nil, 0
		}
	}
	if b.f != nil {
		return b.fw.Write(p)
	}
	w := len(p)
	for len(p) > 0 {
		if len(b.mem) == 0 || len(b.mem[len(b.mem)-1]) == cap(b.mem[len(b.mem)-1]) {
			b.mem = append(b.mem, make([]byte, 0, spillChunk))
		}
		last := &b.mem[len(b.mem)-1]
		k := min(len(p), cap(*last)-len(*last))
		*last = append(*last, p[:k]...)
		p = p[k:]
	}
	b.n += w
	return w, nil
}

// writeTo copies the whole output to w.
func (b *spillBuffer) writeTo(w io.Writer) error {
	if b.f == nil {
		for _, c := range b.mem {
			if _, err := w.Write(c); err != nil {
				return err
			}
		}
		return nil
	}
	if err := b.fw.Flush(); err != nil {
		return err
	}
	if _, err := b.f.Seek(0, io.SeekStart); err != nil {
		return err
	}
	_, err := io.Copy(w, b.f)
	return err
}

func (b *spillBuffer) close() {
	if b != nil && b.f != nil {
		b.f.Close()
	}
}

// tableOption is the --table flag of a command that lays its result out
// as several tables: a CSV stream is one table with one header, so CSV
// writes the table named here (default: the first); text writes them all
// unless one is named.
type tableOption struct {
	Name  string
	names []string
}

// addTableFlag adds --table NAME; names are the command's table names, the
// first being the default for CSV.
func addTableFlag(cmd *cobra.Command, o *tableOption, names ...string) {
	o.names = names
	cmd.Flags().StringVar(&o.Name, "table", "", "which table to write: "+orList(names)+
		" (CSV writes one table per stream, by default the "+names[0]+"; a table shows them all unless one is named; JSON has everything)")
}

// check refuses a table name the command does not have (a usage error).
func (o tableOption) check() error {
	if o.Name == "" || o.names == nil {
		return nil
	}
	for _, n := range o.names {
		if n == o.Name {
			return nil
		}
	}
	return usageError{fmt.Errorf("unknown table %q: expected %s", o.Name, orList(o.names))}
}

func orList(s []string) string {
	if len(s) < 2 {
		return strings.Join(s, "")
	}
	return strings.Join(s[:len(s)-1], ", ") + " or " + s[len(s)-1]
}

// wanted reports whether pick can return the table called name for
// format f, so that a command need not fill tables that are not written.
func (o tableOption) wanted(f render.Format, name string) bool {
	switch {
	case o.Name != "":
		return o.Name == name
	case f == render.CSV && o.names != nil:
		return o.names[0] == name
	}
	return true
}

// pick returns the tables to write: the named one; else, for CSV, the
// first; else (text) every table not hidden.
func (o tableOption) pick(f render.Format, tables []*render.Table) ([]*render.Table, error) {
	if err := o.check(); err != nil {
		return nil, err
	}
	if o.Name != "" {
		for _, t := range tables {
			if t.Name == o.Name {
				t.Hidden = false
				return []*render.Table{t}, nil
			}
		}
		var names []string
		for _, t := range tables {
			if t.Name != "" {
				names = append(names, t.Name)
			}
		}
		return nil, usageError{fmt.Errorf("unknown table %q: expected %s", o.Name, orList(names))}
	}
	if f == render.CSV {
		return tables[:1], nil
	}
	var out []*render.Table
	for _, t := range tables {
		if !t.Hidden {
			out = append(out, t)
		}
	}
	return out, nil
}

// writeTables writes tables as text (separated by blank lines) or as CSV:
// one table per stream, so only the first (choose with tableOption.pick).
func writeTables(w io.Writer, f render.Format, tables ...*render.Table) error {
	if f == render.CSV && len(tables) > 1 {
		tables = tables[:1]
	}
	for i, t := range tables {
		if i > 0 {
			if _, err := io.WriteString(w, "\n"); err != nil {
				return err
			}
		}
		var err error
		if f == render.CSV {
			err = t.WriteCSV(w)
		} else {
			err = t.WriteText(w)
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// multiFileHelp ends the help of the commands that take several results
// files.
const multiFileHelp = `

Several results files (for example hardness results and the tensile results
reduced from raw records, of the same specimens) are combined by specimen
id: each specimen gets the properties every file gives it; a value given
differently in two files is an error that names both places.`
