//go:build race

package overlay

// raceEnabled: the race detector slows the search ~10×; tests shrink their bank.
const raceEnabled = true
