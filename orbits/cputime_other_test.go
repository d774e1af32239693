//go:build !unix

package orbits

func processCPUSeconds() float64 { return 0 }
