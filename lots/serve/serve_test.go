package serve

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"lotproof/lots/report"
	"lotproof/lots/store"
	"lotproof/lots/trend"
)

// get serves one request and returns the status and body.
func get(t *testing.T, h http.Handler, target string, hdr ...string) (int, string, http.Header) {
	t.Helper()
	r := httptest.NewRequest("GET", target, nil)
	for i := 0; i+1 < len(hdr); i += 2 {
		r.Header.Set(hdr[i], hdr[i+1])
	}
	w := httptest.NewRecorder()
	h.ServeHTTP(w, r)
	return w.Code, w.Body.String(), w.Header()
}

func getJSON(t *testing.T, h http.Handler, target string, v any) {
	t.Helper()
	code, body, hdr := get(t, h, target)
	if code != 200 {
		t.Fatalf("GET %s: %d %s", target, code, body)
	}
	if ct := hdr.Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
		t.Errorf("GET %s: Content-Type %q", target, ct)
	}
	if err := json.Unmarshal([]byte(body), v); err != nil {
		t.Fatalf("GET %s: %v\n%s", target, err, body)
	}
}

// TestPages serves every page of a small history from SQLite and from
// PostgreSQL and checks what they show against the recorded data (the
// trend numbers against lotproof's own trend of the same history, the
// unit conversion against the exact psi definition).
func TestPages(t *testing.T) {
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			loc := b.fresh(t)
			ls := history(t, loc)
			s, db := newServer(t, loc, Options{Recent: 4})

			// Overview, JSON: the two suppliers, lots and the rejection.
			var ov Overview
			getJSON(t, s, "/?format=json", &ov)
			if len(ov.Suppliers) != 2 || ov.Suppliers[0].Supplier != hostile || ov.Suppliers[1].Supplier != "Brindle Works" {
				t.Fatalf("suppliers %+v", ov.Suppliers)
			}
			if len(ov.Periods) != 4 || ov.Periods[3] != "2026-Q2" || ov.Periods[0] != "2025-Q3" {
				t.Errorf("periods %v, want the latest 4 of 6 ... 2026-Q2 (2025-01 .. 2026-04 by quarter)", ov.Periods)
			}
			last := ov.Suppliers[0].Cells[3]
			if last.Lots != 2 || last.LotsJudged != 2 || last.LotsRejected != 1 {
				t.Errorf("hostile supplier, last quarter: %+v, want 2 lots, 2 judged, 1 rejected", last)
			}
			if ov.Suppliers[0].Lots != 12 || ov.Suppliers[1].Lots != 12 {
				t.Errorf("lots per supplier %d, %d; want 12, 12", ov.Suppliers[0].Lots, ov.Suppliers[1].Lots)
			}
			// The Ppk shown is that of the trend for the same period.
			ref, err := computeTrend(context.Background(), db, trend.Options{By: "supplier"})
			if err != nil {
				t.Fatal(err)
			}
			found := false
			for _, p := range ref.Periods {
				if p.Group == "Brindle Works" && p.Period == "2026-Q1" && p.Property == "tensile" {
					c := ov.Suppliers[1].Cells[2]
					found = true
					if c.Property != "tensile" || math.Abs(float64(c.Ppk-p.Ppk)) > 1e-12 || math.Abs(float64(c.PpkLower-p.PpkLower)) > 1e-12 {
						t.Errorf("cell %+v, trend %v (%v)", c, p.Ppk, p.PpkLower)
					}
				}
			}
			if !found {
				t.Error("trend has no Brindle Works 2026-Q1 tensile period")
			}

			// Overview, HTML: links down to the supplier's period page.
			code, page, hdr := get(t, s, "/")
			if code != 200 || !strings.Contains(page, `href="/supplier/Brindle%20Works?period=2026-Q2"`) {
				t.Errorf("overview %d lacks the cell link:\n%s", code, page)
			}
			if hdr.Get("Content-Security-Policy") != Policy || !strings.Contains(page, report.ContentSecurityPolicy) {
				t.Error("overview lacks the content security policy")
			}
			if !strings.Contains(page, "never replace, the governing specification") {
				t.Error("overview lacks the caution")
			}

			// Supplier page.
			var sp SupplierPage
			getJSON(t, s, "/supplier/"+url.PathEscape("Brindle Works")+"?format=json&period=2026-Q2", &sp)
			if len(sp.Lots) != 2 || sp.LotsTotal != 2 || len(sp.Series) != 2 || sp.Series[0].Property != "proof" {
				t.Errorf("supplier page: %d lots of %d, %d series", len(sp.Lots), sp.LotsTotal, len(sp.Series))
			}
			code, page, _ = get(t, s, "/supplier/"+url.PathEscape("Brindle Works"))
			// Per series: individuals, EWMA and S chart (as in the report).
			if code != 200 || strings.Count(page, "<figure") != 6 || strings.Count(page, "<svg") < 6 {
				t.Errorf("supplier page %d: %d figures", code, strings.Count(page, "<figure"))
			}
			if c, _, _ := get(t, s, "/supplier/Nobody"); c != 404 {
				t.Errorf("unknown supplier: %d", c)
			}
			if c, _, _ := get(t, s, "/supplier/"+url.PathEscape("Brindle Works")+"?period=1999-Q1"); c != 404 {
				t.Errorf("unknown period: %d", c)
			}

			// Lot page: values back bit for bit; verdict with reasons.
			rej := ls[len(ls)-1]
			var lp LotPage
			getJSON(t, s, "/lot/"+url.PathEscape(rej.lot)+"?format=json", &lp)
			if lp.Lot != rej.lot || lp.Supplier != rej.supplier || len(lp.Specimens) != 5 || lp.Specimens[0].Heat != rej.heat {
				t.Fatalf("lot page %+v", lp)
			}
			if len(lp.Verdicts) != 1 || lp.Verdicts[0].Verdict != "nonconforming" || !lp.Verdicts[0].InForce ||
				!strings.HasPrefix(lp.Verdicts[0].Reasons[0], "tensile: ") || !strings.Contains(lp.Verdicts[0].Reasons[0], "4 of 5 values below the minimum 950.00 MPa") {
				t.Errorf("verdicts %+v", lp.Verdicts)
			}
			if len(lp.Imports) != 1 || len(lp.Import.Digest) != 64 || lp.Import.Source != "receipts "+hostile+".csv" {
				t.Errorf("import %+v", lp.Import)
			}
			data, err := db.LotData(context.Background(), store.Filter{Property: "tensile"})
			if err != nil {
				t.Fatal(err)
			}
			for _, d := range data {
				if d.Lot == rej.lot {
					for i, sp := range lp.Specimens {
						if float64(sp.Values["tensile"]) != d.Values[i] {
							t.Errorf("specimen %s: %v shown, %v stored", sp.Specimen, sp.Values["tensile"], d.Values[i])
						}
					}
				}
			}
			// US units: 1 psi = 0.45359237 kg x 9.80665 m/s² / (0.0254 m)²
			// (NIST SP 811, B.8); 950 MPa = 137.786 ksi.
			var us LotPage
			getJSON(t, s, "/lot/"+url.PathEscape(rej.lot)+"?format=json&units=us", &us)
			want := 950 / (0.45359237 * 9.80665 / (0.0254 * 0.0254) * 1e-6 * 1000)
			if us.SpecLimits[0].Unit != "ksi" || math.Abs(float64(us.SpecLimits[0].Minimum)-want) > 1e-9*want {
				t.Errorf("US limit %v %s, want %v ksi", us.SpecLimits[0].Minimum, us.SpecLimits[0].Unit, want)
			}
			code, page, _ = get(t, s, "/lot/"+url.PathEscape(rej.lot))
			if code != 200 || !strings.Contains(page, "nonconforming against SPEC-9 rev A") || !strings.Contains(page, lp.Import.Digest) {
				t.Errorf("lot page %d:\n%s", code, page)
			}
			if c, _, _ := get(t, s, "/lot/nothing-here"); c != 404 {
				t.Errorf("unknown lot: %d", c)
			}

			// Search by lot, heat and specimen id.
			var sr SearchPage
			getJSON(t, s, "/search?format=json&q=H50", &sr)
			if len(sr.Hits) != 2 || sr.Hits[0].Kind != "heat" || sr.Hits[0].Key != "H50" {
				t.Errorf("heat search: %+v", sr.Hits)
			}
			getJSON(t, s, "/search?format=json&q="+url.QueryEscape("L1-00/3"), &sr)
			if len(sr.Hits) != 1 || sr.Hits[0].Kind != "specimen" || sr.Hits[0].Lot != "L1-00" {
				t.Errorf("specimen search: %+v", sr.Hits)
			}
			getJSON(t, s, "/search?format=json&q=L1", &sr)
			if len(sr.Hits) != 3+15 || sr.Hits[0].Key != "L1-00" {
				t.Errorf("prefix search L1: %d hits", len(sr.Hits))
			}
			getJSON(t, s, "/search?format=json&q="+url.QueryEscape("%"), &sr)
			if len(sr.Hits) != 0 {
				t.Errorf("%% matched %d ids: LIKE wildcards must be taken literally", len(sr.Hits))
			}
			// Bad parameters.
			for _, target := range []string{"/?units=metric", "/?format=xml", "/search?q=" + strings.Repeat("x", MaxQuery+1)} {
				if c, _, _ := get(t, s, target); c != 400 {
					t.Errorf("%s: %d, want 400", target, c)
				}
			}
			if c, _, _ := get(t, s, "/nowhere"); c != 404 {
				t.Errorf("unknown path: %d", c)
			}
			r := httptest.NewRequest("POST", "/", strings.NewReader("x"))
			w := httptest.NewRecorder()
			s.ServeHTTP(w, r)
			if w.Code != http.StatusMethodNotAllowed {
				t.Errorf("POST /: %d", w.Code)
			}
		})
	}
}

