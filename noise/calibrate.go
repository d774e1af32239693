package noise

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// ADEVPoint is one target Allan deviation: σ_y(Tau) = ADEV.
type ADEVPoint struct {
	Tau    float64 // averaging time τ, s
	ADEV   float64 // Allan deviation σ_y(τ), dimensionless
	Source string  // where the number comes from ("from memory" if so)
}

// Calibrate fits non-negative h_α (indexed by Term, units as ClockModel.H)
// so that the expected Allan deviation of the noise (TermAVAR at sample
// interval tau0; tau0 = 0 for the continuous asymptote) matches the targets.
// It minimises the relative misfit of the variances,
// Σ_i (AVAR_model(τ_i)/σ_i² − 1)², reweighted over a few passes to a
// misfit that is symmetric in ln(AVAR_model/σ_i²), by non-negative least squares (Lawson & Hanson 1974, "Solving
// Least Squares Problems", ch. 23 algorithm NNLS, from memory).
//
// terms restricts the fit to the listed terms; by default all five are used
// when tau0 > 0 and WhiteFM, FlickerFM and RandomWalkFM when tau0 = 0.
func Calibrate(targets []ADEVPoint, tau0 float64, terms ...Term) ([5]float64, error) {
	var h [5]float64
	if len(targets) == 0 {
		return h, errors.New("noise: calibrate: no target points")
	}
	if tau0 < 0 || math.IsNaN(tau0) || math.IsInf(tau0, 0) {
		return h, fmt.Errorf("noise: calibrate: sample interval %g s must be ≥ 0", tau0)
	}
	if len(terms) == 0 {
		if tau0 > 0 {
			terms = []Term{WhitePM, FlickerPM, WhiteFM, FlickerFM, RandomWalkFM}
		} else {
			terms = []Term{WhiteFM, FlickerFM, RandomWalkFM}
		}
	}
	for _, t := range terms {
		if t < WhitePM || t > RandomWalkFM {
			return h, fmt.Errorf("noise: calibrate: unknown term %d", int(t))
		}
		if tau0 == 0 && (t == WhitePM || t == FlickerPM) {
			return h, fmt.Errorf("noise: calibrate: %v needs a sample interval (tau0 = 0 s)", t)
		}
	}
	for i, p := range targets {
		if !(p.Tau > 0) || math.IsInf(p.Tau, 0) || !(p.ADEV > 0) || math.IsInf(p.ADEV, 0) {
			return h, fmt.Errorf("noise: calibrate: target %d: τ = %g s, σ = %g must be positive and finite", i, p.Tau, p.ADEV)
		}
		if tau0 > 0 && p.Tau < tau0 {
			return h, fmt.Errorf("noise: calibrate: target %d: τ = %g s is below the sample interval %g s", i, p.Tau, tau0)
		}
	}
	// Design matrix: a[i][j] = AVAR of unit h_j at τ_i over σ_i², columns
	// scaled to unit norm (h spans ~20 decades).
	rows, cols := len(targets), len(terms)
	a := make([][]float64, rows)
	scale := make([]float64, cols)
	for i, p := range targets {
		a[i] = make([]float64, cols)
		for j, t := range terms {
			a[i][j] = TermAVAR(t, 1, p.Tau, tau0) / (p.ADEV * p.ADEV)
			scale[j] += a[i][j] * a[i][j]
		}
	}
	for j := range scale {
		scale[j] = math.Sqrt(scale[j])
		if scale[j] == 0 || math.IsNaN(scale[j]) || math.IsInf(scale[j], 0) {
			return h, fmt.Errorf("noise: calibrate: term %v has no usable response", terms[j])
		}
		for i := range a {
			a[i][j] /= scale[j]
		}
	}
	b := make([]float64, rows)
	for i := range b {
		b[i] = 1
	}
	// Iteratively reweighted: row i is divided by √r_i, with the current model
	// ratio r_i = AVAR_model/σ_i². At the fixed point the objective is
	// Σ (r_i − 1)²/r_i = Σ 2(cosh ln r_i − 1), symmetric in ln r_i, so that
	// over- and under-shoot by the same factor count alike.
	w := make([]float64, rows)
	for i := range w {
		w[i] = 1
	}
	var z []float64
	for range 12 {
		aw := make([][]float64, rows)
		bw := make([]float64, rows)
		for i := range a {
			aw[i] = make([]float64, cols)
			for j := range a[i] {
				aw[i][j] = a[i][j] * w[i]
			}
			bw[i] = w[i]
		}
		zz, err := nnls(aw, bw)
		if err != nil {
			return h, err
		}
		z = zz
		for i := range a {
			r := 0.0
			for j := range a[i] {
				r += a[i][j] * z[j]
			}
			if r > 0 {
				w[i] = 1 / math.Sqrt(r)
			}
		}
	}
	for j, t := range terms {
		h[t] = z[j] / scale[j]
	}
	return h, nil
}

// nnls solves min ‖A z − b‖ subject to z ≥ 0 (Lawson–Hanson active set).
func nnls(a [][]float64, b []float64) ([]float64, error) {
	rows, cols := len(a), len(a[0])
	x := make([]float64, cols)
	passive := make([]bool, cols)
	const tol = 1e-12
	resid := func(z []float64) []float64 {
		r := make([]float64, rows)
		for i := range rows {
			r[i] = b[i]
			for j := range cols {
				r[i] -= a[i][j] * z[j]
			}
		}
		return r
	}
	solveP := func() ([]float64, error) {
		var idx []int
		for j, p := range passive {
			if p {
				idx = append(idx, j)
			}
		}
		A := mat.NewDense(rows, len(idx), nil)
		for i := range rows {
			for k, j := range idx {
				A.Set(i, k, a[i][j])
			}
		}
		var s mat.Dense
		if err := s.Solve(A, mat.NewDense(rows, 1, append([]float64(nil), b...))); err != nil {
			var c mat.Condition
			if !errors.As(err, &c) {
				return nil, fmt.Errorf("noise: calibrate: least-squares step: %w", err)
			}
		}
		z := make([]float64, cols)
		for k, j := range idx {
			z[j] = s.At(k, 0)
		}
		return z, nil
	}
	for iter := 0; iter < 10*cols+10; iter++ {
		r := resid(x)
		best, jb := tol, -1
		for j := range cols {
			if passive[j] {
				continue
			}
			w := 0.0
			for i := range rows {
				w += a[i][j] * r[i]
			}
			if w > best {
				best, jb = w, j
			}
		}
		if jb < 0 {
			return x, nil
		}
		passive[jb] = true
		for inner := 0; inner < 10*cols+10; inner++ {
			z, err := solveP()
			if err != nil {
				return nil, err
			}
			ok := true
			for j := range cols {
				if passive[j] && z[j] <= tol {
					ok = false
				}
			}
			if ok {
				x = z
				break
			}
			alpha := math.Inf(1)
			for j := range cols {
				if passive[j] && z[j] <= tol {
					if s := x[j] / (x[j] - z[j]); s < alpha {
						alpha = s
					}
				}
			}
			for j := range cols {
				x[j] += alpha * (z[j] - x[j])
				if passive[j] && x[j] <= tol {
					passive[j] = false
					x[j] = 0
				}
			}
		}
	}
	return x, nil
}
