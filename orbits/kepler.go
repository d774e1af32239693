package orbits

import (
	"fmt"
	"math"
)

// Per-system constants of the Keplerian user algorithm
// (../shared/reference/gnss.md §1.1–1.3 table).
const (
	// MuGPS is the GPS/QZSS value of GM in m³/s² (IS-GPS-200 Table 20-IV).
	MuGPS = 3.986005e14
	// MuGalileo is the Galileo and BeiDou value of GM in m³/s² (Galileo OS
	// SIS ICD §5.1.1; BDS-SIS-ICD-B1I §5.2.4.8, from memory).
	MuGalileo = 3.986004418e14
	// OmegaEGPS is the WGS 84 Earth rotation rate in rad/s used by GPS,
	// Galileo and QZSS (IS-GPS-200 Table 20-IV).
	OmegaEGPS = 7.2921151467e-5
	// OmegaEBDS is the CGCS2000 Earth rotation rate in rad/s used by BeiDou
	// (BDS-SIS-ICD-B1I §5.2.4.8, from memory).
	OmegaEBDS = 7.2921150e-5
)

// KeplerFitUnlimited as a fit interval makes a record cover every epoch
// (synthetic constellations).
var KeplerFitUnlimited = math.Inf(1)

// Kepler is a broadcast ephemeris record of GPS LNAV, QZSS LNAV, Galileo
// I/NAV or F/NAV, or BeiDou D1/D2 type, and the record type of the
// synthetic constellations. Angles are in radians, rates in rad/s, lengths
// in metres, clock terms in s, s/s and s/s².
type Kepler struct {
	ID  SatID
	Msg string // LNAV, INAV, FNAV, D1, D2, SYNTH

	Toc           Time    // clock reference epoch (GPS time)
	Af0, Af1, Af2 float64 // clock polynomial: s, s/s, s/s²

	Toe    Time    // ephemeris reference epoch (GPS time)
	SqrtA  float64 // √a in m^½
	Ecc    float64 // eccentricity
	M0     float64 // mean anomaly at toe
	DeltaN float64 // mean motion difference, rad/s
	Omega0 float64 // longitude of ascending node at the week start (GPS-like week of toe)
	OmegaD float64 // rate of right ascension, rad/s
	Omega  float64 // argument of perigee ω
	I0     float64 // inclination at toe
	IDot   float64 // inclination rate, rad/s
	Cuc    float64 // latitude-argument harmonic corrections, rad
	Cus    float64
	Crc    float64 // radius harmonic corrections, m
	Crs    float64
	Cic    float64 // inclination harmonic corrections, rad
	Cis    float64

	IODE       int     // issue of data (IODE, IODnav, AODE)
	Health     int     // health word (0 = healthy)
	TGD        float64 // group delay TGD / BGD(E5a,E1) / TGD1, s
	TGD2       float64 // BGD(E5b,E1) / TGD2, s
	DataSource int     // Galileo data-source bits (RINEX 3.04 Table A8)
	FitHours   float64 // fit interval half-width is FitHours/2 around toe; +Inf = unlimited
	GEO        bool    // BeiDou GEO: use the GEO rotation of BDS-SIS-ICD §5.2.4.12

	// Set by Prepare (call it again after changing any field above).
	mu, omegaE float64
	toeSOW     float64 // toe seconds of (system) week, s
	a, n, q    float64 // semi-major axis (m), corrected mean motion (rad/s), √(1−e²)
	sw, cw     float64 // sin ω, cos ω
	si0, ci0   float64 // sin i0, cos i0
	prepared   bool
}

