package main

import (
	"os"
	"path/filepath"

	"lotproof/lots"
	"lotproof/lots/progress"
)

// scanLots reads a results file ("-" is standard input) lot by lot (see
// lots.ScanLotsFile), for the commands that only need one lot at a time.
// Several files (in.More) are read whole and combined, as readData does.
func scanLots(name string, in inputOptions, st streams, begin func(*lots.Dataset), lot func(*lots.Lot) error) (*lots.Dataset, lots.GroupBy, error) {
	return scanLotsWith(name, in, st, lots.LotScan{Begin: begin, Lot: lot})
}

// scanLotsWith is scanLots with the whole lots.LotScan (its By is taken
// from in).
func scanLotsWith(name string, in inputOptions, st streams, scan lots.LotScan) (*lots.Dataset, lots.GroupBy, error) {
	by, err := lots.ParseGroupBy(in.GroupBy)
	if err != nil {
		return nil, "", usageError{err}
	}
	scan.By = by
	if len(in.More) > 0 {
		// Several files are combined by specimen id first (lots.Merge).
		d, by, err := readData(name, in, st)
		if err != nil {
			return nil, "", err
		}
		return d, by, d.ScanLots(scan)
	}
	ro := lots.ReadOptions{Sheet: in.Sheet, Stdin: st.In}
	// A bar over the bytes of a large file, on a terminal only.
	if fi, err := os.Stat(name); err == nil && name != "-" && fi.Size() > 32<<20 {
		bar := progress.New(st.Err, st.ErrTerminal, fi.Size(), "read "+filepath.Base(name))
		defer bar.Finish()
		var last int64
		ro.Progress = func(n int64) { bar.Add(n - last); last = n }
	}
	d, err := lots.ScanLotsFile(name, ro, scan)
	if err != nil {
		return nil, "", err
	}
	return d, by, nil
}
