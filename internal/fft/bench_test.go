package fft

import (
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// BenchmarkTransforms reports the time of one 2^20-point forward transform
// (full and with the zero second half skipped) and of the pruned inverse,
// the three shapes of a zero-padded convolution.
func BenchmarkTransforms(b *testing.B) {
	const n = 1 << 20
	p := NewPlan(n)
	x := randomComplex(rand.New(rand.NewPCG(1, 1)), n)
	for _, c := range []struct {
		name string
		f    func([]complex128)
	}{{"Forward", p.Forward}, {"ForwardHalfZero", p.ForwardHalfZero}, {"Inverse", p.Inverse}, {"InverseFirstHalf", p.InverseFirstHalf}} {
		b.Run(c.name+"/2^20", func(b *testing.B) {
			for b.Loop() {
				c.f(x)
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/transform")
		})
	}
	b.Run("MultiplyPacked/2^20", func(b *testing.B) {
		coef := randomComplex(rand.New(rand.NewPCG(2, 2)), n)
		for b.Loop() {
			p.MultiplyPacked(x, coef)
		}
		b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/op")
	})
}

// BenchmarkGonumRadix2 is gonum's fourier.CoefficientsRadix2 at the same
// length, for comparison with BenchmarkTransforms/Forward.
func BenchmarkGonumRadix2(b *testing.B) {
	const n = 1 << 20
	x := randomComplex(rand.New(rand.NewPCG(1, 1)), n)
	for b.Loop() {
		fourier.CoefficientsRadix2(x)
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/transform")
}
