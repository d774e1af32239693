// Package scenarios decodes scenario files: strict YAML (unknown keys are
// errors) into plain structs with documented defaults, physical quantities
// written with their units ("30 s", "1e4 km", "300 km/s", "0.4 GeV/cm^3")
// parsed into SI, and validation that reports every bad field with its
// file:line. Built-in scenarios are embedded with go:embed.
package scenarios
