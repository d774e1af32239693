package orbits

import "math"

// Frames
//
// Earth-fixed (ITRS ≈ WGS 84) to celestial (GCRS-like) is modelled as
//
//	r_cel = (N·P·B)ᵀ · R3(−GST) · r_ef
//
// with B·P the IAU 2006 frame-bias + precession matrix built from the
// Fukushima–Williams angles (IERS Conventions 2010 §5.6.4, eq. 5.40; the
// polynomials of SOFA iauPfw06 and iauObl06, from memory, checked against
// erfa.pmat06 in the tests), GMST from the IAU 2006 expression
// GMST = ERA + polynomial (IERS Conventions 2010 eq. 5.32; checked against
// erfa.gmst06), and ERA = 2π(0.7790572732640 + 1.00273781191135448·Tu)
// (IERS Conventions 2010 eq. 5.15; checked against erfa.era00).
// Nutation N is the truncated series of nutationTerms (the 8 largest terms
// of the IAU 2000 luni-solar series) and GST = GMST + Δψ·cos εA.
// Polar motion is ignored (|xp|, |yp| < 0.5″, i.e. < 15 m at GPS altitude in
// absolute position and the same rotation for every clock).
//
// Accuracy (measured by TestFrameAgainstFullModel against erfa's full
// IAU 2006/2000A celestial-to-terrestrial matrix erfa.c2t06a with
// xp = yp = 0, at 8 epochs 1995–2030): worst rotation difference 0.029″
// (1.4e-7 rad, ≈ 4 m at GPS radius, ≈ 1 m at the Earth's surface, the same
// rotation for every clock); the test fails above 0.1″. Without the
// nutation terms the worst difference at the same epochs is 9.2″ (measured
// once with a throw-away test).
//
// UT1 − UTC (Frame.DUT1, seconds) is settable and defaults to 0; 1 s of
// DUT1 is 7.3e-5 rad of Earth rotation (≈ 465 m at the equator).

// Frame holds the Earth-orientation settings of the Earth-fixed ↔ celestial
// transformation. The zero value (UT1 = UTC) is ready to use.
type Frame struct {
	// DUT1 is UT1 − UTC in seconds (default 0).
	DUT1 float64

	tab *frameTable // optional precession-nutation table (see Tabulate)
}

// frameTable holds the precession-nutation matrix and the equation of the
// equinoxes at daily nodes; it is immutable once built.
type frameTable struct {
	t0    Time // first node
	nodes []frameNode
}

type frameNode struct {
	npb  Mat3    // GCRS → true equator and equinox of date
	eqeq float64 // Δψ·cos εA, rad
}

const frameTableStep = nsPerDay / 2

// Tabulate returns a copy of f that interpolates the precession-nutation
// part of the transformation linearly between nodes 12 h apart covering
// [start, start+span] (span in seconds); epochs outside fall back to the
// direct computation. The Earth rotation (ERA/GMST) is always computed
// exactly. Interpolation error is below 0.002″ (0.0008″ measured by
// TestFrameTabulated, ≈ 0.1 m at GPS radius), far inside the model's 0.03″. The table is
// immutable and shared by copies, so the Frame stays safe for concurrent use.
func (f Frame) Tabulate(start Time, span float64) Frame {
	if !(span >= 0) || span > 200*365.25*86400 {
		return f
	}
	t0 := Time(floorDiv(int64(start), frameTableStep) * frameTableStep)
	n := int((int64(start.Add(span))-int64(t0))/frameTableStep) + 2
	tab := &frameTable{t0: t0, nodes: make([]frameNode, n)}
	for i := range tab.nodes {
		t := t0 + Time(int64(i)*frameTableStep)
		npb, eqeq := npbAt(t)
		tab.nodes[i] = frameNode{npb, eqeq}
	}
	f.tab = tab
	return f
}

// npbAt returns the precession-nutation matrix and the equation of the
// equinoxes at t.
func npbAt(t Time) (Mat3, float64) {
	tt := ttCenturies(t)
	g, p, s, e := fwAngles(tt)
	dpsi, deps := nutation(tt)
	return fw2m(g, p, s+dpsi, e+deps), dpsi * math.Cos(e)
}

const (
	arcsec = math.Pi / (180 * 3600) // radians per arcsecond
	// earthRotationRate is dERA/dt in rad/s (2π·1.00273781191135448/86400,
	// IERS Conventions 2010 eq. 5.15).
	earthRotationRate = 2 * math.Pi * 1.00273781191135448 / 86400
)

