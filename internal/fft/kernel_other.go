//go:build !amd64

package fft

func hasAVX() bool { return false }

func dif4AVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int) {
	panic("fft: no vector kernel on this architecture")
}

func dif4HalfZeroAVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int) {
	panic("fft: no vector kernel on this architecture")
}

func dit4AVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int, full bool) {
	panic("fft: no vector kernel on this architecture")
}

func twGenAVX(tv, fine, base *float64, pairs int, inverse bool) {
	panic("fft: no vector kernel on this architecture")
}

func dif4ptAVX(x *complex128, blocks int) { panic("fft: no vector kernel on this architecture") }

func dit4ptAVX(x *complex128, blocks int) { panic("fft: no vector kernel on this architecture") }
