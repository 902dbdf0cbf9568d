package main

import (
	"context"
	"fmt"
	"net"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/spf13/cobra"

	"lotproof/lots/serve"
	"lotproof/lots/store"
)

type serveOptions struct {
	DB         string
	Listen     string
	Token      string
	TokenFile  string
	Insecure   bool
	Every      string
	Baseline   string
	Recent     int
	MaxRequest int
}

func init() { register(newServeCmd) }

func newServeCmd(g *globalOptions, st streams) *cobra.Command {
	o := serveOptions{Listen: serve.DefaultListen, Recent: serve.DefaultRecent, MaxRequest: serve.DefaultMaxInFlight}
	cmd := &cobra.Command{
		Use:   "serve [--db URL] [--listen 127.0.0.1:8080] [--token TOKEN | --insecure-no-auth]",
		Short: "Serve a read-only web view of the lot history to the team",
		Long: `serve shows the lot history (see lotproof record) as web pages: an overview
of suppliers by quarter (lots, rejections, trend signals, Ppk with its lower
confidence bound), a page per supplier (period table, signals, latest lots,
control and EWMA charts of lot means), a page per lot (specimens, values,
verdicts and what the values show against the specification limits, the
import it came from with its SHA-256) and a search by lot, heat or
specimen id. Every page is also JSON at the same address with ?format=json,
in SI or US customary units with ?units=si or ?units=us.

The database is opened read-only. The pages run no scripts and load
nothing from elsewhere.

By default serve listens on 127.0.0.1 only. To let colleagues in, listen on
another address with --token (or --token-file): requests then need
"Authorization: Bearer TOKEN", or a browser signs in once through a one-time
link (serve prints one at start; POST /signin-links with the bearer token
makes more). --insecure-no-auth serves without any sign-in, for networks
that are closed by other means.

Statistical results support, and never replace, the governing
specification, regulations, local codes and licensed engineering judgement.`,
		Example: `  lotproof serve --db lotproof.db
  lotproof serve --db postgres://viewer@db.example/lots --listen 0.0.0.0:8080 --token-file /etc/lotproof/token`,
		Args: exactArgs(0, "no arguments (the data come from the database)"),
		RunE: func(c *cobra.Command, args []string) error {
			return runServe(c.Context(), o, st, nil)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.DB, "db", "", "database: a SQLite file or postgres://... URL (default: $LOTPROOF_DB or lotproof.db)")
	f.StringVar(&o.Listen, "listen", o.Listen, "address to listen on, HOST:PORT")
	f.StringVar(&o.Token, "token", "", "require this token (at least 16 characters) of every visitor")
	f.StringVar(&o.TokenFile, "token-file", "", "read the token from this file (keeps it out of the process list)")
	f.BoolVar(&o.Insecure, "insecure-no-auth", false, "allow a non-loopback --listen without a token")
	f.StringVar(&o.Every, "every", "quarter", "period: quarter or month")
	f.StringVar(&o.Baseline, "baseline", "", "periods the control limits come from, FROM..TO (default: each series' first four periods)")
	f.IntVar(&o.Recent, "periods", o.Recent, "latest periods shown on the overview")
	f.IntVar(&o.MaxRequest, "max-requests", o.MaxRequest, "requests served at once; more are answered 503")
	return cmd
}

// runServe serves until ctx is done or the process gets SIGINT or SIGTERM.
// ready, when not nil, receives the listening address.
func runServe(ctx context.Context, o serveOptions, st streams, ready chan<- string) error {
	if ctx == nil {
		ctx = context.Background()
	}
	if o.TokenFile != "" {
		if o.Token != "" {
			return usageError{fmt.Errorf("give --token or --token-file, not both")}
		}
		b, err := os.ReadFile(o.TokenFile)
		if err != nil {
			return usageError{fmt.Errorf("--token-file: %w", err)}
		}
		o.Token = strings.TrimSpace(string(b))
	}
	if err := serve.CheckListen(o.Listen, o.Token != "", o.Insecure); err != nil {
		return err
	}
	db, err := serve.OpenReadOnly(ctx, store.ResolveURL(o.DB))
	if err != nil {
		return usageError{err}
	}
	defer db.Close()
	srv, err := serve.New(db, nil, serve.Options{Every: o.Every, Baseline: o.Baseline, Recent: o.Recent, MaxInFlight: o.MaxRequest, Token: o.Token, Log: st.Err})
	if err != nil {
		return err
	}
	took, err := srv.Warm(ctx)
	if err != nil {
		return err
	}
	ln, err := net.Listen("tcp", o.Listen)
	if err != nil {
		return usageError{fmt.Errorf("--listen %s: %w", o.Listen, err)}
	}
	addr := ln.Addr().String()
	fmt.Fprintf(st.Err, "lotproof: serving %s read-only at http://%s/ (trend computed in %s); stop with Ctrl-C\n", db.Where(), addr, took.Round(1e6))
	if link := srv.SigninLink("http://" + addr); link != "" {
		fmt.Fprintf(st.Err, "lotproof: one-time sign-in link (valid %s): %s\n", serve.LinkLifetime, link)
	}
	if !serve.IsLoopback(hostOf(o.Listen)) && o.Token == "" {
		fmt.Fprintln(st.Err, "lotproof: warning: --insecure-no-auth: anyone who can reach this address can read the history")
	}
	if ready != nil {
		ready <- addr
	}
	ctx, stop := signal.NotifyContext(ctx, os.Interrupt, syscall.SIGTERM)
	defer stop()
	return srv.Serve(ctx, ln)
}

func hostOf(addr string) string {
	h, _, _ := net.SplitHostPort(addr)
	return h
}
