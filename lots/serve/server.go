package serve

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"strings"
	"time"

	"lotproof/lots"
	"lotproof/lots/report"
	"lotproof/lots/store"
	"lotproof/lots/trend"
	"lotproof/lots/units"
)

// Options configure a Server.
type Options struct {
	// Trend options of the overview and supplier pages (By is always
	// supplier; Every and Baseline as lotproof trend takes them).
	Every    string
	Baseline string
	// Recent is the number of latest periods on the overview (0: 8).
	Recent int
	// MaxInFlight caps the requests served at once; more get 503 (0: 16).
	MaxInFlight int
	// Token, when set, is required of every request: as a bearer token
	// (Authorization: Bearer TOKEN) or as the session cookie a one-time
	// sign-in link sets.
	Token string
	// Log receives one line per problem (not per request); nil: discard.
	Log io.Writer
}

// Defaults.
const (
	DefaultRecent      = 8
	DefaultMaxInFlight = 16
	DefaultListen      = "127.0.0.1:8080"
	MinTokenLength     = 16
)

// Server serves the pages of one lot history.
type Server struct {
	db    *DB
	opt   Options
	cache *cache
	auth  *auth
	sem   chan struct{}
	mux   *http.ServeMux
	log   io.Writer
}

// New makes a server over db. hist is where the trend reads its data
// (nil: db itself).
func New(db *DB, hist History, opt Options) (*Server, error) {
	if hist == nil {
		hist = db
	}
	if opt.Recent <= 0 {
		opt.Recent = DefaultRecent
	}
	if opt.MaxInFlight <= 0 {
		opt.MaxInFlight = DefaultMaxInFlight
	}
	if opt.Log == nil {
		opt.Log = io.Discard
	}
	topt := trend.Options{By: "supplier", Every: opt.Every, Baseline: opt.Baseline}
	// Check the trend options now rather than on the first request.
	if _, err := trend.ComputeFrom(nil, nil, nil, topt); err != nil {
		return nil, err
	}
	s := &Server{db: db, opt: opt, sem: make(chan struct{}, opt.MaxInFlight), log: opt.Log}
	s.cache = newCache(func(ctx context.Context) (*trend.Result, *store.LookupIndex, error) {
		idx, err := db.LoadIndex(ctx)
		if err != nil {
			return nil, nil, err
		}
		r, err := computeTrend(ctx, hist, topt)
		return r, idx, err
	}, db.Fingerprint, opt.Log)
	if opt.Token != "" {
		if len(opt.Token) < MinTokenLength {
			return nil, lots.Inputf("--token", fmt.Sprintf("use a random token of at least %d characters (for example: openssl rand -hex 24)", MinTokenLength), "the token is too short")
		}
		s.auth = newAuth(opt.Token)
	}
	s.routes()
	return s, nil
}

// computeTrend reads the history and computes the supplier trend. It is the
// one place that knows how the trend gets its data.
func computeTrend(ctx context.Context, h History, o trend.Options) (*trend.Result, error) {
	data, err := h.LotSamples(ctx, store.Filter{})
	if err != nil {
		return nil, err
	}
	verdicts, err := h.LotVerdicts(ctx)
	if err != nil {
		return nil, err
	}
	limits, err := h.SpecLimits(ctx)
	if err != nil {
		return nil, err
	}
	return trend.ComputeFrom(data, verdicts, limits, o)
}

// Warm computes the trend of the database as it is now, so that the first
// visitor does not wait for it; it returns how long that took.
func (s *Server) Warm(ctx context.Context) (time.Duration, error) {
	snap, err := s.cache.get(ctx)
	if err != nil {
		return 0, err
	}
	snap.view(units.SI, s.opt.Recent)
	return snap.computed, nil
}

func (s *Server) routes() {
	m := http.NewServeMux()
	m.HandleFunc("GET /{$}", s.page(s.overview))
	m.HandleFunc("GET /supplier/{name}", s.page(s.supplier))
	m.HandleFunc("GET /lot/{id}", s.page(s.lot))
	m.HandleFunc("GET /search", s.page(s.search))
	m.HandleFunc("GET /signin/{code}", s.signin)
	m.HandleFunc("POST /signin-links", s.newLink)
	m.HandleFunc("GET /favicon.ico", func(w http.ResponseWriter, r *http.Request) { w.WriteHeader(http.StatusNoContent) })
	s.mux = m
}

