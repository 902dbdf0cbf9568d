package lots

import (
	"errors"
	"path/filepath"
	"testing"

	"github.com/xuri/excelize/v2"
)

func writeBook(t *testing.T, sheet string, rows [][]any) string {
	t.Helper()
	f := excelize.NewFile()
	if sheet != "Sheet1" {
		f.SetSheetName("Sheet1", sheet)
	}
	for i, r := range rows {
		cell, _ := excelize.CoordinatesToCellName(1, i+1)
		if err := f.SetSheetRow(sheet, cell, &r); err != nil {
			t.Fatal(err)
		}
	}
	p := filepath.Join(t.TempDir(), "r.xlsx")
	if err := f.SaveAs(p); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestReadXLSX(t *testing.T) {
	p := writeBook(t, "Results", [][]any{
		{"specimen", "lot", "tensile [MPa]", "elongation [%]"},
		{"S1", "L1", 1000.5, 12},
		{"S2", "L1", 1001.25}, // trailing empty cell: a missing value
	})
	d, err := ReadFile(p, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if d.Len() != 2 || d.Specimen(0).Values[0] != 1000.5 || d.Specimen(1).Values[0] != 1001.25 || !d.Specimen(1).Missing(1) {
		t.Fatalf("read %+v", d)
	}
	if d.Missing[1] != 1 || d.Digest == "" {
		t.Errorf("missing %v digest %q", d.Missing, d.Digest)
	}
}

func TestReadXLSXBadInput(t *testing.T) {
	p := writeBook(t, "Results", [][]any{
		{"specimen", "lot", "tensile [MPa]"},
		{"S1", "L1", 1000.5},
		{"S2", "L1", "ten"},
	})
	_, err := ReadFile(p, ReadOptions{})
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("want InputError, got %v", err)
	}
	want := p + `:Results!C3: tensile: "ten" is not a number; write a decimal number such as 1034.5, or leave the cell empty for a missing value`
	if err.Error() != want {
		t.Errorf("got  %s\nwant %s", err, want)
	}
	_, err = ReadFile(p, ReadOptions{Sheet: "Other"})
	if want := p + `: the workbook has no sheet "Other"; use --sheet with one of: Results`; err == nil || err.Error() != want {
		t.Errorf("got  %v\nwant %s", err, want)
	}
}
