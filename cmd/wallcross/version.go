package main

import (
	"fmt"
	"io"

	"wallcross/internal/buildinfo"
)

func newVersionCmd() *command {
	return &command{
		Name:  "version",
		Usage: "version",
		Short: "print the version and VCS revision",
		Long: `Version prints the module version of wallcross, the VCS revision and time
it was built from (with "+dirty" when the work tree had changes), and the
Go version, all read from the build information embedded in the binary.`,
		Flags: newFlagSet("version"),
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) > 0 {
				return usageErrorf("version takes no arguments, got %q", args[0])
			}
			fmt.Fprintln(stdout, buildinfo.Read())
			return nil
		},
	}
}