// Prepare fills the constants that depend on the system and caches derived
// quantities; the readers and Walker call it, PosVel calls it on a copy of
// an unprepared value, and a caller that changes fields of a prepared
// record must call it again.
// It returns an error for an unknown system or unphysical elements.
func (k *Kepler) Prepare() error {
	switch k.ID.System() {
	case 'G', 'J', 'I':
		k.mu, k.omegaE = MuGPS, OmegaEGPS
	case 'E':
		k.mu, k.omegaE = MuGalileo, OmegaEGPS
	case 'C':
		k.mu, k.omegaE = MuGalileo, OmegaEBDS
	default:
		return fmt.Errorf("orbits: satellite %q: no Keplerian constants for system %q", k.ID, string(k.ID.System()))
	}
	if !(k.SqrtA > 1000 && k.SqrtA < 2e4) { // a between 1e6 m and 4e8 m
		return fmt.Errorf("orbits: satellite %q at %v: sqrt(A) = %g m^0.5 is not a valid orbit", k.ID, k.Toe, k.SqrtA)
	}
	if !(k.Ecc >= 0 && k.Ecc < 0.9) {
		return fmt.Errorf("orbits: satellite %q at %v: eccentricity %g outside [0, 0.9)", k.ID, k.Toe, k.Ecc)
	}
	// Ω0 refers to the start of the week that holds toe. For BeiDou the
	// week starts 14 s later on the GPS scale (BDT).
	ref := k.Toe
	if k.ID.System() == 'C' {
		ref = ref.Add(-BDTOffset)
	}
	_, k.toeSOW = ref.WeekSOW()
	k.a = k.SqrtA * k.SqrtA
	k.n = math.Sqrt(k.mu/(k.a*k.a*k.a)) + k.DeltaN
	k.q = math.Sqrt(1 - k.Ecc*k.Ecc)
	k.sw, k.cw = math.Sincos(k.Omega)
	k.si0, k.ci0 = math.Sincos(k.I0)
	k.prepared = true
	return nil
}

// Sat returns the satellite id.
func (k *Kepler) Sat() SatID { return k.ID }

// Ref returns toe.
func (k *Kepler) Ref() Time { return k.Toe }

// ClockRef returns toc.
func (k *Kepler) ClockRef() Time { return k.Toc }

// Healthy reports Health == 0.
func (k *Kepler) Healthy() bool { return k.Health == 0 }

// Message returns the message type.
func (k *Kepler) Message() string { return k.Msg }

// fitSeconds returns the half-width of the fit interval in seconds.
func (k *Kepler) fitSeconds() float64 {
	h := k.FitHours
	if h == 0 {
		h = 4 // IS-GPS-200 §20.3.4.4: fit flag 0 ⇒ 4 h curve fit
	}
	return h * 3600 / 2
}

// Covers reports whether |t − toe| is within half the fit interval.
func (k *Kepler) Covers(t Time) bool {
	return math.Abs(t.Sub(k.Toe)) <= k.fitSeconds()
}

// ClockBias returns af0 + af1·(t−toc) + af2·(t−toc)² in seconds
// (IS-GPS-200 §20.3.3.3.3.1), without the relativistic term.
func (k *Kepler) ClockBias(t Time) float64 {
	dt := t.Sub(k.Toc)
	return k.Af0 + (k.Af1+k.Af2*dt)*dt
}

// Relativistic returns Δt_r = F·e·√A·sin E_k in seconds, F = −2√μ/c²
// (IS-GPS-200 §20.3.3.3.3.1).
func (k *Kepler) Relativistic(t Time) float64 {
	kk, err := k.ensure()
	if err != nil {
		return math.NaN()
	}
	tk := t.Sub(kk.Toe)
	_, se, _ := solveKepler(kk.M0+kk.n*tk, kk.Ecc)
	f := -2 * math.Sqrt(kk.mu) / (SpeedOfLight * SpeedOfLight)
	return f * kk.Ecc * kk.SqrtA * se
}

func (k *Kepler) ensure() (*Kepler, error) {
	if k.prepared {
		return k, nil
	}
	c := *k
	if err := c.Prepare(); err != nil {
		return nil, err
	}
	return &c, nil
}

