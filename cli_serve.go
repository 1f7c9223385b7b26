package main

import (
	"context"
	"embed"
	"errors"
	"fmt"
	iofs "io/fs"
	"log/slog"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"time"

	"aloft/assess"
	"aloft/records"
	"aloft/records/demo"
	"aloft/web"
)

//go:embed CAUTIONS.md
var cautionsMD string

//go:embed testdata/demo/*.json
var demoFiles embed.FS

func cmdServe(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("serve", "serve [--addr 127.0.0.1:8080] [--db aloft.db] [--allow-demo]", cio)
	addr := fs.String("addr", "127.0.0.1:8080", "address to listen on")
	dbPath := fs.String("db", "aloft.db", "database file (created and migrated if new)")
	allowDemo := fs.Bool("allow-demo", false, "serve a demo database even though its logins are public")
	secure := fs.Bool("secure-cookies", false, "mark cookies Secure (set when served over HTTPS)")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if fs.NArg() > 0 {
		return usageErr(cio, "serve", "unexpected argument %q", fs.Arg(0))
	}
	store, err := records.Open(ctx, *dbPath, records.Options{})
	if err != nil {
		return failErr(cio, "serve", err)
	}
	defer store.Close()
	centre, err := store.Centre(ctx)
	if err == nil && centre.IsDemo && !*allowDemo {
		fmt.Fprintf(cio.Stderr, "aloft serve: %s is a demo database whose logins are public; use `aloft demo --db %s` or add --allow-demo\n", *dbPath, *dbPath)
		return exitUsage
	}
	cfg := web.Config{Demo: err == nil && centre.IsDemo, SecureCookies: *secure}
	return serveStore(ctx, cio, store, *addr, cfg, nil)
}

// serveStore serves store at addr until ctx ends, then shuts down gracefully:
// requests in flight finish, then the database closes (by the caller).
func serveStore(ctx context.Context, cio cmdIO, store *records.Store, addr string, cfg web.Config, ready func(url string)) int {
	logger := slog.New(slog.NewTextHandler(cio.Stderr, &slog.HandlerOptions{Level: slog.LevelInfo}))
	species, err := assess.LoadSpecies()
	if err != nil {
		return failErr(cio, "serve", err)
	}
	cfg.Logger, cfg.Cautions = logger, cautionsMD
	srv := &http.Server{Handler: web.New(cfg, store, species), ReadHeaderTimeout: 10 * time.Second,
		ReadTimeout: 60 * time.Second, WriteTimeout: 120 * time.Second, IdleTimeout: 120 * time.Second}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return failErr(cio, "serve", err)
	}
	url := "http://" + ln.Addr().String()
	logger.Info("serving", "url", url, "db", store.Path())
	if ready != nil {
		ready(url)
	}
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case err := <-errc:
		return failErr(cio, "serve", err)
	case <-ctx.Done():
	}
	logger.Info("shutting down")
	sctx, cancel := context.WithTimeout(context.Background(), 15*time.Second)
	defer cancel()
	if err := srv.Shutdown(sctx); err != nil && !errors.Is(err, http.ErrServerClosed) {
		return failErr(cio, "serve", err)
	}
	return exitOK
}

func cmdDemo(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("demo", "demo [--addr 127.0.0.1:8080] [--db FILE] [--seed-only]", cio)
	addr := fs.String("addr", "127.0.0.1:8080", "address to listen on")
	dbPath := fs.String("db", "", "keep the demo database in FILE (default: a temporary folder removed on exit)")
	seedOnly := fs.Bool("seed-only", false, "write the database and exit (needs --db)")
	scale := fs.Int("scale", 0, "also generate this many invented historical patients (load testing)")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if *seedOnly && *dbPath == "" {
		return usageErr(cio, "demo", "--seed-only needs --db FILE")
	}
	if *scale < 0 || *scale > 200000 {
		return usageErr(cio, "demo", "--scale must be from 0 to 200000")
	}
	path := *dbPath
	if path == "" {
		dir, err := os.MkdirTemp("", "aloft-demo-")
		if err != nil {
			return failErr(cio, "demo", err)
		}
		defer os.RemoveAll(dir)
		path = filepath.Join(dir, "demo.db")
	} else if _, err := os.Stat(path); err == nil {
		return usageErr(cio, "demo", "%s already exists: remove it or choose another file", path)
	}
	store, err := records.Open(ctx, path, records.Options{})
	if err != nil {
		return failErr(cio, "demo", err)
	}
	defer store.Close()
	species, err := assess.LoadSpecies()
	if err != nil {
		return failErr(cio, "demo", err)
	}
	sub, err := iofs.Sub(demoFiles, "testdata/demo")
	if err != nil {
		return failErr(cio, "demo", err)
	}
	sc, err := demo.Load(sub)
	if err != nil {
		return failErr(cio, "demo", err)
	}
	start := time.Now()
	if err := demo.Seed(ctx, store, species, sc, time.Now()); err != nil {
		return failErr(cio, "demo", err)
	}
	if *scale > 0 {
		if err := demo.SeedScale(ctx, store, species, *scale, time.Now()); err != nil {
			return failErr(cio, "demo", err)
		}
	}
	fmt.Fprintf(cio.Stderr, "aloft demo: seeded %s in %s\n", path, time.Since(start).Round(time.Millisecond))
	if *seedOnly {
		return exitOK
	}
	cfg := web.Config{Demo: true}
	for _, u := range sc.Staff {
		cfg.DemoLogins = append(cfg.DemoLogins, web.DemoLogin{Username: u.Username, Password: u.Password, Roles: fmt.Sprint(u.Roles)})
	}
	return serveStore(ctx, cio, store, *addr, cfg, func(url string) {
		fmt.Fprintf(cio.Stdout, "Aloft demo centre %q at %s (Ctrl-C to stop; invented data)\n", sc.Centre.Name, url)
		fmt.Fprintln(cio.Stdout, "Demo logins (username / password / roles):")
		for _, u := range sc.Staff {
			fmt.Fprintf(cio.Stdout, "  %-8s %-22s %v\n", u.Username, u.Password, u.Roles)
		}
	})
}
