package lots

import (
	"encoding/binary"
	"fmt"
	"unicode/utf8"
	"unsafe"
)

// TextProblem checks one text field (an id, a name, a heading) and returns
// the byte offset of the first character a field must not hold, with what
// it is and what to do, or -1. Refused everywhere: invalid UTF-8, NUL and
// the other control characters (C0 except tab, DEL, C1). Refused as well,
// because they can make an id display as something it is not: the
// bidirectional embedding, override and isolate characters U+202A-U+202E
// and U+2066-U+2069, and the direction marks U+200E, U+200F and U+061C
// (Unicode Standard Annex #9, Unicode Bidirectional Algorithm, section 2;
// Unicode Technical Report #36, Unicode Security Considerations).
//
// Plain printable ASCII, by far the most common, is checked one byte at a
// time without decoding.
func TextProblem(s string) (offset int, what, fix string) {
	i := 0
	for i < len(s) {
		c := s[i]
		if c >= 0x20 && c < 0x7f || c == '\t' {
			i++
			continue
		}
		if c < 0x80 {
			return i, fmt.Sprintf("holds the control character %s", controlName(rune(c))), "remove control characters: ids and names are plain one-line text (export the file again as UTF-8 text)"
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size <= 1 {
			return i, fmt.Sprintf("is not valid UTF-8 text (byte 0x%02X)", c), "save the file as UTF-8"
		}
		if r >= 0x80 && r < 0xa0 {
			return i, fmt.Sprintf("holds the control character U+%04X", r), "remove control characters: ids and names are plain one-line text (export the file again as UTF-8 text)"
		}
		if name := bidiName(r); name != "" {
			return i, fmt.Sprintf("holds the invisible direction character U+%04X (%s), which can make it display as something it is not", r, name), "remove the character"
		}
		i += size
	}
	return -1, "", ""
}

func controlName(r rune) string {
	switch r {
	case 0:
		return "NUL (U+0000)"
	case '\n':
		return "line feed (U+000A)"
	case '\r':
		return "carriage return (U+000D)"
	case 0x7f:
		return "DEL (U+007F)"
	}
	return fmt.Sprintf("U+%04X", r)
}

func bidiName(r rune) string {
	switch r {
	case 0x061C:
		return "Arabic letter mark"
	case 0x200E:
		return "left-to-right mark"
	case 0x200F:
		return "right-to-left mark"
	case 0x202A:
		return "left-to-right embedding"
	case 0x202B:
		return "right-to-left embedding"
	case 0x202C:
		return "pop directional formatting"
	case 0x202D:
		return "left-to-right override"
	case 0x202E:
		return "right-to-left override"
	case 0x2066:
		return "left-to-right isolate"
	case 0x2067:
		return "right-to-left isolate"
	case 0x2068:
		return "first strong isolate"
	case 0x2069:
		return "pop directional isolate"
	}
	return ""
}

// checkText checks the text fields of a row (the identity columns, or
// every heading while the header is read) with TextProblem and records a
// located problem for each bad field. It returns false when any field is
// bad. Rows of plain printable ASCII, by far the most common, take the
// fast path: eight bytes at a time.
func (t *table) checkText(fields []string, loc locator) bool {
	if h := t.header; h != nil &&
		plainField(fields, h.idCol) && plainField(fields, h.lotCol) && plainField(fields, h.heatCol) &&
		plainField(fields, h.suppCol) && plainField(fields, h.matCol) && plainField(fields, h.testedCol) &&
		plainField(fields, h.condCol) {
		return true
	}
	return t.checkTextSlow(fields, loc)
}

func plainField(fields []string, col int) bool {
	return col < 0 || col >= len(fields) || plainASCII(fields[col])
}

// plainASCII reports whether s holds only the bytes 0x20 to 0x7E. Eight
// bytes at a time, with the word tests of Anderson, "Bit Twiddling Hacks"
// (Stanford): a byte below 0x20 (hasless), a byte equal to 0x7F
// (haszero of x XOR 0x7F...), and any byte with its high bit set.
func plainASCII(s string) bool {
	const ones, highs = 0x0101010101010101, 0x8080808080808080
	i := 0
	for ; i+8 <= len(s); i += 8 {
		v := binary.LittleEndian.Uint64(unsafe.Slice(unsafe.StringData(s[i:]), 8))
		del := v ^ (0x7f * ones)
		if v&highs != 0 || (v-0x20*ones)&^v&highs != 0 || (del-ones)&^del&highs != 0 {
			return false
		}
	}
	for ; i < len(s); i++ {
		if s[i]-0x20 >= 0x5f {
			return false
		}
	}
	return true
}

func (t *table) checkTextSlow(fields []string, loc locator) bool {
	ok := true
	check := func(col int, what string) {
		if col < 0 || col >= len(fields) {
			return
		}
		off, bad, fix := TextProblem(fields[col])
		if off < 0 {
			return
		}
		ok = false
		where := loc.at(col)
		if _, cell := loc.(xlsxLocator); !cell {
			l, c := loc.pos(col)
			where = loc.place(l, c+off)
		}
		t.problems.add(where, what+" "+bad, fix)
	}
	h := t.header
	if h == nil {
		for i := range fields {
			check(i, fmt.Sprintf("the heading of column %d", i+1))
		}
		return ok
	}
	check(h.idCol, "the specimen id")
	check(h.lotCol, "the lot")
	check(h.heatCol, "the heat")
	check(h.suppCol, "the supplier")
	check(h.matCol, "the material")
	check(h.testedCol, "the tested date")
	check(h.condCol, "the condition")
	return ok
}
