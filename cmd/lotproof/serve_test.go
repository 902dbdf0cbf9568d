package main

import (
	"bytes"
	"context"
	"encoding/json"
	"html"
	"io"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"lotproof/lots/demo"
	"lotproof/lots/serve"
)

// TestServeRefusesOpenListen: serve on an address other machines can reach
// needs --token (or --insecure-no-auth); without it the command is refused
// before anything is opened or listened on.
func TestServeRefusesOpenListen(t *testing.T) {
	missing := filepath.Join(t.TempDir(), "none.db")
	for _, args := range [][]string{
		{"serve", "--db", missing, "--listen", "0.0.0.0:0"},
		{"serve", "--db", missing, "--listen", ":0"},
		{"serve", "--db", missing, "--listen", "[::]:0"},
	} {
		code, _, errs := run(t, "", args...)
		if code != exitInput || !strings.Contains(errs, "--token") {
			t.Errorf("%v: exit %d, %s", args, code, errs)
		}
	}
	if _, err := os.Stat(missing); !os.IsNotExist(err) {
		t.Error("serve created the database file")
	}
	// A short token and a missing token file are refused too; so is a
	// database that does not exist, even on loopback.
	db := filepath.Join(t.TempDir(), "demo.db")
	if code, _, errs := run(t, "", "demo", "--db", db, "--no-report", "--date", "2026-12-02", "--format", "json"); code != 0 {
		t.Fatalf("demo --db: exit %d: %s", code, errs)
	}
	for _, args := range [][]string{
		{"serve", "--db", db, "--listen", "0.0.0.0:0", "--token", "short"},
		{"serve", "--db", db, "--listen", "0.0.0.0:0", "--token-file", missing},
		{"serve", "--db", missing},
	} {
		if code, _, errs := run(t, "", args...); code != exitInput {
			t.Errorf("%v: exit %d, %s", args, code, errs)
		}
	}
}

// startServe runs lotproof serve over db on a free loopback port until the
// test ends and returns its base URL.
func startServe(t *testing.T, o serveOptions) string {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	ready := make(chan string, 1)
	done := make(chan error, 1)
	o.Listen = "127.0.0.1:0"
	go func() {
		done <- runServe(ctx, o, streams{In: strings.NewReader(""), Out: io.Discard, Err: io.Discard}, ready)
	}()
	t.Cleanup(func() {
		cancel()
		if err := <-done; err != nil {
			t.Errorf("serve: %v", err)
		}
	})
	select {
	case addr := <-ready:
		return "http://" + addr
	case err := <-done:
		t.Fatalf("serve: %v", err)
	case <-time.After(60 * time.Second):
		t.Fatal("serve did not start")
	}
	return ""
}

// TestServeDemo: demo --db writes a history that serve shows: the drifting
// mill's page lists its signals and the bad lot, and the lot page its
// verdict.
func TestServeDemo(t *testing.T) {
	db := filepath.Join(t.TempDir(), "demo.db")
	if code, _, errs := run(t, "", "demo", "--db", db, "--no-report", "--date", "2026-12-02", "--format", "json"); code != 0 {
		t.Fatalf("demo --db: exit %d: %s", code, errs)
	}
	base := startServe(t, serveOptions{DB: db, Every: "quarter", Baseline: demo.Baseline, Recent: 8, MaxRequest: 16})
	var ov serve.Overview
	getJSONURL(t, base+"/?format=json", &ov)
	if len(ov.Suppliers) != 5 || len(ov.Periods) != 8 || ov.Periods[0] != "2025-Q1" || ov.Periods[7] != "2026-Q4" {
		t.Fatalf("overview: %d suppliers, periods %v; want the 5 mills over 2025-Q1..2026-Q4", len(ov.Suppliers), ov.Periods)
	}
	var sp serve.SupplierPage
	getJSONURL(t, base+"/supplier/"+url.PathEscape("Coldmere Forge")+"?format=json", &sp)
	first := ""
	for _, s := range sp.Signals {
		if first == "" || s.Period < first {
			first = s.Period
		}
	}
	if first != "2026-Q2" {
		t.Errorf("Coldmere Forge first flagged in %q; the scenario plants the drift from 2026-Q2", first)
	}
	var lp serve.LotPage
	getJSONURL(t, base+"/lot/"+url.PathEscape(sp.Lots[0].Lot)+"?format=json", &lp)
	if lp.Supplier != "Coldmere Forge" || len(lp.Verdicts) == 0 || len(lp.Import.Digest) != 64 {
		t.Errorf("lot page %s: supplier %q, %d verdicts, import %q", sp.Lots[0].Lot, lp.Supplier, len(lp.Verdicts), lp.Import.Digest)
	}
}