// TestHostileIDsInert: ids holding markup show as text on every page and
// in every link, and read back verbatim from the JSON.
func TestHostileIDsInert(t *testing.T) {
	loc := filepath.Join(t.TempDir(), "h.db")
	history(t, loc)
	s, _ := newServer(t, loc, Options{})
	targets := []string{"/", "/supplier/" + url.PathEscape(hostile), "/lot/" + url.PathEscape(hostile+"5"),
		"/search?q=" + url.QueryEscape(hostile), "/lot/" + url.PathEscape(hostile+"x"), "/supplier/" + url.PathEscape(hostile) + "?period=" + url.QueryEscape(hostile)}
	for _, target := range targets {
		_, page, _ := get(t, s, target)
		for _, bad := range []string{"<script", "</svg><p>", `"q" 'a'`} {
			if strings.Contains(page, bad) {
				t.Errorf("%s: page contains %q", target, bad)
			}
		}
		sep := "?"
		if strings.Contains(target, "?") {
			sep = "&"
		}
		_, page, _ = get(t, s, target+sep+"format=json")
		if target != "/" && !strings.Contains(page, "<script>alert(1)</script>") {
			t.Errorf("%s: JSON does not carry the id verbatim:\n%.300s", target, page)
		}
	}
	_, page, _ := get(t, s, "/lot/"+url.PathEscape(hostile+"5"))
	if !strings.Contains(page, "&lt;script&gt;alert(1)&lt;/script&gt;") {
		t.Error("lot page does not show the hostile id as text")
	}
	var lp LotPage
	getJSON(t, s, "/lot/"+url.PathEscape(hostile+"5")+"?format=json", &lp)
	if lp.Lot != hostile+"5" || lp.Supplier != hostile {
		t.Errorf("JSON lot %q supplier %q", lp.Lot, lp.Supplier)
	}
	// Every link on the pages resolves to a page that exists.
	for _, target := range targets[:3] {
		_, page, _ := get(t, s, target)
		for _, href := range links(page) {
			if c, body, _ := get(t, s, href); c != 200 {
				t.Errorf("%s links to %s: %d %.200s", target, href, c, body)
			}
		}
	}
}

