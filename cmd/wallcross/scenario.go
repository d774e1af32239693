package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"text/tabwriter"

	"wallcross/scenarios"
)

func newScenarioCmd() *command {
	fs := newFlagSet("scenario")
	return &command{
		Name:  "scenario",
		Usage: "scenario list | show NAME | check FILE...",
		Short: "list, show and check scenario files",
		Long: `Scenario works with scenario files, the YAML descriptions of a simulation.

  scenario list         lists the built-in scenarios with their descriptions
  scenario show NAME    prints the YAML of a built-in scenario (a starting
                        point for your own: wallcross scenario show demo > my.yaml)
  scenario check FILE   decodes and validates FILE (or a built-in NAME) and
                        prints "ok", or every problem as file:line: field: message,
                        exiting with status 1

Quantities are written with their units: "30 s", "2 h", "1 yr", "1e4 km",
"300 km/s", "55 deg", "0.4 GeV/cm^3", "1e11 GeV", "0.5 /d". Unknown keys
are errors. Epochs are ISO 8601 on GPS time, e.g. 2026-01-01T00:00:00.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) == 0 {
				return usageErrorf("missing subcommand: list, show or check")
			}
			switch sub, rest := args[0], args[1:]; sub {
			case "list":
				if len(rest) > 0 {
					return usageErrorf("scenario list takes no arguments")
				}
				bs, err := scenarios.Builtins()
				if err != nil {
					return err
				}
				tw := tabwriter.NewWriter(stdout, 0, 4, 2, ' ', 0)
				for _, b := range bs {
					fmt.Fprintf(tw, "%s\t%s\n", b.Name, b.Description)
				}
				return tw.Flush()
			case "show":
				if len(rest) != 1 {
					return usageErrorf("scenario show takes one built-in scenario name")
				}
				src, err := scenarios.BuiltinSource(rest[0])
				if err != nil {
					return err
				}
				_, err = stdout.Write(src)
				return err
			case "check":
				if len(rest) == 0 {
					return usageErrorf("scenario check needs at least one FILE")
				}
				bad := 0
				for _, f := range rest {
					var err error
					if _, statErr := os.Stat(f); statErr == nil {
						_, err = scenarios.Load(f)
					} else {
						_, err = scenarios.Resolve(f)
					}
					var ps scenarios.Problems
					switch {
					case err == nil:
						fmt.Fprintf(stdout, "%s: ok\n", f)
					case errors.As(err, &ps):
						bad++
						for _, p := range ps {
							fmt.Fprintln(stdout, p)
						}
					default:
						bad++
						fmt.Fprintf(stdout, "%s: %v\n", f, err)
					}
				}
				if bad > 0 {
					return fmt.Errorf("%d of %d scenario files have problems", bad, len(rest))
				}
				return nil
			default:
				return usageErrorf("unknown subcommand %q: want list, show or check", sub)
			}
		},
	}
}