func getJSONURL(t *testing.T, u string, v any) {
	t.Helper()
	resp, err := http.Get(u)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	if resp.StatusCode != 200 {
		t.Fatalf("GET %s: %d", u, resp.StatusCode)
	}
	if err := json.NewDecoder(resp.Body).Decode(v); err != nil {
		t.Fatalf("GET %s: %v", u, err)
	}
}

// TestServeInBrowser loads the overview, the drifting mill's page and one
// of its lots in headless Chromium (.ci/browser-check): no console
// messages, no script in the DOM, and every link on each page answers 200.
// Skipped when chromium is absent.
func TestServeInBrowser(t *testing.T) {
	needChromium(t)
	dir := t.TempDir()
	db := filepath.Join(dir, "demo.db")
	if code, _, errs := run(t, "", "demo", "--db", db, "--no-report", "--date", "2026-12-02", "--format", "json"); code != 0 {
		t.Fatalf("demo --db: exit %d: %s", code, errs)
	}
	base := startServe(t, serveOptions{DB: db, Every: "quarter", Baseline: demo.Baseline, Recent: 8, MaxRequest: 16})
	var sp serve.SupplierPage
	getJSONURL(t, base+"/supplier/"+url.PathEscape("Coldmere Forge")+"?format=json", &sp)
	pages := []string{"/", "/supplier/" + url.PathEscape("Coldmere Forge"), "/lot/" + url.PathEscape(sp.Lots[0].Lot)}
	checked := map[string]bool{}
	href := regexp.MustCompile(`\shref="([^"]*)"`)
	for i, p := range pages {
		out := filepath.Join(dir, "render", string(rune('a'+i)))
		cmd := exec.Command("bash", filepath.Join("..", "..", ".ci", "browser-check"), base+p, out)
		var msg bytes.Buffer
		cmd.Stdout, cmd.Stderr = &msg, &msg
		if err := cmd.Run(); err != nil {
			t.Errorf("browser-check %s: %v\n%s", p, err, msg.String())
			continue
		}
		log, err := os.ReadFile(filepath.Join(out, "console.log"))
		if err != nil {
			t.Fatal(err)
		}
		if strings.Contains(string(log), "CONSOLE") {
			t.Errorf("%s: console messages:\n%s", p, log)
		}
		dom, err := os.ReadFile(filepath.Join(out, "dom.html"))
		if err != nil {
			t.Fatal(err)
		}
		if bytes.Contains(dom, []byte("<script")) {
			t.Errorf("%s: the loaded DOM has a <script> element", p)
		}
		links := href.FindAllSubmatch(dom, -1)
		if len(links) < 3 {
			t.Errorf("%s: only %d links", p, len(links))
		}
		for _, m := range links {
			h := html.UnescapeString(string(m[1]))
			u, err := url.Parse(base + p)
			if err != nil {
				t.Fatal(err)
			}
			ref, err := u.Parse(h)
			if err != nil {
				t.Errorf("%s: bad link %q", p, h)
				continue
			}
			if ref.Scheme == "data" || checked[ref.String()] {
				continue
			}
			checked[ref.String()] = true
			if ref.Host != u.Host {
				t.Errorf("%s links off the server: %s", p, ref)
				continue
			}
			resp, err := http.Get(ref.String())
			if err != nil {
				t.Errorf("%s -> %s: %v", p, ref, err)
				continue
			}
			io.Copy(io.Discard, resp.Body)
			resp.Body.Close()
			if resp.StatusCode != 200 {
				t.Errorf("%s -> %s: %d", p, ref, resp.StatusCode)
			}
		}
	}
	t.Logf("%d pages loaded, %d distinct links answered", len(pages), len(checked))
}
