package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"strings"

	"plumb/optimize/search"
)

// Exit codes, documented in `plumb --help`.
const (
	exitOK         = 0
	exitError      = 1
	exitUsage      = 2
	exitInfeasible = 3
	// exitInterrupted is the shell's code for a process stopped by SIGINT
	// (128 + 2, common practice): Ctrl-C stops a search or a Monte Carlo
	// run through the command's context.
	exitInterrupted = 130
)

// usageError marks a command line that cannot be run as written: an unknown
// command or flag, a bad flag value, the wrong number of arguments.
type usageError struct{ err error }

func (e *usageError) Error() string { return e.err.Error() }
func (e *usageError) Unwrap() error { return e.err }

// usagef returns a usage error.
func usagef(format string, a ...any) error {
	return &usageError{fmt.Errorf(format, a...)}
}

// infeasibleErrors are the sentinels meaning "no design meets the spec"
// (also: the catalog holds no part of a kind the spec needs); they map to
// exitInfeasible.
var infeasibleErrors = []error{search.ErrInfeasible, search.ErrCatalogLacks}

// Main runs plumb with the process's arguments and streams and returns the
// exit code. It is the only place where errors are printed.
func Main() int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	ios := SystemIO()
	f := newFactory(ios)
	root := newRootCmd(f)
	root.SetArgs(os.Args[1:])
	err := root.ExecuteContext(ctx)
	return reportError(ios, err)
}

// reportError prints err (if any) on stderr and returns its exit code. On
// a terminal each line of the message is wrapped to the page as the
// results are (the terminal's width, at most 100 columns), each
// continuation indented; a pipe or a log gets the message as it is.
func reportError(ios *IOStreams, err error) int {
	if err == nil {
		return exitOK
	}
	code := exitCode(err)
	prefix := "plumb: "
	if ios.IsStderrTTY() && ios.ColorEnabled() {
		prefix = sgrRed + "plumb:" + sgrReset + " "
	}
	msg := err.Error()
	if code == exitUsage && !strings.Contains(msg, "--help") {
		msg += "\nrun `plumb --help` for usage"
	}
	if !ios.IsStderrTTY() {
		// A log or a pipe gets each error on one line, for grep.
		fmt.Fprintln(ios.ErrOut, prefix+msg)
		return code
	}
	for i, line := range strings.Split(msg, "\n") {
		lead, cont := prefix, "  "
		if i > 0 {
			// A later line of the message keeps its own indent and hangs
			// two columns under it.
			text := strings.TrimLeft(line, " ")
			lead = line[:len(line)-len(text)]
			cont, line = lead+"  ", text
		}
		writeHanging(ios.ErrOut, ios, lead, cont, line)
	}
	return code
}

// exitCode maps an error to the exit code documented in `plumb --help`.
func exitCode(err error) int {
	if err == nil {
		return exitOK
	}
	for _, s := range infeasibleErrors {
		if errors.Is(err, s) {
			return exitInfeasible
		}
	}
	if errors.Is(err, context.Canceled) {
		return exitInterrupted
	}
	var ue *usageError
	if errors.As(err, &ue) {
		return exitUsage
	}
	// cobra reports an unknown subcommand of the root with this text and
	// no error type.
	if strings.HasPrefix(err.Error(), "unknown command ") {
		return exitUsage
	}
	return exitError
}
