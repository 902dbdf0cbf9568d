package main

import (
	"archive/zip"
	"bytes"
	"compress/flate"
	"database/sql"
	"fmt"
	"hash/crc32"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"lotproof/lots/store/pgtest"
)

// The hostile-input table (issue 14): devices, pipes, bombs, huge and
// malformed files, control and direction characters, a mistyped database.
// Every case runs the command in a child process and must exit with
// status 2 within a few seconds, name the file and the limit (or what is
// wrong) in its message, write nothing to standard output, and leave the
// working folder and the temporary folder exactly as they were. The
// child's peak resident set size (VmHWM) must stay under the issue's
// 256 MiB. The bombs are made at test time and are small on disk.

const hostileChildEnv = "LOTPROOF_HOSTILE_CHILD"

// Child process for the hostile-input table: runs the command line in
// $LOTPROOF_HOSTILE_CHILD (arguments separated by 0x1f) with the signal
// handling of main.
func TestHostileChild(t *testing.T) {
	args := os.Getenv(hostileChildEnv)
	if args == "" {
		t.Skip("helper process for TestHostileInputs")
	}
	cleanupOnSignal()
	code := execute(strings.Split(args, "\x1f"), streams{In: os.Stdin, Out: os.Stdout, Err: os.Stderr})
	// The peak resident set of this process (VmHWM belongs to the
	// process's own memory map, unlike getrusage's maxrss, which Linux
	// carries over from the parent through fork and exec).
	if p := os.Getenv(hostileRSSEnv); p != "" {
		if b, err := os.ReadFile("/proc/self/status"); err == nil {
			for _, l := range strings.Split(string(b), "\n") {
				if f := strings.Fields(l); len(f) == 3 && f[0] == "VmHWM:" {
					os.WriteFile(p, []byte(f[1]), 0o644)
				}
			}
		}
	}
	os.Exit(code)
}

const hostileRSSEnv = "LOTPROOF_HOSTILE_RSS"

type childRun struct {
	code           int
	stdout, stderr string
	elapsed        time.Duration
	maxRSS         int64 // bytes (VmHWM), -1 when not known
}

// runChild runs lotproof args in dir with TMPDIR=tmp.
func runChild(t *testing.T, dir, tmp string, env []string, args ...string) childRun {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestHostileChild$", "-test.count=1")
	// LOTPROOF_HOSTILE_TIME=1 also runs each child under GNU time, for an
	// outside measure of its peak memory (logged).
	timeFile := ""
	if os.Getenv("LOTPROOF_HOSTILE_TIME") != "" {
		timeFile = filepath.Join(t.TempDir(), "time")
		cmd = exec.Command("/usr/bin/time", append([]string{"-o", timeFile, "-f", "%e s wall, %U s user, %S s sys, max RSS %M KB", os.Args[0]}, cmd.Args[1:]...)...)
	}
	cmd.Dir = dir
	rssFile := filepath.Join(t.TempDir(), "rss")
	cmd.Env = append(os.Environ(), hostileChildEnv+"="+strings.Join(args, "\x1f"), "TMPDIR="+tmp, hostileRSSEnv+"="+rssFile)
	cmd.Env = append(cmd.Env, env...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	start := time.Now()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	select {
	case <-done:
	case <-time.After(60 * time.Second):
		cmd.Process.Kill()
		<-done
		t.Fatalf("lotproof %s: still running after 60 s (killed)", strings.Join(args, " "))
	}
	r := childRun{code: cmd.ProcessState.ExitCode(), stdout: out.String(), stderr: errb.String(), elapsed: time.Since(start)}
	if timeFile != "" {
		if b, err := os.ReadFile(timeFile); err == nil {
			lines := strings.Split(strings.TrimSpace(string(b)), "\n")
			t.Logf("GNU time: %s", lines[len(lines)-1])
		}
	}
	r.maxRSS = -1 // not known (no /proc)
	if b, err := os.ReadFile(rssFile); err == nil {
		if kb, err := strconv.ParseInt(strings.TrimSpace(string(b)), 10, 64); err == nil {
			r.maxRSS = kb << 10
		}
	}
	return r
}

// snapshot lists every file under dir with its size, mode and time.
func snapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	m := map[string]string{}
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil
		}
		fi, err := os.Lstat(p)
		if err != nil {
			return nil
		}
		m[p] = fmt.Sprintf("%d %v %d", fi.Size(), fi.Mode(), fi.ModTime().UnixNano())
		return nil
	})
	return m
}

