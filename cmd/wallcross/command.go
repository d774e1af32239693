package main

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/pflag"
)

// A command is one wallcross subcommand. Each constructor builds a fresh
// value with its own FlagSet, so run can be called repeatedly (tests) and no
// flag state is shared between invocations.
type command struct {
	Name  string         // name typed on the command line, e.g. "scenario"
	Usage string         // usage line after "wallcross ", e.g. "scenario list | show NAME | check FILE"
	Short string         // one-line summary for the command list
	Long  string         // full help text shown by "wallcross help NAME"
	Flags *pflag.FlagSet // the command's flags, built with pflag.ContinueOnError

	// Run executes the command with the positional arguments left after
	// flag parsing. It returns a usageError (see usageErrorf) for bad
	// arguments, and any other error for a failure.
	Run func(args []string, stdout, stderr io.Writer) error
}

// newFlagSet returns an empty FlagSet for the named command that reports
// errors instead of exiting and prints nothing by itself.
func newFlagSet(name string) *pflag.FlagSet {
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.SortFlags = false
	return fs
}

// usageError marks an error in the way a command was invoked (exit code 2).
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

// usageErrorf returns a usage error: a wrong, missing or extra argument.
func usageErrorf(format string, a ...any) error {
	return &usageError{msg: fmt.Sprintf(format, a...)}
}

func isUsageError(err error) bool {
	var u *usageError
	return errors.As(err, &u)
}

// help writes the full help of c.
func (c *command) help(w io.Writer) {
	fmt.Fprintf(w, "usage: wallcross %s\n\n", c.Usage)
	fmt.Fprintln(w, strings.TrimSpace(c.Long))
	if c.Flags != nil && c.Flags.HasFlags() {
		fmt.Fprintf(w, "\nflags:\n%s", c.Flags.FlagUsages())
	}
}