// ERA returns the Earth rotation angle in radians, in [0, 2π), at GPS epoch
// t for UT1 − UTC = dut1 seconds (IERS Conventions 2010 eq. 5.15).
func ERA(t Time, dut1 float64) float64 {
	days, frac := t.j2000Offset(ut1Shift(t, dut1))
	turns := frac + 0.7790572732640 + 0.00273781191135448*(days+frac)
	turns -= math.Floor(turns)
	return 2 * math.Pi * turns
}

func ut1Shift(t Time, dut1 float64) int64 {
	return -int64(LeapSeconds(t))*nsPerSecond + secondsToNs(dut1)
}

// ttCenturies returns TT Julian centuries since J2000.0.
func ttCenturies(t Time) float64 {
	days, frac := t.j2000Offset(secondsToNs(TTMinusGPS))
	return (days + frac) / 36525
}

// GMST returns the IAU 2006 Greenwich mean sidereal time in radians, in
// [0, 2π), at GPS epoch t for UT1 − UTC = dut1 seconds (IERS Conventions
// 2010 eq. 5.32; SOFA iauGmst06, from memory).
func GMST(t Time, dut1 float64) float64 {
	tt := ttCenturies(t)
	p := (0.014506 + (4612.156534+(1.3915817+(-0.00000044+(-0.000029956+(-0.0000000368)*tt)*tt)*tt)*tt)*tt) * arcsec
	g := math.Mod(ERA(t, dut1)+p, 2*math.Pi)
	if g < 0 {
		g += 2 * math.Pi
	}
	return g
}

// Mat3 is a 3×3 rotation matrix acting on column vectors.
type Mat3 [3][3]float64

// Apply returns m·v.
func (m *Mat3) Apply(v [3]float64) [3]float64 {
	return [3]float64{
		m[0][0]*v[0] + m[0][1]*v[1] + m[0][2]*v[2],
		m[1][0]*v[0] + m[1][1]*v[1] + m[1][2]*v[2],
		m[2][0]*v[0] + m[2][1]*v[1] + m[2][2]*v[2],
	}
}

// ApplyT returns mᵀ·v.
func (m *Mat3) ApplyT(v [3]float64) [3]float64 {
	return [3]float64{
		m[0][0]*v[0] + m[1][0]*v[1] + m[2][0]*v[2],
		m[0][1]*v[0] + m[1][1]*v[1] + m[2][1]*v[2],
		m[0][2]*v[0] + m[1][2]*v[1] + m[2][2]*v[2],
	}
}

// mul returns a·b.
func mul(a, b Mat3) Mat3 {
	var c Mat3
	for i := range 3 {
		for j := range 3 {
			c[i][j] = a[i][0]*b[0][j] + a[i][1]*b[1][j] + a[i][2]*b[2][j]
		}
	}
	return c
}

// rotX and rotZ are the frame rotations of SOFA iauRx/iauRz.
func rotX(a float64) Mat3 {
	s, c := math.Sincos(a)
	return Mat3{{1, 0, 0}, {0, c, s}, {0, -s, c}}
}

func rotZ(a float64) Mat3 {
	s, c := math.Sincos(a)
	return Mat3{{c, s, 0}, {-s, c, 0}, {0, 0, 1}}
}

// fwAngles returns the IAU 2006 Fukushima–Williams bias-precession angles
// γ̄, φ̄, ψ̄ and the mean obliquity εA in radians (SOFA iauPfw06 and
// iauObl06 polynomials, from memory; tested against erfa.pmat06).
func fwAngles(tt float64) (gamb, phib, psib, epsa float64) {
	gamb = (-0.052928 + (10.556378+(0.4932044+(-0.00031238+(-0.000002788+(0.0000000260)*tt)*tt)*tt)*tt)*tt) * arcsec
	phib = (84381.412819 + (-46.811016+(0.0511268+(0.00053289+(-0.000000440+(-0.0000000176)*tt)*tt)*tt)*tt)*tt) * arcsec
	psib = (-0.041775 + (5038.481484+(1.5584175+(-0.00018522+(-0.000026452+(-0.0000000148)*tt)*tt)*tt)*tt)*tt) * arcsec
	epsa = (84381.406 + (-46.836769+(-0.0001831+(0.00200340+(-0.000000576+(-0.0000000434)*tt)*tt)*tt)*tt)*tt) * arcsec
	return
}