var reHref = regexp.MustCompile(`href="([^"]*)"`)

// links lists the same-site links of a page, unescaped from HTML.
func links(page string) []string {
	var out []string
	for _, m := range reHref.FindAllStringSubmatch(page, -1) {
		h := strings.NewReplacer("&amp;", "&", "&#43;", "+", "&#39;", "'", "&#34;", `"`).Replace(m[1])
		if strings.HasPrefix(h, "/") {
			out = append(out, h)
		}
	}
	return out
}

// TestReadOnly: the server's connection refuses writes on both backends,
// and a missing SQLite file is refused, not created.
func TestReadOnly(t *testing.T) {
	for _, b := range backends(t) {
		t.Run(b.name, func(t *testing.T) {
			loc := b.fresh(t)
			history(t, loc)
			// The refused writes are checked on the connection itself in
			// lots/store (TestOpenView); here the server reads as usual.
			s, _ := newServer(t, loc, Options{})
			var ov Overview
			getJSON(t, s, "/?format=json", &ov)
			if len(ov.Suppliers) != 2 {
				t.Errorf("suppliers %+v", ov.Suppliers)
			}
		})
	}
	missing := filepath.Join(t.TempDir(), "none.db")
	if _, err := OpenReadOnly(context.Background(), missing); err == nil {
		t.Error("missing file opened")
	}
	if _, err := os.Stat(missing); !os.IsNotExist(err) {
		t.Error("opening a missing file created it")
	}
	empty := filepath.Join(t.TempDir(), "empty.db")
	os.WriteFile(empty, nil, 0o644)
	if _, err := OpenReadOnly(context.Background(), empty); err == nil || !strings.Contains(err.Error(), "no lot history") {
		t.Errorf("empty file: %v", err)
	}
}