// solveKepler solves M = E − e·sin E for E and returns E, sin E, cos E.
// It starts from E₀ = M + e·sin M/(1 − e·cos M) and applies Newton steps
// (IS-GPS-200 §20.3.3.4.3 gives the Newton form), updating sin and cos by
// the angle-addition formulas with Taylor series of the step instead of new
// library calls (our own arrangement): one Sincos per call for e ≲ 0.05,
// an error below 1e-15 rad in 2–4 steps for e ≤ 0.2 (TestSolveKepler checks
// the residual for e up to 0.85).
func solveKepler(m, e float64) (ea, se, ce float64) {
	const twoPi, rTwoPi = 2 * math.Pi, 1 / (2 * math.Pi)
	m -= twoPi * math.Floor(m*rTwoPi+0.5)
	sm, cm := math.Sincos(m)
	d := e * sm / (1 - e*cm)
	ea = m + d
	if math.Abs(d) < 0.05 {
		sd, cd := sinCosSmall(d)
		se, ce = sm*cd+cm*sd, cm*cd-sm*sd
	} else {
		se, ce = math.Sincos(ea)
	}
	for range 20 {
		d = -(ea - e*se - m) / (1 - e*ce)
		ea += d
		switch ad := math.Abs(d); {
		case ad > 0.05:
			se, ce = math.Sincos(ea)
			continue
		case ad < 1e-4: // sin d = d − d³/6, cos d = 1 − d²/2 to < 1e-17
			const r6 = 1.0 / 6
			d2 := d * d
			sd, cd := d*(1-d2*r6), 1-0.5*d2
			se, ce = se*cd+ce*sd, ce*cd-se*sd
		default:
			sd, cd := sinCosSmall(d)
			se, ce = se*cd+ce*sd, ce*cd-se*sd
		}
		// Newton converges quadratically: after a step |ΔE| < 1e-8 the
		// remaining error is below e·ΔE²/2 < 1e-16 rad.
		if math.Abs(d) < 1e-8 {
			break
		}
	}
	return ea, se, ce
}

// sinCosSmall returns sin d and cos d for |d| ≤ 0.05 from their Taylor
// series to d⁸ (truncation error < d⁹/9! ≈ 5e-18).
func sinCosSmall(d float64) (s, c float64) {
	// Reciprocals as constants: Go does not turn x/6 into a multiplication.
	const r6, r20, r42, r12, r30, r56 = 1.0 / 6, 1.0 / 20, 1.0 / 42, 1.0 / 12, 1.0 / 30, 1.0 / 56
	d2 := d * d
	s = d * (1 - d2*r6*(1-d2*r20*(1-d2*r42)))
	c = 1 - 0.5*d2*(1-d2*r12*(1-d2*r30*(1-d2*r56)))
	return s, c
}

// PosVel returns the Earth-fixed position (m) and velocity (m/s) at GPS
// epoch t by the user algorithm of IS-GPS-200 Table 20-IV (the BeiDou GEO
// variant of BDS-SIS-ICD-B1I §5.2.4.12 when GEO is set). The velocity is the
// analytic time derivative of the same expressions. It returns an error when
// t is outside the fit interval.
func (k *Kepler) PosVel(t Time) (pos, vel [3]float64, err error) {
	if !k.Covers(t) {
		return pos, vel, fmt.Errorf("orbits: %s ephemeris with toe %v does not cover %v (fit interval ±%.0f s)", k.ID, k.Toe, t, k.fitSeconds())
	}
	kk, err := k.ensure()
	if err != nil {
		return pos, vel, err
	}
	pos, vel = kk.posVel(t.Sub(k.Toe))
	return pos, vel, nil
}

// Pos returns the Earth-fixed position in metres at t without checking the
// fit interval (NaN when the record is invalid) (used by the benchmark and by tight loops that checked
// coverage already).
func (k *Kepler) Pos(t Time) [3]float64 {
	kk, err := k.ensure()
	if err != nil {
		return nanVec
	}
	if kk.GEO {
		p, _ := kk.posVel(t.Sub(k.Toe))
		return p
	}
	return kk.pos(t.Sub(k.Toe))
}