// fw2m builds R1(−ε)·R3(−ψ)·R1(φ)·R3(γ) (SOFA iauFw2m).
func fw2m(gamb, phib, psi, eps float64) Mat3 {
	return mul(rotX(-eps), mul(rotZ(-psi), mul(rotX(phib), rotZ(gamb))))
}

// PrecessionMatrix returns the IAU 2006 frame-bias and precession matrix
// B·P at GPS epoch t: it maps GCRS vectors to the mean equator and equinox of
// date (as erfa.pmat06).
func PrecessionMatrix(t Time) Mat3 {
	g, p, s, e := fwAngles(ttCenturies(t))
	return fw2m(g, p, s, e)
}

// nutationTerms are the largest luni-solar terms of the IAU 2000A/B
// nutation series (IERS Conventions 2010 Table 5.3a/b; coefficients as in
// SOFA iauNut00b, from memory, in units of 0.1 µas): multipliers of the
// Delaunay arguments l, l′, F, D, Ω; Δψ sin, Δψ sin·t, Δε cos, Δε cos·t.
var nutationTerms = [...]struct {
	nl, nlp, nf, nd, nom int
	ps, pst, ec, ect     float64
}{
	{0, 0, 0, 0, 1, -172064161, -174666, 92052331, 9086},
	{0, 0, 2, -2, 2, -13170906, -1675, 5730336, -3015},
	{0, 0, 2, 0, 2, -2276413, -234, 978459, -485},
	{0, 0, 0, 0, 2, 2074554, 207, -897492, 470},
	{0, 1, 0, 0, 0, 1475877, -3633, 73871, -184},
	{0, 1, 2, -2, 2, -516821, 1226, 224386, -677},
	{1, 0, 0, 0, 0, 711159, 73, -6750, 0},
	{0, 0, 2, 0, 1, -387298, -367, 200728, 18},
}

// nutation returns Δψ and Δε in radians from nutationTerms, with the
// fundamental arguments of IERS Conventions 2010 eq. 5.43 (linear and
// quadratic parts, from memory).
func nutation(tt float64) (dpsi, deps float64) {
	const turnAS = 1296000.0
	el := math.Mod(485868.249036+1717915923.2178*tt, turnAS) * arcsec
	elp := math.Mod(1287104.79305+129596581.0481*tt, turnAS) * arcsec
	f := math.Mod(335779.526232+1739527262.8478*tt, turnAS) * arcsec
	d := math.Mod(1072260.70369+1602961601.2090*tt, turnAS) * arcsec
	om := math.Mod(450160.398036-6962890.5431*tt, turnAS) * arcsec
	for _, k := range nutationTerms {
		arg := float64(k.nl)*el + float64(k.nlp)*elp + float64(k.nf)*f + float64(k.nd)*d + float64(k.nom)*om
		s, c := math.Sincos(arg)
		dpsi += (k.ps + k.pst*tt) * s
		deps += (k.ec + k.ect*tt) * c
	}
	const unit = 1e-7 * arcsec // 0.1 µas
	return dpsi * unit, deps * unit
}

// CelestialMatrix returns the matrix M with r_cel = M·r_ef at GPS epoch t
// (model in the Frames section above).
func (f Frame) CelestialMatrix(t Time) Mat3 {
	var npb Mat3 // GCRS → true equator and equinox of date
	var eqeq float64
	if tb := f.tab; tb != nil && t >= tb.t0 && int64(t-tb.t0)/frameTableStep+1 < int64(len(tb.nodes)) {
		k := int64(t-tb.t0) / frameTableStep
		w := float64(int64(t-tb.t0)-k*frameTableStep) / float64(frameTableStep)
		a, b := &tb.nodes[k], &tb.nodes[k+1]
		for i := range 3 {
			for j := range 3 {
				npb[i][j] = a.npb[i][j] + w*(b.npb[i][j]-a.npb[i][j])
			}
		}
		eqeq = a.eqeq + w*(b.eqeq-a.eqeq)
	} else {
		npb, eqeq = npbAt(t)
	}
	gst := GMST(t, f.DUT1) + eqeq
	// r_ef = R3(gst)·npb·r_cel  ⇒  r_cel = npbᵀ·R3(−gst)·r_ef.
	r := mul(rotZ(gst), npb)
	var m Mat3
	for i := range 3 {
		for j := range 3 {
			m[i][j] = r[j][i]
		}
	}
	return m
}

