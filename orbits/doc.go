// Package orbits provides the geometry of a GNSS clock network: GNSS time
// scales, broadcast-ephemeris records and their propagation, synthetic
// constellations, ground stations on WGS 84, Earth-fixed ↔ celestial ↔
// galactic frames, and SP3 precise-orbit files.
//
// # Units and time
//
// SI inside (metres, seconds, radians); km and µs only at file edges
// (SP3). Epochs are integer nanosecond counts on GPS time (type Time),
// never float64 seconds since 1980. FromCalendar/ParseTime read GPS-time
// calendars; FromUTC, FromBDT (BDT = GPST − 14 s, week offset 1356),
// FromGST and FromGLONASS (UTC(SU) + 3 h) convert other scales with a
// built-in leap-second table (LeapSeconds; GPST − UTC = 18 s since 2017).
//
// # Ephemerides
//
// ReadNav reads RINEX navigation files 2.x (GPS, GLONASS), 3.02–3.05 and
// 4.00, plain or gzip. Kepler records (GPS/QZSS LNAV, Galileo I/NAV and
// F/NAV, BeiDou D1/D2 including the GEO rotation) follow IS-GPS-200 Table
// 20-IV with the per-system constants; Glonass records are integrated by RK4
// (60 s steps, J2 and luni-solar terms, |t − tb| ≤ 15 min) per the GLONASS
// ICD Ed. 5.1 Appendix A.3.1.2. Nav.Select picks the record with the
// nearest reference epoch inside its fit interval (healthy only by
// default, Galileo I/NAV and F/NAV never mixed). Fit intervals: GPS from the
// record (0 ⇒ 4 h, i.e. ±2 h), QZSS from its flag, Galileo and BeiDou ±1 h
// (our choice; see the comment in nav.go for the Galileo measurement).
//
// Accuracy against IGS precise orbits in ../shared/extdata (3D RMS, no
// antenna-offset correction; TestBroadcastAgainstPrecise): set A GPS
// 1.72 m, set C GPS 1.41 m, Galileo I/NAV healthy 1.02 m, GLONASS 3.44 m;
// maximum 7.3 m.
//
// Walker builds synthetic Walker-delta constellations (GPS-like 24/6/1 at
// 26 559.7 km, 55°; Galileo-like 24/3/1 at 29 599.8 km, 56°) as Kepler
// records with an unlimited fit interval, so one record per satellite
// serves any span (years) through the same propagator.
//
// # Frames
//
// Earth-fixed = WGS 84 / ITRF. Celestial = GCRS-like axes from IAU 2006
// bias-precession (Fukushima–Williams angles), the 8 largest IAU 2000
// nutation terms, and GST = GMST06 (ERA-based) + equation of the equinoxes;
// polar motion ignored; UT1 − UTC settable in Frame.DUT1 (default 0).
// Measured against erfa.c2t06a (full IAU 2006/2000A, polar motion 0):
// ≤ 0.03″ at test epochs 1995–2030 (≈ 4 m at GPS radius, the same rotation
// for every clock). Galactic via the Hipparcos ICRS → galactic matrix
// (erfa.icrs2g). See frames.go.
//
// # Geometry
//
// Geometry gives every clock's position (satellites, then stations) at any
// epoch, Earth-fixed or celestial, by direct propagation (no cache); it is
// immutable and safe for concurrent use. CelestialAll computes the Earth
// rotation once per epoch for all clocks; pass Frame{}.Tabulate(start, span)
// to NewGeometry to make per-call rotations ~4× cheaper; EarthFixedGrid and
// Kepler.PosGrid sample regular grids about twice as fast as per-epoch
// calls. Benchmarks: BenchmarkKepler, BenchmarkKeplerGrid,
// BenchmarkCelestialMatrix, BenchmarkGeometry.
//
// # SP3
//
// ReadSP3 reads SP3-c and SP3-d (plain or gzip); WriteSP3 writes SP3-d
// (km and µs F14.6, missing clock 999999.999999, missing position 0, EOF);
// rewriting the CODE SP3-d file of ../shared/extdata reproduces it line for
// line. BuildSP3 and NavSP3 sample orbits on an epoch grid; Compare
// evaluates broadcast against precise orbits.
package orbits