func sameSnapshot(a, b map[string]string) string {
	for k, v := range a {
		if w, ok := b[k]; !ok {
			return "removed " + k
		} else if w != v {
			return "changed " + k
		}
	}
	for k := range b {
		if _, ok := a[k]; !ok {
			return "created " + k
		}
	}
	return ""
}

// deflateRepeat makes a raw deflate stream of prefix, then unit repeated
// count times, then suffix, without compressing all of it: independently
// compressed, sync-flushed pieces concatenate into one valid stream
// (RFC 1951 section 3.2.3: blocks are self-delimiting; a flush ends
// byte-aligned). It returns the stream, the CRC-32 and the length of the
// uncompressed data.
func deflateRepeat(t *testing.T, prefix, unit []byte, count int, suffix []byte) ([]byte, uint32, uint64) {
	t.Helper()
	piece := func(b []byte, final bool) []byte {
		var buf bytes.Buffer
		w, _ := flate.NewWriter(&buf, flate.BestCompression)
		w.Write(b)
		if final {
			w.Close()
		} else {
			w.Flush()
		}
		return buf.Bytes()
	}
	// Chunks of about 1 MiB of units.
	per := max(1, (1<<20)/len(unit))
	chunk := bytes.Repeat(unit, per)
	out := append([]byte(nil), piece(prefix, false)...)
	crc := crc32.Update(0, crc32.IEEETable, prefix)
	n := uint64(len(prefix))
	cz := piece(chunk, false)
	for left := count; left > 0; left -= per {
		c, cb := chunk, cz
		if left < per {
			c = bytes.Repeat(unit, left)
			cb = piece(c, false)
		}
		out = append(out, cb...)
		crc = crc32.Update(crc, crc32.IEEETable, c)
		n += uint64(len(c))
	}
	out = append(out, piece(suffix, true)...)
	crc = crc32.Update(crc, crc32.IEEETable, suffix)
	return out, crc, n + uint64(len(suffix))
}

// zipPart is one part of a workbook: plain bytes, or a deflate stream
// made by deflateRepeat.
type zipPart struct {
	name string
	data []byte
	raw  []byte // when set: deflate stream with crc and size
	crc  uint32
	size uint64
}

const (
	xlsxContentTypes = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/><Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sharedStrings+xml"/></Types>`
	xlsxRels = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>`
	xlsxWorkbook = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"><sheets><sheet name="Sheet1" sheetId="1" r:id="rId1"/></sheets></workbook>`
	xlsxWorkbookRels = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet1.xml"/><Relationship Id="rId2" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/sharedStrings" Target="sharedStrings.xml"/></Relationships>`
	sheetHead = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>`
	sheetTail = `</sheetData></worksheet>`
	// The header row, as inline strings.
	headerRow = `<row r="1"><c r="A1" t="inlineStr"><is><t>specimen</t></is></c><c r="B1" t="inlineStr"><is><t>lot</t></is></c><c r="C1" t="inlineStr"><is><t>tensile [MPa]</t></is></c></row>`
)

