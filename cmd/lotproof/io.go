package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"

	"lotproof/lots"
	"lotproof/lots/progress"
	"lotproof/lots/render"
)

// inputOptions are the flags of every command that reads a specimen
// results file.
type inputOptions struct {
	Sheet   string // xlsx sheet
	GroupBy string // lot or heat
}

// readData reads a results file ("-" is standard input).
func readData(name string, in inputOptions, st streams) (*lots.Dataset, lots.GroupBy, error) {
	by, err := lots.ParseGroupBy(in.GroupBy)
	if err != nil {
		return nil, "", usageError{err}
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
	var b bytes.Buffer
	if err := render(&b); err != nil {
		return err
	}
	_, err := w.Write(b.Bytes())
	return err
}

// writeTables writes tables as text (separated by blank lines) or CSV (the
// first table only, or all with a blank line between them).
func writeTables(w io.Writer, f render.Format, tables ...*render.Table) error {
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
