package fft

// hasAVX reports whether the CPU and the OS support 256-bit AVX (CPUID.1
// ECX bits 27 OSXSAVE and 28 AVX, and XCR0 bits 1–2: the OS saves the XMM
// and YMM state).
func hasAVX() bool {
	_, _, c, _ := cpuid(1, 0)
	if c&(1<<27) == 0 || c&(1<<28) == 0 {
		return false
	}
	eax, _ := xgetbv()
	return eax&6 == 6
}

func cpuid(eaxArg, ecxArg uint32) (a, b, c, d uint32)

func xgetbv() (eax, edx uint32)

//go:noescape
func dif4AVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int)

//go:noescape
func dif4HalfZeroAVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int)

//go:noescape
func dit4AVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int, full bool)

//go:noescape
func twGenAVX(tv, fine, base *float64, pairs int, inverse bool)

//go:noescape
func dif4ptAVX(x *complex128, blocks int)

//go:noescape
func dit4ptAVX(x *complex128, blocks int)