// writeWorkbook writes an .xlsx with the given sheet and shared strings
// parts (the other parts are fixed).
func writeWorkbook(t *testing.T, path string, sheet, strs zipPart) {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	sheet.name, strs.name = "xl/worksheets/sheet1.xml", "xl/sharedStrings.xml"
	if strs.data == nil && strs.raw == nil {
		strs.data = []byte(`<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="0" uniqueCount="0"></sst>`)
	}
	parts := []zipPart{
		{name: "[Content_Types].xml", data: []byte(xlsxContentTypes)},
		{name: "_rels/.rels", data: []byte(xlsxRels)},
		{name: "xl/workbook.xml", data: []byte(xlsxWorkbook)},
		{name: "xl/_rels/workbook.xml.rels", data: []byte(xlsxWorkbookRels)},
		strs, sheet,
	}
	for _, p := range parts {
		if p.raw != nil {
			w, err := zw.CreateRaw(&zip.FileHeader{Name: p.name, Method: zip.Deflate, CRC32: p.crc,
				CompressedSize64: uint64(len(p.raw)), UncompressedSize64: p.size})
			if err != nil {
				t.Fatal(err)
			}
			w.Write(p.raw)
			continue
		}
		w, err := zw.Create(p.name)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(p.data)
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

func repeatPart(t *testing.T, prefix, unit string, count int, suffix string) zipPart {
	raw, crc, n := deflateRepeat(t, []byte(prefix), []byte(unit), count, []byte(suffix))
	return zipPart{raw: raw, crc: crc, size: n}
}

const hostileSpec = `specification: HX-1
revision: A
material: bar
properties:
  tensile:
    unit: MPa
    min: 900
acceptance:
  content: 0.90
  confidence: 0.90
  min_specimens: 2
  individual_reject: true
  retests: 0
  retest_factor: 2
`

const okCSV = "specimen,lot,material,tested,tensile [MPa]\nA-1,L-1,bar,2026-01-05,1001\nA-2,L-1,bar,2026-01-05,1003\nA-3,L-1,bar,2026-01-05,998\n"

type hostileCase struct {
	name  string
	setup func(t *testing.T, dir string) []string // makes the inputs in dir; returns the command line
	want  []string                                // in the message
}

func mkfifo(t *testing.T, p string) {
	t.Helper()
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skipf("cannot make a FIFO: %v", err)
	}
}

func put(t *testing.T, dir, name, content string) {
	t.Helper()
	if err := os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}

// sparse makes a file of n bytes that takes no room on disk (reads as
// zero bytes).
func sparse(t *testing.T, p string, n int64) {
	t.Helper()
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(n); err != nil {
		t.Fatal(err)
	}
	f.Close()
}

func std(dir string) {
	os.WriteFile(filepath.Join(dir, "ok.csv"), []byte(okCSV), 0o644)
	os.WriteFile(filepath.Join(dir, "spec.yaml"), []byte(hostileSpec), 0o644)
}

func hostileCases() []hostileCase {
	zero := "/dev/zero"
	return []hostileCase{
		// Devices.
		{"results /dev/zero", func(t *testing.T, d string) []string { return []string{"summary", zero} },
			[]string{"/dev/zero", "character device"}},
		{"xlsx link to /dev/zero", func(t *testing.T, d string) []string {
			os.Symlink(zero, filepath.Join(d, "zero.xlsx"))
			return []string{"summary", "zero.xlsx"}
		}, []string{"zero.xlsx", "character device"}},
		{"spec /dev/zero", func(t *testing.T, d string) []string {
			return []string{"accept", "ok.csv", "--spec", zero}
		}, []string{"/dev/zero", "specification", "character device"}},
		{"reduce /dev/zero", func(t *testing.T, d string) []string { return []string{"reduce", zero} },
			[]string{"/dev/zero", "raw record file", "character device"}},
		{"size --from /dev/zero", func(t *testing.T, d string) []string {
			return []string{"size", "--from", zero, "--property", "tensile", "--load", "10", "--load-unit", "kN", "--safety", "1.5"}
		}, []string{"/dev/zero", "allowables result", "character device"}},
		{"report --records /dev/zero", func(t *testing.T, d string) []string {
			return []string{"report", "ok.csv", "--spec", "spec.yaml", "--records", zero, "--out", "r.html"}
		}, []string{"/dev/zero", "raw record file", "character device"}},
		// Pipes.
		{"results FIFO", func(t *testing.T, d string) []string {
			mkfifo(t, filepath.Join(d, "p.csv"))
			return []string{"summary", "p.csv"}
		}, []string{"p.csv", "named pipe"}},
		{"xlsx FIFO", func(t *testing.T, d string) []string {
			mkfifo(t, filepath.Join(d, "p.xlsx"))
			return []string{"summary", "p.xlsx"}
		}, []string{"p.xlsx", "named pipe"}},
		{"spec FIFO", func(t *testing.T, d string) []string {
			mkfifo(t, filepath.Join(d, "p.yaml"))
			return []string{"accept", "ok.csv", "--spec", "p.yaml"}
		}, []string{"p.yaml", "specification", "named pipe"}},
		{"record file FIFO", func(t *testing.T, d string) []string {
			mkfifo(t, filepath.Join(d, "p.rec"))
			return []string{"reduce", "p.rec"}
		}, []string{"p.rec", "named pipe"}},
		{"FIFO in a record folder", func(t *testing.T, d string) []string {
			os.Mkdir(filepath.Join(d, "recs"), 0o755)
			mkfifo(t, filepath.Join(d, "recs", "a.rec"))
			return []string{"reduce", "recs"}
		}, []string{filepath.Join("recs", "a.rec"), "named pipe"}},
		{"size --from FIFO", func(t *testing.T, d string) []string {
			mkfifo(t, filepath.Join(d, "p.json"))
			return []string{"size", "--from", "p.json", "--property", "tensile", "--load", "10", "--load-unit", "kN", "--safety", "1.5"}
		}, []string{"p.json", "named pipe"}},
		{"results folder", func(t *testing.T, d string) []string {
			os.Mkdir(filepath.Join(d, "data.csv"), 0o755)
			return []string{"summary", "data.csv"}
		}, []string{"data.csv", "a folder"}},
		// Workbook bombs.
		{"xlsx 1 GiB shared text", func(t *testing.T, d string) []string {
			strs := repeatPart(t, `<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" count="1" uniqueCount="1"><si><t>`, "A", 1<<30, `</t></si></sst>`)
			writeWorkbook(t, filepath.Join(d, "bomb.xlsx"), zipPart{data: []byte(sheetHead + headerRow + sheetTail)}, strs)
			return []string{"summary", "bomb.xlsx"}
		}, []string{"bomb.xlsx", "sharedStrings.xml", "limit of 64 MiB"}},
		{"xlsx 40 MiB inline cell", func(t *testing.T, d string) []string {
			sheet := repeatPart(t, sheetHead+headerRow+`<row r="2"><c r="A2" t="inlineStr"><is><t>`, "B", 40<<20, `</t></is></c></row>`+sheetTail)
			writeWorkbook(t, filepath.Join(d, "cell.xlsx"), sheet, zipPart{})
			return []string{"summary", "cell.xlsx"}
		}, []string{"cell.xlsx", "row 2", "4 MiB"}},
		{"xlsx 100-million-column row", func(t *testing.T, d string) []string {
			sheet := repeatPart(t, sheetHead+headerRow+`<row r="2">`, "<c/>", 100_000_000, `</row>`+sheetTail)
			writeWorkbook(t, filepath.Join(d, "wide.xlsx"), sheet, zipPart{})
			return []string{"summary", "wide.xlsx"}
		}, []string{"wide.xlsx", "row 2", "16384 cells"}},
		{"xlsx 4 GiB of rows", func(t *testing.T, d string) []string {
			row := `<row><c t="inlineStr"><is><t>X</t></is></c><c t="inlineStr"><is><t>L</t></is></c><c><v>1000</v></c></row>`
			sheet := repeatPart(t, sheetHead+headerRow, row, (4<<30)/len(row), sheetTail)
			writeWorkbook(t, filepath.Join(d, "rows.xlsx"), sheet, zipPart{})
			return []string{"summary", "rows.xlsx"}
		}, []string{"rows.xlsx", "sheet1.xml", "limit of 512 MiB"}},
		{"xlsx more rows than Excel", func(t *testing.T, d string) []string {
			sheet := repeatPart(t, sheetHead+headerRow, "<row/>", 1<<20+10, sheetTail)
			writeWorkbook(t, filepath.Join(d, "tall.xlsx"), sheet, zipPart{})
			return []string{"summary", "tall.xlsx"}
		}, []string{"tall.xlsx", "1048576 rows"}},
		{"xlsx 3.5 million shared texts", func(t *testing.T, d string) []string {
			strs := repeatPart(t, `<sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">`, "<si><t>a</t></si>", 3_500_000, `</sst>`)
			writeWorkbook(t, filepath.Join(d, "texts.xlsx"), zipPart{data: []byte(sheetHead + headerRow + sheetTail)}, strs)
			return []string{"summary", "texts.xlsx"}
		}, []string{"texts.xlsx", "sharedStrings.xml", "more than 1048576 shared texts"}},
		{"xlsx 11 million empty cells", func(t *testing.T, d string) []string {
			sheet := repeatPart(t, sheetHead+headerRow, "<row>"+strings.Repeat("<c/>", 10000)+"</row>", 1100, sheetTail)
			writeWorkbook(t, filepath.Join(d, "cells.xlsx"), sheet, zipPart{})
			return []string{"summary", "cells.xlsx"}
		}, []string{"cells.xlsx", "more than 10000000 cells"}},
		// Huge specifications.
		{"spec of 100 MB", func(t *testing.T, d string) []string {
			sparse(t, filepath.Join(d, "big.yaml"), 100<<20)
			return []string{"accept", "ok.csv", "--spec", "big.yaml"}
		}, []string{"big.yaml", "limit of 1 MiB"}},
		{"spec of 10,001 properties", func(t *testing.T, d string) []string {
			var b strings.Builder
			b.WriteString("specification: HX-2\nrevision: A\nmaterial: bar\nproperties:\n")
			for i := 0; i <= 10000; i++ {
				fmt.Fprintf(&b, "  p%d: {unit: MPa, min: 1}\n", i)
			}
			b.WriteString("acceptance: {content: 0.9, confidence: 0.9, min_specimens: 2, individual_reject: true, retests: 0, retest_factor: 2}\n")
			put(t, d, "many.yaml", b.String())
			return []string{"accept", "ok.csv", "--spec", "many.yaml"}
		}, []string{"many.yaml:5:3", "10001 properties", "limit of 10000"}},
		{"allowables JSON of 100 MB", func(t *testing.T, d string) []string {
			sparse(t, filepath.Join(d, "big.json"), 100<<20)
			return []string{"size", "--from", "big.json", "--property", "tensile", "--load", "10", "--load-unit", "kN", "--safety", "1.5"}
		}, []string{"big.json", "limit of 16 MiB"}},
		{"record file of 300 MB", func(t *testing.T, d string) []string {
			sparse(t, filepath.Join(d, "big.rec"), 300<<20)
			return []string{"reduce", "big.rec"}
		}, []string{"big.rec", "limit of 256 MiB"}},
		// Text.
		{"NUL in a CSV cell", func(t *testing.T, d string) []string {
			put(t, d, "nul.csv", "specimen,lot,tensile [MPa]\nA-1,L\x00-1,1000\nA-2,L-1,1001\n")
			return []string{"summary", "nul.csv"}
		}, []string{"nul.csv:2:6:", "the lot", "NUL"}},
		{"invalid UTF-8 in a CSV cell", func(t *testing.T, d string) []string {
			put(t, d, "bad.csv", "specimen,lot,supplier,tensile [MPa]\nA-1,L-1,Mill \xff\xfe,1000\n")
			return []string{"summary", "bad.csv"}
		}, []string{"bad.csv:2:14:", "supplier", "not valid UTF-8"}},
		{"direction override in a lot id", func(t *testing.T, d string) []string {
			put(t, d, "bidi.csv", "specimen,lot,tensile [MPa]\nA-1,L-\u202E1-2,1000\n")
			return []string{"summary", "bidi.csv"}
		}, []string{"bidi.csv:2:7:", "U+202E", "right-to-left override"}},
		{"escape character in a heading", func(t *testing.T, d string) []string {
			put(t, d, "esc.csv", "specimen,lot,tensile\x1b[31m [MPa]\nA-1,L-1,1000\n")
			return []string{"summary", "esc.csv"}
		}, []string{"esc.csv:1:21:", "heading of column 3", "U+001B"}},
		// Databases.
		{"trend with a mistyped --db", func(t *testing.T, d string) []string {
			return []string{"trend", "--db", "lotprof.db"}
		}, []string{"lotprof.db", "no such file"}},
		{"report with a mistyped --db", func(t *testing.T, d string) []string {
			return []string{"report", "ok.csv", "--spec", "spec.yaml", "--db", "history/lotproof.db", "--out", "r.html"}
		}, []string{"history/lotproof.db", "no such file"}},
		{"trend on a file that is not a database", func(t *testing.T, d string) []string {
			put(t, d, "notes.db", "not a database\n")
			return []string{"trend", "--db", "notes.db"}
		}, []string{"notes.db", "not a database"}},
		{"record NUL on SQLite", func(t *testing.T, d string) []string {
			put(t, d, "nul.csv", "specimen,lot,material,tested,tensile [MPa]\nA-1,L-1,bar\x00,2026-01-05,1000\n")
			return []string{"record", "nul.csv", "--db", "h.db"}
		}, []string{"nul.csv:2:12:", "material", "NUL"}},
	}
}

func TestHostileInputs(t *testing.T) {
	if testing.Short() {
		t.Skip("the hostile-input table runs child processes; skipped with -short")
	}
	for _, c := range hostileCases() {
		t.Run(c.name, func(t *testing.T) {
			dir, tmp := t.TempDir(), t.TempDir()
			std(dir)
			args := c.setup(t, dir)
			before, tmpBefore := snapshot(t, dir), snapshot(t, tmp)
			r := runChild(t, dir, tmp, []string{"LOTPROOF_DB="}, args...)
			t.Logf("lotproof %s: exit %d in %v, peak RSS %.1f MiB", strings.Join(args, " "), r.code, r.elapsed.Round(time.Millisecond), float64(r.maxRSS)/(1<<20))
			if r.code != 2 {
				t.Fatalf("exit status %d, want 2\nstderr: %s", r.code, r.stderr)
			}
			for _, w := range c.want {
				if !strings.Contains(r.stderr, w) {
					t.Errorf("message lacks %q:\n%s", w, r.stderr)
				}
			}
			if r.stdout != "" {
				t.Errorf("wrote to standard output: %.200q", r.stdout)
			}
			// A guard against hanging, not a speed target (issue 14: every
			// case within 5 s).
			if r.elapsed > 5*time.Second {
				t.Errorf("took %v, want under 5 s", r.elapsed)
			}
			if r.maxRSS > 256<<20 {
				t.Errorf("peak RSS %.0f MiB, want under 256 MiB", float64(r.maxRSS)/(1<<20))
			}
			if d := sameSnapshot(before, snapshot(t, dir)); d != "" {
				t.Errorf("working folder: %s", d)
			}
			if d := sameSnapshot(tmpBefore, snapshot(t, tmp)); d != "" {
				t.Errorf("temporary folder: %s", d)
			}
		})
	}
}

// record on PostgreSQL refuses a file with a NUL byte before it touches
// the database: the fresh database is left without even lotproof's schema.
func TestHostileRecordPostgres(t *testing.T) {
	pg := os.Getenv("LOTPROOF_TEST_PG")
	if pg == "" {
		t.Skip("LOTPROOF_TEST_PG is not set: PostgreSQL half skipped")
	}
	url := pgtest.Fresh(t, pg)
	for name, content := range map[string]string{
		"nul":  "specimen,lot,material,tested,tensile [MPa]\nA-1,L-1,bar\x00,2026-01-05,1000\n",
		"utf8": "specimen,lot,material,tested,tensile [MPa]\nA-1,L-1\xc3,bar,2026-01-05,1000\n",
		"bidi": "specimen,lot,material,tested,tensile [MPa]\nA-1\u2066,L-1,bar,2026-01-05,1000\n",
	} {
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			put(t, dir, "in.csv", content)
			r := runChild(t, dir, t.TempDir(), nil, "record", "in.csv", "--db", url)
			if r.code != 2 || !strings.Contains(r.stderr, "in.csv:2:") {
				t.Fatalf("exit %d, stderr %s", r.code, r.stderr)
			}
		})
	}
	db, err := sql.Open("pgx", url)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var n int
	if err := db.QueryRow(`SELECT count(*) FROM information_schema.tables WHERE table_schema = 'public'`).Scan(&n); err != nil {
		t.Fatal(err)
	}
	if n != 0 {
		t.Fatalf("the database has %d tables after refused records, want 0", n)
	}
	// trend and report read it read-only: an empty database without
	// lotproof's schema is refused, and still gets no tables.
	dir := t.TempDir()
	std(dir)
	r := runChild(t, dir, t.TempDir(), nil, "trend", "--db", url)
	if r.code != 2 || !strings.Contains(r.stderr, "not a lotproof history database") {
		t.Fatalf("trend on an empty database: exit %d, stderr %s", r.code, r.stderr)
	}
	db.QueryRow(`SELECT count(*) FROM information_schema.tables WHERE table_schema = 'public'`).Scan(&n)
	if n != 0 {
		t.Fatalf("trend created %d tables", n)
	}
}

