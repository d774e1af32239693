package noise

import (
	"math"
	"math/rand/v2"
)

// Standard normal deviates by the ziggurat method of Marsaglia & Tsang
// (2000), "The Ziggurat Method for Generating Random Variables", J. Stat.
// Softw. 5(8): zigN regions of equal area v under f(x) = exp(−x²/2) (a base
// strip with the tail beyond r, and zigN−1 rectangles), the region picked
// uniformly; a point inside the curve's own part of a rectangle (≈ 98.5 %
// of draws here) is returned at once, the rest go through the exact wedge
// test or the tail algorithm (x = −ln U1 / r, accepted if −2 ln U2 > x²).
// The method is exact; the only approximation is the resolution of the
// uniform abscissa, 23 bits.
//
// Every draw uses one 32-bit half of a rng.Uint64(): bits 0–7 pick the
// region, bits 8–30 the abscissa (as the odd multiple (2m+1)·2^-24 of the
// region width, so that ±0 never occurs) and bit 31 the sign — three
// disjoint bit fields, which avoids the region–abscissa correlation of the
// original code that took both from the same bits (pointed out by Doornik
// 2005, "An Improved Ziggurat Method to Generate Normal Random Samples";
// from memory). The rare wedge and tail steps take fresh 53-bit uniforms
// from rng.Uint64().
//
// r and v are not the rounded published constants but solved here for
// zigN = 256 so that the zigN areas close up to rounding (TestZigguratTables
// compares them with Marsaglia & Tsang's r = 3.6541528853610088).
const (
	zigN = 256
	zigM = 1 << 31 // scale of the 31-bit abscissa field
)

var (
	zigR, zigV float64       // base-strip edge r and region area v
	zigK       [zigN]uint32  // fast-accept bound: x_(i−1)/x_i · 2^31
	zigW       [zigN]float64 // x_i / 2^31
	zigF       [zigN]float64 // f(x_i)
)

// zigClose runs the equal-area recurrence down from x_(N−1) = r and returns
// f(x_1) + v/x_1 − 1, zero when the top region (the cap under f = 1) has
// area v too, with the x_i in x (x[0] unused).
func zigClose(r float64, x *[zigN]float64) (float64, float64) {
	v := r*math.Exp(-0.5*r*r) + math.Sqrt(math.Pi/2)*math.Erfc(r/math.Sqrt2)
	x[zigN-1] = r
	for i := zigN - 1; i >= 2; i-- {
		y := math.Exp(-0.5*x[i]*x[i]) + v/x[i]
		if y >= 1 {
			return 1, v // r too small: the regions overflow the peak
		}
		x[i-1] = math.Sqrt(-2 * math.Log(y))
	}
	return math.Exp(-0.5*x[1]*x[1]) + v/x[1] - 1, v
}

func init() {
	var x [zigN]float64
	lo, hi := 3.0, 4.5 // zigClose(lo) > 0 > zigClose(hi)
	for range 200 {
		mid := (lo + hi) / 2
		if mid == lo || mid == hi {
			break
		}
		if h, _ := zigClose(mid, &x); h > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	zigR = hi
	_, zigV = zigClose(zigR, &x)
	// region 0 is the strip of width q = v/f(r); its abscissa beyond r
	// (probability (q − r)/q = tail/v) selects the tail
	q := zigV / math.Exp(-0.5*zigR*zigR)
	zigK[0] = uint32(zigR / q * zigM)
	zigW[0] = q / zigM
	zigF[0] = 1 // f(x_0) with x_0 = 0, the inner edge of the cap
	for i := 1; i < zigN; i++ {
		zigW[i] = x[i] / zigM
		zigF[i] = math.Exp(-0.5 * x[i] * x[i])
		if i >= 2 {
			zigK[i] = uint32(x[i-1] / x[i] * zigM)
		}
	}
}

// fillNormal fills dst with independent N(0, 1) deviates drawn from rng,
// each multiplied by scale:
// ⌈len(dst)/2⌉ calls of rng.Uint64() plus the rare extra ones of the wedge
// and tail steps, so the same rng state always gives the same values.
func fillNormal(rng *rand.Rand, dst []float64, scale float64) {
	k := 0
	for ; k+1 < len(dst); k += 2 {
		r := rng.Uint64()
		d := dst[k : k+2 : k+2]
		// zigFast, inlined by hand for both halves
		u0, u1 := uint32(r), uint32(r>>32)
		t0, t1 := u0&0x7fffff00|128, u1&0x7fffff00|128
		i0, i1 := u0&(zigN-1), u1&(zigN-1)
		d[0] = scale * math.Float64frombits(math.Float64bits(float64(t0)*zigW[i0])|uint64(u0>>31)<<63)
		d[1] = scale * math.Float64frombits(math.Float64bits(float64(t1)*zigW[i1])|uint64(u1>>31)<<63)
		if t0 >= zigK[i0] {
			d[0] = scale * zigSlow(u0, rng)
		}
		if t1 >= zigK[i1] {
			d[1] = scale * zigSlow(u1, rng)
		}
	}
	if k < len(dst) {
		dst[k] = scale * zigFast(uint32(rng.Uint64()), rng)
	}
}

// zigFast is the ziggurat's common step for the 32 random bits u.
func zigFast(u uint32, rng *rand.Rand) float64 {
	i := u & (zigN - 1)
	t := u&0x7fffff00 | 128
	if t < zigK[i] {
		return math.Float64frombits(math.Float64bits(float64(t)*zigW[i]) | uint64(u>>31)<<63)
	}
	return zigSlow(u, rng)
}

// zigSlow finishes a draw whose abscissa fell outside the fast region.
func zigSlow(u uint32, rng *rand.Rand) float64 {
	for {
		i := u & (zigN - 1)
		t := u&0x7fffff00 | 128
		neg := u>>31 != 0
		var x float64
		switch {
		case t < zigK[i]:
			x = float64(t) * zigW[i]
		case i == 0:
			for {
				a := -math.Log(uniformOpen(rng)) / zigR
				b := -math.Log(uniformOpen(rng))
				if b+b > a*a {
					x = zigR + a
					break
				}
			}
		default:
			x = float64(t) * zigW[i]
			if zigF[i]+uniformOpen(rng)*(zigF[i-1]-zigF[i]) >= math.Exp(-0.5*x*x) {
				u = uint32(rng.Uint64()) // rejected: a new draw
				continue
			}
		}
		if neg {
			return -x
		}
		return x
	}
}

// uniformOpen returns a uniform deviate in (0, 1) with 53 random bits.
func uniformOpen(rng *rand.Rand) float64 {
	return (float64(rng.Uint64()>>11) + 0.5) * (1.0 / (1 << 53))
}
