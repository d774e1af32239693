package main

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"

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
products. It then runs the three steps of a search study on it and prints
where every file went:

  1. simulate: the dataset (every file "wallcross simulate" writes) in
     DIR/dataset;
  2. search: the reference pipeline with a demo-sized bank (400
     directions, 4 speed classes; see "wallcross help search"), candidates
     in DIR/candidates.csv;
  3. score: the candidates matched to the injected walls, with found,
     missed and false counts, efficiency, false alarms per day, ROC and
     plots in DIR/score.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 0 {
				return usageErrorf("demo takes no arguments, got %q", args[0])
			}
			if *out == "" {
				return usageErrorf("--out needs a directory")
			}
			dir := filepath.Join(*out, "dataset")
			cands := filepath.Join(*out, "candidates.csv")
			scoreDir := filepath.Join(*out, "score")
			fmt.Fprintf(stdout, "1. dataset (wallcross simulate demo --out %s):\n", dir)
			if _, err := simulateTo("demo", dir, sim.Options{Progress: stderr}, sim.WriteOptions{}, stdout, stderr); err != nil {
				return err
			}
			searchArgs := []string{"--out", cands, "--directions", "400", "--speeds", "200,260,330,420", "--threshold", "6"}
			fmt.Fprintf(stdout, "\n2. search (wallcross search %s %s):\n", dir, strings.Join(searchArgs, " "))
			if err := runSub(newSearchCmd(), append([]string{dir}, searchArgs...), stdout, stderr); err != nil {
				return err
			}
			fmt.Fprintf(stdout, "\n3. score (wallcross score %s %s --out %s):\n", dir, cands, scoreDir)
			return runSub(newScoreCmd(), []string{dir, cands, "--out", scoreDir}, stdout, stderr)
		},
	}
}

// runSub runs another command with its own flags, as the command line
// would.
func runSub(c *command, args []string, stdout, stderr io.Writer) error {
	if err := c.Flags.Parse(args); err != nil {
		return fmt.Errorf("%s: %w", c.Name, err)
	}
	return c.Run(c.Flags.Args(), stdout, stderr)
}
