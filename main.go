// Command aloft serves Aloft, a records and pre-release flight-assessment
// tool for bird rehabilitation centres, and offers its engine, store and
// reports on the command line. Package main only parses flags, formats
// command output and wires the packages together.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := runCLI(ctx, os.Args[1:], osIO())
	stop()
	os.Exit(code)
}