// TestCheckListen: loopback is allowed; another address needs a token or
// the explicit insecure flag.
func TestCheckListen(t *testing.T) {
	for _, c := range []struct {
		addr            string
		token, insecure bool
		ok              bool
	}{
		{"127.0.0.1:8080", false, false, true},
		{"127.3.4.5:80", false, false, true},
		{"[::1]:8080", false, false, true},
		{"localhost:8080", false, false, true},
		{"0.0.0.0:8080", false, false, false},
		{":8080", false, false, false},
		{"[::]:8080", false, false, false},
		{"192.168.1.20:8080", false, false, false},
		{"lotserver.example:8080", false, false, false},
		{"0.0.0.0:8080", true, false, true},
		{"0.0.0.0:8080", false, true, true},
		{"127.0.0.1", false, false, false},
	} {
		err := CheckListen(c.addr, c.token, c.insecure)
		if (err == nil) != c.ok {
			t.Errorf("%s token=%v insecure=%v: %v", c.addr, c.token, c.insecure, err)
		}
	}
}

// TestToken: with a token, requests need the bearer token or the cookie
// of a one-time link; the link works once.
func TestToken(t *testing.T) {
	loc := filepath.Join(t.TempDir(), "h.db")
	history(t, loc)
	const tok = "0123456789abcdef-secret"
	if _, err := New(mustDB(t, loc), nil, Options{Token: "short"}); err == nil {
		t.Error("a 5-character token was accepted")
	}
	s, _ := newServer(t, loc, Options{Token: tok})
	if c, _, h := get(t, s, "/"); c != 401 || h.Get("WWW-Authenticate") == "" {
		t.Errorf("no token: %d", c)
	}
	for _, bad := range []string{"Bearer wrong", "Bearer " + tok + "x", "Basic " + tok, tok, "Bearer"} {
		if c, _, _ := get(t, s, "/", "Authorization", bad); c != 401 {
			t.Errorf("Authorization %q: %d", bad, c)
		}
	}
	if c, _, _ := get(t, s, "/", "Authorization", "Bearer "+tok); c != 200 {
		t.Errorf("bearer token: %d", c)
	}
	// A one-time link sets a session cookie.
	link := s.SigninLink("http://x")
	path := strings.TrimPrefix(link, "http://x")
	r := httptest.NewRequest("GET", path, nil)
	w := httptest.NewRecorder()
	s.ServeHTTP(w, r)
	cookies := w.Result().Cookies()
	if w.Code != http.StatusSeeOther || len(cookies) != 1 || !cookies[0].HttpOnly || cookies[0].SameSite != http.SameSiteStrictMode {
		t.Fatalf("sign-in: %d %v", w.Code, cookies)
	}
	cookie := cookies[0].Name + "=" + cookies[0].Value
	if c, _, _ := get(t, s, "/", "Cookie", cookie); c != 200 {
		t.Errorf("session cookie: %d", c)
	}
	if c, _, _ := get(t, s, path); c != 401 {
		t.Errorf("second use of the link: %d", c)
	}
	forged := cookies[0].Name + "=" + "99999999999." + strings.Repeat("0", 64)
	if c, _, _ := get(t, s, "/", "Cookie", forged); c != 401 {
		t.Errorf("forged cookie: %d", c)
	}
	// A session cookie from another token is worthless.
	other := newAuth("another-token-0123456789")
	v, _ := other.session()
	if c, _, _ := get(t, s, "/", "Cookie", cookieName+"="+v); c != 401 {
		t.Errorf("cookie of another token: %d", c)
	}
	// Expired sessions and links.
	s.auth.now = func() time.Time { return time.Now().Add(SessionLifetime + time.Minute) }
	if c, _, _ := get(t, s, "/", "Cookie", cookie); c != 401 {
		t.Errorf("expired session: %d", c)
	}
	s.auth.now = time.Now
	code := s.auth.issue()
	s.auth.now = func() time.Time { return time.Now().Add(LinkLifetime + time.Minute) }
	if c, _, _ := get(t, s, "/signin/"+code); c != 401 {
		t.Errorf("expired link: %d", c)
	}
	s.auth.now = time.Now
	// New links: bearer only.
	r = httptest.NewRequest("POST", "/signin-links", nil)
	r.Header.Set("Authorization", "Bearer "+tok)
	w = httptest.NewRecorder()
	s.ServeHTTP(w, r)
	if w.Code != 200 || !strings.Contains(w.Body.String(), "/signin/") {
		t.Errorf("new link: %d %s", w.Code, w.Body.String())
	}
	r = httptest.NewRequest("POST", "/signin-links", nil)
	r.Header.Set("Cookie", cookie)
	w = httptest.NewRecorder()
	s.ServeHTTP(w, r)
	if w.Code != http.StatusForbidden {
		t.Errorf("new link with a cookie: %d", w.Code)
	}
}