// ToCelestial converts an Earth-fixed position (m) to the celestial frame.
func (f Frame) ToCelestial(t Time, r [3]float64) [3]float64 {
	m := f.CelestialMatrix(t)
	return m.Apply(r)
}

// ToCelestialVel converts Earth-fixed position (m) and velocity (m/s) to
// celestial position and velocity. The Earth-rotation term ω×r is included;
// the rate of precession-nutation (< 1e-11 rad/s) is neglected.
func (f Frame) ToCelestialVel(t Time, r, v [3]float64) (rc, vc [3]float64) {
	m := f.CelestialMatrix(t)
	w := [3]float64{v[0] - earthRotationRate*r[1], v[1] + earthRotationRate*r[0], v[2]}
	return m.Apply(r), m.Apply(w)
}

// ToEarthFixed converts a celestial position (m) to the Earth-fixed frame.
func (f Frame) ToEarthFixed(t Time, r [3]float64) [3]float64 {
	m := f.CelestialMatrix(t)
	return m.ApplyT(r)
}

// ToEarthFixedVel converts celestial position (m) and velocity (m/s) to
// Earth-fixed position and velocity (inverse of ToCelestialVel).
func (f Frame) ToEarthFixedVel(t Time, r, v [3]float64) (re, ve [3]float64) {
	m := f.CelestialMatrix(t)
	re = m.ApplyT(r)
	w := m.ApplyT(v)
	ve = [3]float64{w[0] + earthRotationRate*re[1], w[1] - earthRotationRate*re[0], w[2]}
	return re, ve
}

// ECEFToCelestial converts an Earth-fixed position (m) at GPS epoch t to the
// celestial frame with UT1 = UTC.
func ECEFToCelestial(t Time, r [3]float64) [3]float64 { return Frame{}.ToCelestial(t, r) }

// CelestialToECEF is the inverse of ECEFToCelestial.
func CelestialToECEF(t Time, r [3]float64) [3]float64 { return Frame{}.ToEarthFixed(t, r) }

// ECEFToCelestialVel converts Earth-fixed position (m) and velocity (m/s) to
// the celestial frame with UT1 = UTC.
func ECEFToCelestialVel(t Time, r, v [3]float64) (rc, vc [3]float64) {
	return Frame{}.ToCelestialVel(t, r, v)
}

// CelestialToECEFVel is the inverse of ECEFToCelestialVel.
func CelestialToECEFVel(t Time, r, v [3]float64) (re, ve [3]float64) {
	return Frame{}.ToEarthFixedVel(t, r, v)
}

// icrsToGalactic is the ICRS → galactic rotation of the Hipparcos
// catalogue (ESA 1997, vol. 1 §1.5.3, as in SOFA iauIcrs2g; from memory,
// checked against erfa.g2icrs in the tests). Rows are the galactic axes
// expressed in ICRS.
var icrsToGalactic = Mat3{
	{-0.054875560416215368492398900454, -0.873437090234885048760383168409, -0.483835015548713226831774175116},
	{+0.494109427875583673525222371358, -0.444829629960011178146614061616, +0.746982244497218890527388004556},
	{-0.867666149019004701181616534570, -0.198076373431201528180486091412, +0.455983776175066922272100478348},
}

// CelestialToGalactic rotates a celestial (ICRS/GCRS-axis) vector to
// galactic coordinates (any unit).
func CelestialToGalactic(v [3]float64) [3]float64 {
	m := icrsToGalactic
	return m.Apply(v)
}

// GalacticToCelestial rotates a galactic vector to celestial axes.
func GalacticToCelestial(v [3]float64) [3]float64 {
	m := icrsToGalactic
	return m.ApplyT(v)
}

// UnitVector returns the unit vector of longitude-like angle lon and
// latitude-like angle lat (radians), e.g. (RA, Dec) or (l, b).
func UnitVector(lon, lat float64) [3]float64 {
	so, co := math.Sincos(lon)
	sa, ca := math.Sincos(lat)
	return [3]float64{ca * co, ca * so, sa}
}

// Angles returns the longitude-like angle in [0, 2π) and latitude-like angle
// in [−π/2, π/2] (radians) of a non-zero vector.
func Angles(v [3]float64) (lon, lat float64) {
	lon = math.Atan2(v[1], v[0])
	if lon < 0 {
		lon += 2 * math.Pi
	}
	return lon, math.Atan2(v[2], math.Hypot(v[0], v[1]))
}
