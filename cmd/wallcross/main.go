// Command wallcross builds synthetic GNSS clock products with injected
// dark-matter domain-wall crossings, and scores search pipelines on them.
//
// Run "wallcross help" for the list of commands.
package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"
)

func main() {
	os.Exit(run(os.Args, os.Stdout, os.Stderr))
}

// commands returns a fresh set of all registered commands, in the order
// they are listed by "wallcross help".
func commands() []*command {
	return []*command{
		newScenarioCmd(),
		newSimulateCmd(),
		newDemoCmd(),
		newOrbitCmd(),
		newClockCmd(),
		newStabilityCmd(),
		newOverlayCmd(),
		newSearchCmd(),
		newScoreCmd(),
		newReachCmd(),
		newCampaignCmd(),
		newMergeCmd(),
		newVersionCmd(),
	}
}

// Exit codes.
const (
	exitOK      = 0 // success
	exitFailure = 1 // the command ran and failed
	exitUsage   = 2 // the command line was wrong
)

// run executes the command line args (args[0] is the program name) and
// returns the process exit code.
func run(args []string, stdout, stderr io.Writer) int {
	cmds := commands()
	if len(args) < 2 {
		topHelp(stderr, cmds)
		return exitUsage
	}
	name, rest := args[1], args[2:]
	switch name {
	case "-h", "--help", "help":
		if name == "help" && len(rest) > 0 {
			c := lookup(cmds, rest[0])
			if c == nil {
				fmt.Fprintf(stderr, "wallcross help: unknown command %q\nRun 'wallcross help' for the list of commands.\n", rest[0])
				return exitUsage
			}
			c.help(stdout)
			return exitOK
		}
		topHelp(stdout, cmds)
		return exitOK
	case "--version":
		name = "version"
	}
	c := lookup(cmds, name)
	if c == nil {
		fmt.Fprintf(stderr, "wallcross: unknown command %q\nRun 'wallcross help' for the list of commands.\n", name)
		return exitUsage
	}
	fs := c.Flags
	if fs == nil {
		fs = newFlagSet(c.Name)
	}
	if err := fs.Parse(rest); err != nil {
		if err == pflag.ErrHelp {
			c.help(stdout)
			return exitOK
		}
		fmt.Fprintf(stderr, "wallcross %s: %v\nRun 'wallcross help %s' for usage.\n", c.Name, err, c.Name)
		return exitUsage
	}
	if err := c.Run(fs.Args(), stdout, stderr); err != nil {
		if isUsageError(err) {
			fmt.Fprintf(stderr, "wallcross %s: %v\nusage: wallcross %s\nRun 'wallcross help %s' for details.\n", c.Name, err, c.Usage, c.Name)
			return exitUsage
		}
		fmt.Fprintf(stderr, "wallcross %s: %v\n", c.Name, err)
		return exitFailure
	}
	return exitOK
}

func lookup(cmds []*command, name string) *command {
	for _, c := range cmds {
		if c.Name == name {
			return c
		}
	}
	return nil
}

func topHelp(w io.Writer, cmds []*command) {
	fmt.Fprint(w, strings.TrimLeft(`
wallcross builds synthetic GNSS clock products with dark-matter domain-wall
crossings injected from the halo model, with a full truth catalogue, and
scores search pipelines on them.

usage: wallcross COMMAND [ARGS] [FLAGS]

commands:
`, "\n"))
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	for _, c := range cmds {
		fmt.Fprintf(tw, "  %s\t%s\n", c.Name, c.Short)
	}
	tw.Flush()
	fmt.Fprint(w, "\nRun 'wallcross help COMMAND' for the details of one command.\n")
}
