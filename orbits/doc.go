// Package orbits provides the geometry of a GNSS clock network: GNSS time
// scales, broadcast-ephemeris records and their propagation, synthetic
// constellations, ground stations on WGS 84, Earth-fixed ↔ celestial ↔
// galactic frames, and SP3 precise-orbit files.
//
// Units: SI inside (metres, seconds, radians); km and µs only at file edges
// (SP3). Epochs are integer nanosecond counts on GPS time (type Time), never
// float64 seconds since 1980.
//
// Frames: Earth-fixed is WGS 84 / ITRF; celestial is GCRS-like, reached from
// Earth-fixed by the Earth rotation angle and precession (see the Frames
// documentation for the model and its accuracy); galactic via the ICRS →
// galactic rotation matrix.
package orbits
