//go:build race

package search

// raceEnabled lets heavy tests run fewer trials under the race detector.
const raceEnabled = true