func mustDB(t *testing.T, loc string) *DB {
	db, err := OpenReadOnly(context.Background(), loc)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	return db
}

// blocking is a History whose data wait until release is closed.
type blocking struct {
	History
	release chan struct{}
}

func (b blocking) LotSamples(ctx context.Context, f store.Filter) ([]store.LotValues, error) {
	<-b.release
	return b.History.LotSamples(ctx, f)
}

// TestBusy: beyond MaxInFlight requests at once, the server answers 503
// at once instead of queueing.
func TestBusy(t *testing.T) {
	loc := filepath.Join(t.TempDir(), "h.db")
	history(t, loc)
	db := mustDB(t, loc)
	release := make(chan struct{})
	s, err := New(db, blocking{db, release}, Options{MaxInFlight: 2})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(s)
	defer srv.Close()
	done := make(chan int, 2)
	for range 2 {
		go func() {
			resp, err := http.Get(srv.URL + "/")
			if err != nil {
				done <- 0
				return
			}
			io.Copy(io.Discard, resp.Body)
			resp.Body.Close()
			done <- resp.StatusCode
		}()
	}
	deadline := time.Now().Add(10 * time.Second)
	for len(s.sem) < 2 && time.Now().Before(deadline) {
		time.Sleep(5 * time.Millisecond)
	}
	resp, err := http.Get(srv.URL + "/lot/x")
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusServiceUnavailable || resp.Header.Get("Retry-After") == "" {
		t.Errorf("third request while two run: %d", resp.StatusCode)
	}
	close(release)
	for range 2 {
		if c := <-done; c != 200 {
			t.Errorf("held request: %d", c)
		}
	}
	if code, _, _ := get(t, s, "/lot/x"); code != 404 {
		t.Errorf("after the load: %d", code)
	}
}

