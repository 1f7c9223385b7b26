package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"
)

// cmdIO is what a command may touch of the outside world; tests supply their own.
type cmdIO struct {
	Stdout, Stderr io.Writer
	Getenv         func(string) string
}

// command is one `aloft NAME` subcommand.
type command struct {
	name    string
	summary string
	run     func(ctx context.Context, args []string, cio cmdIO) int
}

// Exit statuses.
const (
	exitOK    = 0
	exitFail  = 1
	exitUsage = 2
)

// commands lists every subcommand; `aloft` alone runs serve.
func commands() []command {
	return []command{
		{"serve", "serve the centre's database (the default)", cmdServe},
		{"demo", "seed an invented demo centre and serve it", cmdDemo},
		{"patients", "list patients", cmdPatients},
		{"user", "manage user accounts: add, passwd, disable, list", cmdUser},
		{"backup", "write a consistent copy of the database", cmdBackup},
		{"restore", "replace a database with a checked backup", cmdRestore},
		{"curve", "compute a bird's power curve and margins", cmdCurve},
		{"species", "list or show the species reference", cmdSpecies},
		{"assess", "assess a patient's readiness for release", cmdAssess},
		{"export", "export case records for permit reporting", cmdExport},
		{"report", "write a patient's pre-release PDF report", cmdReport},
	}
}

// runCLI dispatches args (without the program name) and returns the exit status.
func runCLI(ctx context.Context, args []string, cio cmdIO) int {
	if len(args) == 0 || strings.HasPrefix(args[0], "-") && args[0] != "-h" && args[0] != "--help" && args[0] != "-help" {
		return cmdServe(ctx, args, cio)
	}
	name := args[0]
	if name == "-h" || name == "--help" || name == "-help" || name == "help" {
		usage(cio.Stdout)
		return exitOK
	}
	for _, c := range commands() {
		if c.name == name {
			return c.run(ctx, args[1:], cio)
		}
	}
	fmt.Fprintf(cio.Stderr, "aloft: unknown command %q (try aloft --help)\n", name)
	return exitUsage
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "usage: aloft [command] [flags]   (no command: serve)")
	fmt.Fprintln(w, "\ncommands:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-9s %s\n", c.name, c.summary)
	}
	fmt.Fprintln(w, "\nEach command takes --help. Every flag may also be set as ALOFT_<FLAG>,")
	fmt.Fprintln(w, "e.g. ALOFT_DB=/srv/aloft.db for --db.")
}

// newFlags makes a flag set for one command that reports to cio.Stderr.
func newFlags(name, synopsis string, cio cmdIO) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(cio.Stderr)
	fs.Usage = func() {
		fmt.Fprintf(cio.Stderr, "usage: aloft %s\n\nflags:\n", synopsis)
		fs.PrintDefaults()
		fmt.Fprintln(cio.Stderr, "\nEvery flag may also be set as ALOFT_<FLAG> (upper case, - as _).")
	}
	return fs
}

// parseFlags parses args, then fills every flag not given on the command line
// from its ALOFT_ environment variable. It returns (exit status, false) when
// the command must stop: 0 after --help, 2 after a usage error.
func parseFlags(fs *flag.FlagSet, args []string, cio cmdIO) (int, bool) {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return exitOK, false
		}
		return exitUsage, false
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	var bad []string
	fs.VisitAll(func(f *flag.Flag) {
		if set[f.Name] || cio.Getenv == nil {
			return
		}
		env := "ALOFT_" + strings.ToUpper(strings.ReplaceAll(f.Name, "-", "_"))
		if v := cio.Getenv(env); v != "" {
			if err := fs.Set(f.Name, v); err != nil {
				bad = append(bad, fmt.Sprintf("%s=%q: %v", env, v, err))
			}
		}
	})
	if len(bad) > 0 {
		sort.Strings(bad)
		fmt.Fprintf(cio.Stderr, "aloft %s: bad environment: %s\n", fs.Name(), strings.Join(bad, "; "))
		return exitUsage, false
	}
	return 0, true
}

// usageErr prints a one-line usage error for command name and returns exit 2.
func usageErr(cio cmdIO, name, format string, a ...any) int {
	fmt.Fprintf(cio.Stderr, "aloft %s: %s\n", name, fmt.Sprintf(format, a...))
	return exitUsage
}

// failErr prints a one-line failure for command name and returns exit 1.
func failErr(cio cmdIO, name string, err error) int {
	fmt.Fprintf(cio.Stderr, "aloft %s: %v\n", name, err)
	return exitFail
}

func osIO() cmdIO { return cmdIO{Stdout: os.Stdout, Stderr: os.Stderr, Getenv: os.Getenv} }