// An .xlsx read interrupted by SIGTERM (and by SIGINT) leaves no temporary
// file: excelize unpacks a worksheet above 16 MiB into a temporary file,
// which goes to a private folder that the signal handler removes.
func TestXLSXTempRemovedOnSignal(t *testing.T) {
	if testing.Short() {
		t.Skip("writes a 60 MB worksheet; skipped with -short")
	}
	dir := t.TempDir()
	const rows = 400_000
	row := `<row><c t="inlineStr"><is><t>S</t></is></c><c t="inlineStr"><is><t>L-1</t></is></c><c><v>1000.5</v></c><c><v>1000.5</v></c><c><v>1000.5</v></c></row>`
	sheet := repeatPart(t, sheetHead+headerRow, row, rows, sheetTail)
	if sheet.size < 20<<20 {
		t.Fatalf("worksheet of %d bytes is too small to be unpacked to a temporary file", sheet.size)
	}
	writeWorkbook(t, filepath.Join(dir, "big.xlsx"), sheet, zipPart{})
	for _, sig := range []syscall.Signal{syscall.SIGTERM, syscall.SIGINT} {
		t.Run(sig.String(), func(t *testing.T) {
			tmp := t.TempDir()
			cmd := exec.Command(os.Args[0], "-test.run=^TestHostileChild$", "-test.count=1")
			cmd.Dir = dir
			cmd.Env = append(os.Environ(), hostileChildEnv+"=summary\x1fbig.xlsx", "TMPDIR="+tmp)
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			// Wait until the worksheet has been unpacked.
			seen := false
			for deadline := time.Now().Add(30 * time.Second); time.Now().Before(deadline); time.Sleep(5 * time.Millisecond) {
				m, _ := filepath.Glob(filepath.Join(tmp, "lotproof-xlsx-*", "excelize-*"))
				if len(m) > 0 {
					seen = true
					break
				}
			}
			cmd.Process.Signal(sig)
			cmd.Wait()
			if !seen {
				t.Fatal("no temporary file appeared (the read ended or never unpacked the sheet)")
			}
			left, _ := os.ReadDir(tmp)
			if len(left) != 0 {
				t.Fatalf("left in the temporary folder after %v: %v", sig, left)
			}
			if ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); !ok || !ws.Signaled() || ws.Signal() != sig {
				t.Errorf("process state %v, want ended by %v", cmd.ProcessState, sig)
			}
		})
	}
}