func (k *Kepler) posVel(tk float64) (pos, vel [3]float64) {
	a, n, q, e := k.a, k.n, k.q, k.Ecc // step 1 of Table 20-IV (cached by Prepare)
	mk := k.M0 + n*tk                  // step 3
	_, se, ce := solveKepler(mk, e)    // step 4
	den := 1 - e*ce
	iden := 1 / den
	// Step 5–6 without atan2: sin and cos of ν from E, then of Φ = ν + ω.
	snu, cnu := q*se*iden, (ce-e)*iden
	sphi, cphi := snu*k.cw+cnu*k.sw, cnu*k.cw-snu*k.sw
	s2, c2 := 2*sphi*cphi, cphi*cphi-sphi*sphi // sin 2Φ, cos 2Φ
	du := k.Cus*s2 + k.Cuc*c2
	dr := k.Crs*s2 + k.Crc*c2
	di := k.Cis*s2 + k.Cic*c2
	var su, cu float64 // step 7: u = Φ + δu
	if math.Abs(du) < 0.05 {
		sd, cd := sinCosSmall(du)
		su, cu = sphi*cd+cphi*sd, cphi*cd-sphi*sd
	} else {
		su, cu = math.Sincos(math.Atan2(sphi, cphi) + du)
	}
	r := a*den + dr
	var si, ci float64 // i = i0 + δi + IDOT·tk
	if dInc := di + k.IDot*tk; math.Abs(dInc) < 0.05 {
		sd, cd := sinCosSmall(dInc)
		si, ci = k.si0*cd+k.ci0*sd, k.ci0*cd-k.si0*sd
	} else {
		si, ci = math.Sincos(k.I0 + dInc)
	}
	xp, yp := r*cu, r*su // step 8
	edot := n * iden     // rates: time derivatives of steps 3–8
	nudot := edot * q * iden
	udot := nudot * (1 + 2*(k.Cus*c2-k.Cuc*s2))
	rdot := a*e*se*edot + 2*nudot*(k.Crs*c2-k.Crc*s2)
	idot := k.IDot + 2*nudot*(k.Cis*c2-k.Cic*s2)
	xpd := rdot*cu - r*udot*su
	ypd := rdot*su + r*udot*cu

	if k.GEO {
		// BDS GEO: node in an inertial-like frame, then Rz(Ω̇e·tk)·Rx(−5°).
		om := k.Omega0 + k.OmegaD*tk - k.omegaE*k.toeSOW
		so, co := math.Sincos(om)
		gx := xp*co - yp*ci*so
		gy := xp*so + yp*ci*co
		gz := yp * si
		gxd := xpd*co - ypd*ci*so + yp*si*so*idot - gy*k.OmegaD
		gyd := xpd*so + ypd*ci*co - yp*si*co*idot + gx*k.OmegaD
		gzd := ypd*si + yp*ci*idot
		sf, cf := math.Sincos(-5 * math.Pi / 180)
		qx, qy, qz := gx, cf*gy+sf*gz, -sf*gy+cf*gz
		qxd, qyd, qzd := gxd, cf*gyd+sf*gzd, -sf*gyd+cf*gzd
		th := k.omegaE * tk
		st, ct := math.Sincos(th)
		pos = [3]float64{ct*qx + st*qy, -st*qx + ct*qy, qz}
		vel = [3]float64{ct*qxd + st*qyd + k.omegaE*pos[1], -st*qxd + ct*qyd - k.omegaE*pos[0], qzd}
		return pos, vel
	}

	omd := k.OmegaD - k.omegaE
	om := k.Omega0 + omd*tk - k.omegaE*k.toeSOW // step 9
	so, co := math.Sincos(om)
	x := xp*co - yp*ci*so // step 10
	y := xp*so + yp*ci*co
	z := yp * si
	pos = [3]float64{x, y, z}
	vel = [3]float64{
		xpd*co - ypd*ci*so + yp*si*so*idot - y*omd,
		xpd*so + ypd*ci*co - yp*si*co*idot + x*omd,
		ypd*si + yp*ci*idot,
	}
	return pos, vel
}

// pos is posVel without the velocity, for non-GEO records (same steps).
func (k *Kepler) pos(tk float64) [3]float64 {
	m := k.M0 + k.n*tk
	if m > math.Pi || m < -math.Pi {
		const twoPi, rTwoPi = 2 * math.Pi, 1 / (2 * math.Pi)
		m -= twoPi * math.Floor(m*rTwoPi+0.5)
	}
	sm, cm := math.Sincos(m)
	so, co := math.Sincos(k.Omega0 + (k.OmegaD-k.omegaE)*tk - k.omegaE*k.toeSOW)
	return k.posFrom(tk, sm, cm, so, co)
}

