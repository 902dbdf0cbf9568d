package lots

import (
	"strings"
	"testing"
)

// The worksheet scan counts cells per row at Excel's column limit
// (16,384, Microsoft "Excel specifications and limits"), with or without a
// namespace prefix, and does not take <col> or <cols> for cells.
func TestScanPartCells(t *testing.T) {
	row := func(prefix string, n int) string {
		return "<" + prefix + "row r=\"1\">" + strings.Repeat("<"+prefix+"c r=\"A1\"><"+prefix+"v>1</"+prefix+"v></"+prefix+"c>", n) + "</" + prefix + "row>"
	}
	head := `<worksheet><cols><col min="1" max="16384"/></cols><sheetData>`
	for _, prefix := range []string{"", "x:"} {
		ok := head + row(prefix, 16384) + "</sheetData></worksheet>"
		if err := scanPart(strings.NewReader(ok), "row", "b.xlsx", "xl/worksheets/sheet1.xml"); err != nil {
			t.Errorf("prefix %q, 16384 cells: %v", prefix, err)
		}
		bad := head + row(prefix, 16385) + "</sheetData></worksheet>"
		err := scanPart(strings.NewReader(bad), "row", "b.xlsx", "xl/worksheets/sheet1.xml")
		if err == nil || !strings.Contains(err.Error(), "b.xlsx: xl/worksheets/sheet1.xml: row 1 has more than 16384 cells") {
			t.Errorf("prefix %q, 16385 cells: %v", prefix, err)
		}
	}
	// One shared text of 1 MiB of XML passes; a little more does not.
	si := func(n int) string { return "<sst><si><t>" + strings.Repeat("a", n) + "</t></si></sst>" }
	if err := scanPart(strings.NewReader(si(xlsxMaxString-16)), "si", "b.xlsx", "xl/sharedStrings.xml"); err != nil {
		t.Errorf("shared text within the limit: %v", err)
	}
	if err := scanPart(strings.NewReader(si(xlsxMaxString+1)), "si", "b.xlsx", "xl/sharedStrings.xml"); err == nil {
		t.Error("shared text beyond the limit accepted")
	}
}
