// Command skyframe renders the sky seen from a spacecraft moving at a large
// fraction of the speed of light: relativistic aberration, the Doppler shift of
// each star's blackbody spectrum and its beaming, from a real star catalogue
// or the built-in synthetic sky.
//
// Exit statuses: 0 success, 1 runtime failure, 2 usage or input error.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

// Exit statuses, documented in the README and in --help.
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
)

// version is the tool version recorded in sidecars and PNG text chunks.
const version = "0.1.0"

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	// After the first signal the command winds down (removing its
	// temporary files); a second one takes the default action and ends the
	// process at once.
	go func() {
		<-ctx.Done()
		stop()
	}()
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// env carries what a command may touch of the outside world, so tests can
// run commands in-process.
type env struct {
	ctx    context.Context
	stdout io.Writer
	stderr io.Writer
	getenv func(string) string
	// freeSpace reports the bytes free on the file system holding a
	// directory; nil asks the operating system (tests fake it).
	freeSpace func(dir string) (uint64, error)
}

type command struct {
	name    string
	summary string
	run     func(e *env, args []string) error
}

func commands() []command {
	return []command{
		{"still", "render one frame (PNG, FITS, JSON sidecar)", runStill},
		{"stars", "print the apparent position, colour and brightness of every star", runStars},
		{"catalog", "inspect, pack or fetch star catalogues", runCatalog},
		{"flight", "render a flight sequence from a plan file", runFlight},
		{"curves", "plot the transform: aberration, Doppler factor, brightening, beaming conventions", runCurves},
		{"census", "count and measure the visible sky against speed (CSV and plot)", runCensus},
	}
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	e := &env{ctx: ctx, stdout: stdout, stderr: stderr, getenv: os.Getenv}
	return e.dispatch(args)
}

func (e *env) dispatch(args []string) int {
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		e.usage(e.stdout)
		if len(args) == 0 {
			return exitUsage
		}
		return exitOK
	}
	if args[0] == "--version" || args[0] == "version" {
		fmt.Fprintf(e.stdout, "skyframe %s\n", version)
		return exitOK
	}
	for _, c := range commands() {
		if c.name == args[0] {
			return e.report(c.run(e, args[1:]))
		}
	}
	fmt.Fprintf(e.stderr, "skyframe: unknown command %q\n\n", args[0])
	e.usage(e.stderr)
	return exitUsage
}

func (e *env) usage(w io.Writer) {
	fmt.Fprintf(w, "skyframe %s — the sky from a relativistic spacecraft\n\nUsage:\n  skyframe <command> [options]\n\nCommands:\n", version)
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-8s %s\n", c.name, c.summary)
	}
	fmt.Fprint(w, "\nRun 'skyframe <command> --help' for the options of a command.\n")
	fmt.Fprint(w, exitStatusHelp)
}

const exitStatusHelp = `
Exit status: 0 success, 1 runtime failure, 2 usage or input error.
SIGINT or SIGTERM stops any command within a fraction of a second (a flight
after the frame in progress), removes its temporary files and exits with
status 1; a second signal ends the process at once.
`

// usageError marks a bad flag, argument or input file: exit status 2.
type usageError struct{ err error }

func (u usageError) Error() string { return u.err.Error() }
func (u usageError) Unwrap() error { return u.err }

// maxWorkers bounds --workers (still and flight), which sets GOMAXPROCS:
// far more than any machine's CPUs, far fewer than the Go runtime's limit
// of 10 000 threads, which GOMAXPROCS 10⁵ exceeds and crashes on.
const maxWorkers = 1024

func usagef(format string, a ...any) error {
	return usageError{fmt.Errorf(format, a...)}
}

// errHelp is returned when --help was asked for and printed.
var errHelp = errors.New("help requested")

// report prints err and maps it to an exit status.
func (e *env) report(err error) int {
	if err == nil || errors.Is(err, errHelp) {
		return exitOK
	}
	if errors.Is(err, context.Canceled) {
		fmt.Fprintf(e.stderr, "skyframe: interrupted (%v); no partial file was left\n", err)
		return exitFailure
	}
	fmt.Fprintf(e.stderr, "skyframe: %v\n", err)
	var u usageError
	if errors.As(err, &u) || isInputError(err) {
		return exitUsage
	}
	return exitFailure
}