// keplerSC solves Kepler's equation for δ = E − M given sin M and cos M
// (same Newton scheme as solveKepler, written in δ so that no value of M
// itself is needed) and returns sin E and cos E.
func keplerSC(sm, cm, e float64) (se, ce float64) {
	d := e * sm / (1 - e*cm)
	if math.Abs(d) < 0.05 {
		sd, cd := sinCosSmall(d)
		se, ce = sm*cd+cm*sd, cm*cd-sm*sd
	} else {
		sd, cd := math.Sincos(d)
		se, ce = sm*cd+cm*sd, cm*cd-sm*sd
	}
	for range 20 {
		st := -(d - e*se) / (1 - e*ce) // f(δ) = δ − e·sin(M+δ)
		d += st
		switch a := math.Abs(st); {
		case a > 0.05:
			sd, cd := math.Sincos(d)
			se, ce = sm*cd+cm*sd, cm*cd-sm*sd
			continue
		case a < 1e-4:
			const r6 = 1.0 / 6
			s2 := st * st
			sd, cd := st*(1-s2*r6), 1-0.5*s2
			se, ce = se*cd+ce*sd, ce*cd-se*sd
		default:
			sd, cd := sinCosSmall(st)
			se, ce = se*cd+ce*sd, ce*cd-se*sd
		}
		if math.Abs(st) < 1e-8 {
			break
		}
	}
	return se, ce
}

// posFrom computes the position from tk and the sines and cosines of the
// mean anomaly and of the node longitude Ωk (steps 4–10 of Table 20-IV).
func (k *Kepler) posFrom(tk, sm, cm, so, co float64) [3]float64 {
	e := k.Ecc
	se, ce := keplerSC(sm, cm, e)
	den := 1 - e*ce
	iden := 1 / den
	snu, cnu := k.q*se*iden, (ce-e)*iden
	sphi, cphi := snu*k.cw+cnu*k.sw, cnu*k.cw-snu*k.sw
	s2, c2 := 2*sphi*cphi, cphi*cphi-sphi*sphi
	du := k.Cus*s2 + k.Cuc*c2
	var su, cu float64
	if math.Abs(du) < 0.05 {
		sd, cd := sinCosSmall(du)
		su, cu = sphi*cd+cphi*sd, cphi*cd-sphi*sd
	} else {
		su, cu = math.Sincos(math.Atan2(sphi, cphi) + du)
	}
	r := k.a*den + k.Crs*s2 + k.Crc*c2
	var si, ci float64
	if dInc := k.Cis*s2 + k.Cic*c2 + k.IDot*tk; math.Abs(dInc) < 0.05 {
		sd, cd := sinCosSmall(dInc)
		si, ci = k.si0*cd+k.ci0*sd, k.ci0*cd-k.si0*sd
	} else {
		si, ci = math.Sincos(k.I0 + dInc)
	}
	xp, yp := r*cu, r*su
	return [3]float64{xp*co - yp*ci*so, xp*so + yp*ci*co, yp * si}
}

// PosGrid writes the Earth-fixed positions (m) at t0 + j·step seconds,
// j = 0 … len(dst)−1, into dst, without the fit-interval check (use Covers
// on the first and last epoch). The mean anomaly and the node longitude
// advance by exact rotations between epochs, recomputed every 64 epochs to
// keep the rounding drift below 1e-14 rad, so most epochs need no library
// sine at all (BenchmarkKepler/Grid). It returns an error for an invalid
// record.
func (k *Kepler) PosGrid(t0 Time, step float64, dst [][3]float64) error {
	kk, err := k.ensure()
	if err != nil {
		return err
	}
	if kk.GEO {
		for j := range dst {
			dst[j], _ = kk.posVel(t0.Add(float64(j) * step).Sub(kk.Toe))
		}
		return nil
	}
	omd := kk.OmegaD - kk.omegaE
	sdm, cdm := math.Sincos(kk.n * step)
	sdo, cdo := math.Sincos(omd * step)
	var sm, cm, so, co float64
	for j := range dst {
		tk := t0.Add(float64(j) * step).Sub(kk.Toe)
		if j%64 == 0 {
			m := kk.M0 + kk.n*tk
			if m > math.Pi || m < -math.Pi {
				const twoPi, rTwoPi = 2 * math.Pi, 1 / (2 * math.Pi)
				m -= twoPi * math.Floor(m*rTwoPi+0.5)
			}
			sm, cm = math.Sincos(m)
			so, co = math.Sincos(kk.Omega0 + omd*tk - kk.omegaE*kk.toeSOW)
		} else {
			sm, cm = sm*cdm+cm*sdm, cm*cdm-sm*sdm
			so, co = so*cdo+co*sdo, co*cdo-so*sdo
		}
		dst[j] = kk.posFrom(tk, sm, cm, so, co)
	}
	return nil
}
