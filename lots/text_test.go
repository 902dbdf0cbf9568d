package lots

import (
	"strings"
	"testing"
)

// Which characters a text field may hold: control characters are those of
// Unicode's general category Cc (C0, DEL, C1); the direction characters are
// the explicit formatting characters of Unicode Standard Annex #9 section
// 2 and the implicit marks of section 2.6; invalid UTF-8 per RFC 3629
// (overlong forms and surrogates included).
func TestTextProblem(t *testing.T) {
	for _, s := range []string{"", "A-1", "BW-2501-1-1", "Mill \"North\", Ltd", "tab\there", "Zürich Stahl", "Ω-7", "材料", "2026-01-05", "\U0001F600"} {
		if off, what, _ := TextProblem(s); off >= 0 {
			t.Errorf("%q refused at %d: %s", s, off, what)
		}
	}
	for _, c := range []struct {
		s    string
		off  int
		want string
	}{
		{"A\x00", 1, "NUL (U+0000)"},
		{"\x01", 0, "U+0001"},
		{"ab\ncd", 2, "line feed"},
		{"ab\r", 2, "carriage return"},
		{"x\x1b[31m", 1, "U+001B"},
		{"x\x7f", 1, "DEL"},
		{"é\u0085", 2, "U+0085"},
		{"L-\xff", 2, "not valid UTF-8 text (byte 0xFF)"},
		{"L-\xc3", 2, "not valid UTF-8"},
		{"\xc0\xaf", 0, "not valid UTF-8"},
		{"\xed\xa0\x80", 0, "not valid UTF-8"},
		{"L-\u202E1", 2, "U+202E (right-to-left override)"},
		{"\u202A", 0, "U+202A"}, {"\u202B", 0, "U+202B"}, {"\u202C", 0, "U+202C"}, {"\u202D", 0, "U+202D"},
		{"\u2066", 0, "U+2066"}, {"\u2067", 0, "U+2067"}, {"\u2068", 0, "U+2068"}, {"a\u2069", 1, "U+2069"},
		{"\u200E", 0, "U+200E (left-to-right mark)"}, {"\u200F", 0, "U+200F"}, {"\u061C", 0, "U+061C"},
	} {
		off, what, fix := TextProblem(c.s)
		if off != c.off || !strings.Contains(what, c.want) || fix == "" {
			t.Errorf("%q: offset %d %q, want %d %q", c.s, off, what, c.off, c.want)
		}
	}
}

// The workbook reader refuses the same characters, located by cell.
func TestReadXLSXRefusesDirectionCharacters(t *testing.T) {
	p := writeBook(t, "Results", [][]any{
		{"specimen", "lot", "tensile [MPa]"},
		{"S1", "L1", 1000.5},
		{"S2", "L\u202E1", 1001.25},
	})
	_, err := ReadFile(p, ReadOptions{})
	want := p + ":Results!B3: the lot holds the invisible direction character U+202E (right-to-left override), which can make it display as something it is not; remove the character"
	if err == nil || err.Error() != want {
		t.Fatalf("got %v\nwant %s", err, want)
	}
}

// The word-at-a-time test agrees with the byte-at-a-time one for every
// byte value at every position of strings of 1 to 20 bytes.
func TestPlainASCII(t *testing.T) {
	for n := 1; n <= 20; n++ {
		for pos := 0; pos < n; pos++ {
			for c := 0; c < 256; c++ {
				b := []byte(strings.Repeat("a", n))
				b[pos] = byte(c)
				want := c >= 0x20 && c <= 0x7e
				if got := plainASCII(string(b)); got != want {
					t.Fatalf("plainASCII(%q) = %v, want %v", b, got, want)
				}
			}
		}
	}
}