// Policy is the Content-Security-Policy header of every response: the
// report's policy, and no framing, no <base>, forms only to this server.
const Policy = report.ContentSecurityPolicy + "; form-action 'self'; frame-ancestors 'none'; base-uri 'none'"

// ServeHTTP applies the limits and headers every response gets, checks
// the token, and routes.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	h := w.Header()
	h.Set("Content-Security-Policy", Policy)
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Referrer-Policy", "no-referrer")
	h.Set("X-Frame-Options", "DENY")
	h.Set("Cache-Control", "no-store")
	select {
	case s.sem <- struct{}{}:
		defer func() { <-s.sem }()
	default:
		h.Set("Retry-After", "1")
		http.Error(w, "lotproof serve: too many requests at once; try again in a moment", http.StatusServiceUnavailable)
		return
	}
	if s.auth != nil && !strings.HasPrefix(r.URL.Path, "/signin/") && !s.auth.allowed(r) {
		h.Set("WWW-Authenticate", `Bearer realm="lotproof"`)
		http.Error(w, "lotproof serve: sign in with the one-time link you were given, or send Authorization: Bearer TOKEN", http.StatusUnauthorized)
		return
	}
	s.mux.ServeHTTP(w, r)
}

// Timeouts of the HTTP server.
const (
	ReadHeaderTimeout = 5 * time.Second
	ReadTimeout       = 10 * time.Second
	WriteTimeout      = 60 * time.Second
	IdleTimeout       = 60 * time.Second
	MaxHeaderBytes    = 16 << 10
)

// HTTPServer wraps the server in an http.Server with timeouts.
func (s *Server) HTTPServer() *http.Server {
	return &http.Server{Handler: s, ReadHeaderTimeout: ReadHeaderTimeout, ReadTimeout: ReadTimeout,
		WriteTimeout: WriteTimeout, IdleTimeout: IdleTimeout, MaxHeaderBytes: MaxHeaderBytes}
}

// CheckListen refuses a listen address other than loopback unless a token
// is set or insecure (no authentication) is explicitly allowed.
func CheckListen(addr string, hasToken, insecure bool) error {
	host, port, err := net.SplitHostPort(addr)
	if err != nil {
		return lots.Inputf("--listen", "give HOST:PORT, for example "+DefaultListen, "%q is not an address: %v", addr, err)
	}
	if port == "" {
		return lots.Inputf("--listen", "give HOST:PORT, for example "+DefaultListen, "%q has no port", addr)
	}
	if IsLoopback(host) || hasToken || insecure {
		return nil
	}
	return lots.Inputf("--listen", "give --token (a random string of at least 16 characters) so that only people with it can read the history, or --insecure-no-auth if the network itself restricts access",
		"%s is reachable from other machines and no --token is set", addr)
}

// IsLoopback reports whether host (an IP address or "localhost") is a
// loopback address. An empty host means every interface: not loopback.
func IsLoopback(host string) bool {
	if strings.EqualFold(host, "localhost") {
		return true
	}
	ip := net.ParseIP(strings.Trim(host, "[]"))
	return ip != nil && ip.IsLoopback()
}

// Serve serves on ln until ctx is done, then shuts down gracefully.
func (s *Server) Serve(ctx context.Context, ln net.Listener) error {
	hs := s.HTTPServer()
	done := make(chan error, 1)
	go func() { done <- hs.Serve(ln) }()
	select {
	case err := <-done:
		return err
	case <-ctx.Done():
		sctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		err := hs.Shutdown(sctx)
		if e := <-done; err == nil && !errors.Is(e, http.ErrServerClosed) {
			err = e
		}
		return err
	}
}

// SigninLink makes a one-time sign-in link for base (e.g.
// "http://host:8080"); "" when the server has no token.
func (s *Server) SigninLink(base string) string {
	if s.auth == nil {
		return ""
	}
	return strings.TrimRight(base, "/") + "/signin/" + s.auth.issue()
}
