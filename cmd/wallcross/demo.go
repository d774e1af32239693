package main

import (
	"fmt"
	"io"

	"wallcross/sim"
)

func newDemoCmd() *command {
	fs := newFlagSet("demo")
	out := fs.String("out", "demo-out", "directory to write the demo into")
	return &command{
		Name:  "demo",
		Usage: "demo [--out DIR]",
		Short: "run the built-in demo scenario end to end",
		Long: `Demo runs the built-in "demo" scenario (see "wallcross scenario show demo"):
a day of 30 s clock solutions from GPS-like and Galileo-like constellations
and an invented twelve-station network, relative to the maser at KVSR, with
walls from the halo model plus two explicit ones and the nuisances of real
products. It writes the dataset (every file that "wallcross simulate"
writes) to DIR/dataset and prints where every file went.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 0 {
				return usageErrorf("demo takes no arguments, got %q", args[0])
			}
			if *out == "" {
				return usageErrorf("--out needs a directory")
			}
			dir := *out + "/dataset"
			fmt.Fprintf(stdout, "dataset (wallcross simulate demo --out %s):\n", dir)
			_, err := simulateTo("demo", dir, sim.Options{Progress: stderr}, sim.WriteOptions{}, stdout, stderr)
			return err
		},
	}
}
