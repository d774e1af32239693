// Package estimate simulates ionosphere-free GNSS code and carrier-phase
// observations of a satellite–station network and estimates the network's
// clocks from them, the way analysis centres turn observations into clock
// products. It lets a wall's signature be compared before and after clock
// estimation: the wall's link delay (inject.IndexWall) and the clocks' own
// wall response enter the observations, and Solve shows how much of both
// ends up in the estimated satellite and station clocks.
//
// # Observations (Simulate)
//
// For every satellite → station link above an elevation mask, at every
// epoch t_k = k·Interval (s since the run start; the reception time), the
// emission time comes from the light-time solution in the celestial frame
// (inject.LightTime; the Earth's rotation during the flight is included),
// and
//
//	P = ρ + c·(b_r − b_s) + T + c·δ_wall + e_P
//	L = ρ + c·(b_r − b_s) + T + c·δ_wall + B_arc + e_L
//
// in metres, with ρ the geometric range, b_r and b_s the receiver and
// satellite clock biases (clock reading minus true time, s, each including
// the clock's own wall response, taken from the truth at the epoch), T the
// tropospheric delay (Saastamoinen zenith delays, IERS Conventions 2010
// §9.2, with the Black & Eisner mapping function), δ_wall the walls' link
// delay (s; the medium is non-dispersive, so code and phase see the same
// delay and the ionosphere-free combination passes it unchanged), B_arc a
// carrier ambiguity per continuous arc (IF combination of integer L1/L2
// ambiguities) with optional cycle slips, and e white noise. The
// ionosphere-free combination of GPS L1 (1575.42 MHz) and L2 (1227.60 MHz)
// (IS-GPS-200 §3.3.1.1) is X_IF = α₁X₁ − α₂X₂ with α₁ = f₁²/(f₁²−f₂²) =
// 2.5457 and α₂ = f₂²/(f₁²−f₂²) = 1.5457.
//
// # Estimation (Solve)
//
// Orbits and station coordinates are known, so the observed-minus-computed
// values are c·(b_r − b_s) plus the delays. Epoch by epoch, a weighted
// least-squares adjustment of the epoch-differenced carrier phase gives the
// change of every satellite and station clock between consecutive epochs;
// the single rank defect (a common clock shift) is fixed by holding the
// reference clock's change at zero. Residual screening rejects outliers and
// cycle slips one at a time. The accumulated changes are then anchored by
// one least-squares fit of the code observations (one offset per clock
// and continuous segment). Results are biases relative to the reference
// clock, s, RINEX clock sign.
//
// What estimation does to a wall's link delay: at each epoch the delays
// are projected onto the clocks by the least-squares solution operator of
// that epoch's network (a delay on a satellite's only link goes wholly into
// that satellite's clock; in a loop it is shared, see TestWallTransferHand).
// Because the network changes from epoch to epoch, the accumulated
// epoch differences do not telescope exactly, so after a wall has passed
// each clock may keep a small constant offset; the code anchor spreads the
// code's share of the delay over each segment.
//
// Simplifications (stated, not hidden): the satellite clock enters at the
// reception epoch's value (the 67–86 ms emission offset is below the
// products' time resolution); orbits, station coordinates and the
// troposphere are known exactly (no zenith-delay estimation); cycle slips on
// a satellite seen by a single station cannot be detected and go into that
// satellite's clock. Numerical floor: c·(b_r − b_s) for 1e-4 s clocks is
// rounded to ~2e-12 m ≈ 6e-21 s per observation, far below real noise but
// visible in noise-free runs at that level.
//
// Units: SI inside (m, s, rad); degrees only in links.csv.
package estimate