// TestRefreshAfterImport: a new import shows without a restart (the cache
// follows the imports table).
func TestRefreshAfterImport(t *testing.T) {
	loc := filepath.Join(t.TempDir(), "h.db")
	history(t, loc)
	s, _ := newServer(t, loc, Options{})
	s.cache.every = 0
	var ov Overview
	getJSON(t, s, "/?format=json", &ov)
	first := ov.Suppliers[1].Lots
	d := dataset(t, "more.csv", []lotSpec{{lot: "N-1", heat: "HN", supplier: "Brindle Works", tested: "2026-05-02", tensile: 1000, proof: 880}}, 2)
	record(t, loc, d, []store.Verdict{{Lot: "N-1", Spec: "SPEC-9 rev A", Verdict: "conforming"}}, nil, time.Date(2026, 11, 3, 9, 0, 0, 0, time.UTC))
	// The lot page shows the new lot and its verdict at once.
	var lp LotPage
	getJSON(t, s, "/lot/N-1?format=json", &lp)
	if len(lp.Verdicts) != 1 || lp.Verdicts[0].Verdict != "conforming" {
		t.Errorf("new lot's verdicts: %+v", lp.Verdicts)
	}
	// The trend follows once recomputed in the background; meanwhile the
	// previous state is served.
	deadline := time.Now().Add(30 * time.Second)
	for {
		getJSON(t, s, "/?format=json", &ov)
		if ov.Suppliers[1].Lots == first+1 {
			break
		}
		if ov.Suppliers[1].Lots != first || time.Now().After(deadline) {
			t.Fatalf("after an import: %d lots, want %d (or %d until updated)", ov.Suppliers[1].Lots, first+1, first)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// TestPolicyIsTheReports: the policy the pages carry is the one the report
// writes.
func TestPolicyIsTheReports(t *testing.T) {
	var b bytes.Buffer
	if err := (&report.Document{Title: "t"}).WriteHTML(&b); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), `content="`+report.ContentSecurityPolicy+`"`) {
		t.Error("report.ContentSecurityPolicy is not the policy of the report page")
	}
	if !strings.HasPrefix(Policy, report.ContentSecurityPolicy+";") {
		t.Error("the server's policy does not start with the report's")
	}
}

// TestConcurrentPages: 8 clients request every kind of page at once while
// an import lands; every answer is 200 (run with -race to check the cache).
func TestConcurrentPages(t *testing.T) {
	loc := filepath.Join(t.TempDir(), "h.db")
	history(t, loc)
	s, _ := newServer(t, loc, Options{MaxInFlight: 64})
	s.cache.every = 0
	srv := httptest.NewServer(s)
	defer srv.Close()
	targets := []string{"/", "/?units=us&format=json", "/supplier/Brindle%20Works", "/supplier/Brindle%20Works?format=json",
		"/supplier/Brindle%20Works?units=us", "/lot/L2-00", "/lot/L2-00?format=json&units=us", "/search?q=H1", "/search?q=L"}
	errs := make(chan error, 8)
	for c := range 8 {
		go func() {
			for i := range 30 {
				target := targets[(c+i)%len(targets)]
				resp, err := http.Get(srv.URL + target)
				if err != nil {
					errs <- err
					return
				}
				io.Copy(io.Discard, resp.Body)
				resp.Body.Close()
				if resp.StatusCode != 200 {
					errs <- fmt.Errorf("%s: %d", target, resp.StatusCode)
					return
				}
			}
			errs <- nil
		}()
	}
	d := dataset(t, "more.csv", []lotSpec{{lot: "N-1", heat: "HN", supplier: "Brindle Works", tested: "2026-05-02", tensile: 1000, proof: 880}}, 2)
	record(t, loc, d, nil, nil, time.Date(2026, 11, 3, 9, 0, 0, 0, time.UTC))
	for range 8 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
}

// TestCacheBudget: a view keeps rendered pages only up to CacheBudget.
func TestCacheBudget(t *testing.T) {
	v := &view{}
	if !v.keep(CacheBudget-10) || !v.keep(10) {
		t.Fatal("refused within the budget")
	}
	if v.keep(1) {
		t.Error("kept a byte beyond the budget")
	}
	if got := v.cached.Load(); got != CacheBudget {
		t.Errorf("counted %d bytes, want %d", got, CacheBudget)
	}
}
