//go:build race

package campaign

// raceEnabled lets heavy tests run fewer trials under the race detector.
const raceEnabled = true
