package reduce

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"lotproof/lots"
	"lotproof/lots/input"
)

// ReducePaths parses and reduces every record named by paths: files,
// folders (their *.rec files in name order) or - for standard input, one
// file at a time so that only one file's points are held. Problems from
// every file are collected into one input error. fileDone, when set, is
// called after each file (a progress display over the files of
// CountFiles); - reads stdin.
func ReducePaths(paths []string, stdin io.Reader, opt Options, fileDone func()) ([]*Result, error) {
	b := NewBatch(opt)
	parse := func(r io.Reader, name string) error {
		recs, err := Parse(r, name)
		if err != nil {
			if b.Problems(err) {
				return nil
			}
			return err
		}
		return b.Add(recs)
	}
	open := func(p string) error {
		if fileDone != nil {
			defer fileDone()
		}
		f, err := lots.OpenInput(p, input.Records, nil)
		if err != nil {
			if b.Problems(err) {
				return nil
			}
			return err
		}
		defer f.Close()
		return parse(f, p)
	}
	for _, p := range paths {
		if p == "-" {
			err := parse(input.Limit(stdin, "-", input.Records), "-")
			if fileDone != nil {
				fileDone()
			}
			if err != nil {
				return nil, err
			}
			continue
		}
		fi, err := os.Stat(p)
		if err != nil {
			b.Problems(lots.Inputf(p, "give an existing record file or folder", "cannot open: %v", unwrapPathErr(err)))
			continue
		}
		if !fi.IsDir() {
			if err := open(p); err != nil {
				return nil, err
			}
			continue
		}
		ents, err := os.ReadDir(p)
		if err != nil {
			b.Problems(lots.Inputf(p, "check the folder's permissions", "cannot read the folder: %v", unwrapPathErr(err)))
			continue
		}
		var names []string
		for _, e := range ents {
			if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), RecordExt) {
				names = append(names, e.Name())
			}
		}
		sort.Strings(names)
		if len(names) == 0 {
			b.Problems(lots.Inputf(p, "raw record files end in .rec", "no %s files in the folder", RecordExt))
		}
		for _, n := range names {
			if err := open(filepath.Join(p, n)); err != nil {
				return nil, err
			}
		}
	}
	return b.Results()
}

// CountFiles counts the record files named by paths (for a progress
// display; a folder counts its *.rec files).
func CountFiles(paths []string) int {
	n := 0
	for _, p := range paths {
		fi, err := os.Stat(p)
		if p == "-" || err != nil || !fi.IsDir() {
			n++
			continue
		}
		ents, _ := os.ReadDir(p)
		for _, e := range ents {
			if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), RecordExt) {
				n++
			}
		}
	}
	return n
}

func unwrapPathErr(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}

// WritePlots writes a stress-strain plot ID.svg per result into dir
// (created if missing; characters a file name cannot hold become _).
func WritePlots(dir string, rs []*Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("--plot-dir: %v", err)
	}
	for _, r := range rs {
		if len(r.Strain) < 2 {
			continue
		}
		b, err := PlotSVG(r)
		if err != nil {
			return err
		}
		name := strings.Map(func(c rune) rune {
			if c == '/' || c == '\\' || c == ':' || c < ' ' {
				return '_'
			}
			return c
		}, r.ID) + ".svg"
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			return fmt.Errorf("--plot-dir: %v", err)
		}
	}
	return nil
}
