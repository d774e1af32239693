package score

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distuv"
)

// A BinPoint is one amplitude level of an efficiency curve.
type BinPoint struct {
	S     float64 // amplitude (e.g. bias step, s); must be positive
	N     int     // injections
	Found int     // injections found
}

// A Sigmoid is the efficiency curve eff(s) = 1/(1 + exp(−(log10 s − Mu)/W))
// fitted by binomial maximum likelihood.
type Sigmoid struct {
	Mu, W       float64 // location (log10 of the amplitude unit) and width (decades), W > 0
	MuErr, WErr float64 // standard errors from the observed information (inverse Hessian)
	CovMuW      float64 // covariance of Mu and W
	H50, H90    float64 // amplitudes at 50 % and 90 % efficiency, in the unit of S
	// H50Int and H90Int are profile-likelihood intervals at CL: the set where
	// 2·(NLL_profile − NLL_min) ≤ χ²₁ quantile(CL). An end that cannot be
	// bracketed within the data's amplitude range ± 10 decades is ±Inf/0.
	H50Int, H90Int Interval
	CL             float64
	NLL            float64 // negative log-likelihood at the optimum (without binomial coefficients)
}

// Eval returns the fitted efficiency at amplitude s.
func (g Sigmoid) Eval(s float64) float64 {
	return 1 / (1 + math.Exp(-(math.Log10(s)-g.Mu)/g.W))
}

// ln9 converts the 50 % point to the 90 % point: σ(z) = 0.9 at z = ln 9.
var ln9 = math.Log(9)

// ErrUnresolved reports efficiency data that do not constrain a sigmoid:
// all found, none found, or a jump from 0 to 1 with no level in between.
var ErrUnresolved = errors.New("score: efficiency curve not resolved by the data")

type sigData struct {
	u    []float64 // log10 s
	n, k []float64
}

// nll is the binomial negative log-likelihood at (mu, w).
func (d *sigData) nll(mu, w float64) float64 {
	f := 0.0
	for i, u := range d.u {
		z := (u - mu) / w
		// ln p = −softplus(−z), ln(1−p) = −softplus(z)
		f += d.k[i]*softplus(-z) + (d.n[i]-d.k[i])*softplus(z)
	}
	return f
}

func softplus(x float64) float64 {
	if x > 30 {
		return x + math.Exp(-x)
	}
	return math.Log1p(math.Exp(x))
}

func logistic(z float64) float64 { return 1 / (1 + math.Exp(-z)) }

// FitSigmoid fits eff(s) = 1/(1+exp(−(log10 s − μ)/w)) to the points by
// binomial maximum likelihood (gonum/optimize, BFGS in (μ, ln w)), with
// standard errors from the analytic Hessian and profile-likelihood
// intervals on h50 = 10^μ and h90 = 10^(μ + w·ln 9) at two-sided
// confidence level cl (detection.md §3.4).
func FitSigmoid(pts []BinPoint, cl float64) (Sigmoid, error) {
	if !(cl > 0 && cl < 1) {
		return Sigmoid{}, fmt.Errorf("score: sigmoid fit: confidence level %g is not in (0, 1)", cl)
	}
	var d sigData
	for _, p := range pts {
		if !(p.S > 0) || math.IsInf(p.S, 0) || p.N < 0 || p.Found < 0 || p.Found > p.N {
			return Sigmoid{}, fmt.Errorf("score: sigmoid fit: bad point s=%g found=%d n=%d", p.S, p.Found, p.N)
		}
		if p.N == 0 {
			continue
		}
		d.u = append(d.u, math.Log10(p.S))
		d.n = append(d.n, float64(p.N))
		d.k = append(d.k, float64(p.Found))
	}
	if err := d.resolved(); err != nil {
		return Sigmoid{}, err
	}
	// Start: μ at the amplitude closest to 50 %, w a tenth of the range.
	umin, umax := d.u[0], d.u[0]
	mu0, best := d.u[0], math.Inf(1)
	for i, u := range d.u {
		umin, umax = math.Min(umin, u), math.Max(umax, u)
		if e := math.Abs(d.k[i]/d.n[i] - 0.5); e < best {
			mu0, best = u, e
		}
	}
	w0 := math.Max((umax-umin)/10, 1e-3)
	prob := optimize.Problem{
		Func: func(x []float64) float64 { return d.nll(x[0], math.Exp(x[1])) },
		Grad: func(g, x []float64) {
			mu, w := x[0], math.Exp(x[1])
			g[0], g[1] = 0, 0
			for i, u := range d.u {
				z := (u - mu) / w
				r := d.k[i] - d.n[i]*logistic(z)
				g[0] += r / w
				g[1] += r * z
			}
		},
	}
	res, err := optimize.Minimize(prob, []float64{mu0, math.Log(w0)}, fitSettings(500), &optimize.BFGS{})
	if err != nil && res == nil {
		return Sigmoid{}, fmt.Errorf("score: sigmoid fit: %w", err)
	}
	g := Sigmoid{Mu: res.X[0], W: math.Exp(res.X[1]), CL: cl, NLL: res.F}
	if !(g.W > 1e-6*math.Max(umax-umin, 1)) || math.IsNaN(g.Mu) {
		return Sigmoid{}, fmt.Errorf("%w: fitted width %g decades", ErrUnresolved, g.W)
	}
	g.H50 = math.Pow(10, g.Mu)
	g.H90 = math.Pow(10, g.Mu+g.W*ln9)
	// Observed information in (μ, w).
	var hmm, hmw, hww float64
	for i, u := range d.u {
		z := (u - g.Mu) / g.W
		p := logistic(z)
		a := d.n[i] * p * (1 - p)
		r := -(d.k[i] - d.n[i]*p) // dNLL/dz
		zm, zw := -1/g.W, -z/g.W
		hmm += a * zm * zm
		hmw += a*zm*zw + r/(g.W*g.W)
		hww += a*zw*zw + r*2*z/(g.W*g.W)
	}
	det := hmm*hww - hmw*hmw
	if det > 0 {
		g.MuErr = math.Sqrt(hww / det)
		g.WErr = math.Sqrt(hmm / det)
		g.CovMuW = -hmw / det
	} else {
		g.MuErr, g.WErr, g.CovMuW = math.NaN(), math.NaN(), math.NaN()
	}
	delta := distuv.ChiSquared{K: 1}.Quantile(cl) / 2
	lim := [2]float64{umin - 10, umax + 10}
	for j, c := range []float64{0, ln9} {
		q := g.Mu + c*g.W
		sig := math.Sqrt(g.MuErr*g.MuErr + 2*c*g.CovMuW + c*c*g.WErr*g.WErr)
		if !(sig > 0) {
			sig = 0.1
		}
		prof := func(q float64) float64 { return d.profile(q, c, g.W) - g.NLL }
		lo := d.crossing(prof, q, -sig, delta, lim[0])
		hi := d.crossing(prof, q, sig, delta, lim[1])
		iv := Interval{math.Pow(10, lo), math.Pow(10, hi)}
		if j == 0 {
			g.H50Int = iv
		} else {
			g.H90Int = iv
		}
	}
	return g, nil
}

// resolved rejects data that leave μ or w unconstrained.
func (d *sigData) resolved() error {
	if len(d.u) < 2 {
		return fmt.Errorf("%w: %d amplitude levels with injections, want at least 2", ErrUnresolved, len(d.u))
	}
	type lv struct{ u, n, k float64 }
	var l []lv
	for i := range d.u {
		l = append(l, lv{d.u[i], d.n[i], d.k[i]})
	}
	sort.Slice(l, func(a, b int) bool { return l[a].u < l[b].u })
	anyFound, all := false, true
	for _, x := range l {
		anyFound = anyFound || x.k > 0
		all = all && x.k == x.n
	}
	if !anyFound {
		return fmt.Errorf("%w: nothing found", ErrUnresolved)
	}
	if all {
		return fmt.Errorf("%w: everything found", ErrUnresolved)
	}
	// Perfect separation: every k ∈ {0, n}, all zeros below all full levels.
	lastZero, firstFull := math.Inf(-1), math.Inf(1)
	for _, x := range l {
		switch {
		case x.k == 0:
			lastZero = math.Max(lastZero, x.u)
		case x.k == x.n:
			firstFull = math.Min(firstFull, x.u)
		default:
			return nil
		}
	}
	if lastZero < firstFull {
		return fmt.Errorf("%w: efficiency jumps from 0 at %.3g to 1 at %.3g with no level in between", ErrUnresolved, math.Pow(10, lastZero), math.Pow(10, firstFull))
	}
	return nil
}

// profile returns min over w of NLL(q − c·w, w), starting from w0.
func (d *sigData) profile(q, c, w0 float64) float64 {
	prob := optimize.Problem{
		Func: func(x []float64) float64 { w := math.Exp(x[0]); return d.nll(q-c*w, w) },
		Grad: func(g, x []float64) {
			w := math.Exp(x[0])
			mu := q - c*w
			g[0] = 0
			for i, u := range d.u {
				z := (u - mu) / w
				r := -(d.k[i] - d.n[i]*logistic(z)) // dNLL/dz
				// dz/d ln w = w·(c/w − z/w) = c − z
				g[0] += r * (c - z)
			}
		},
	}
	res, err := optimize.Minimize(prob, []float64{math.Log(w0)}, fitSettings(200), &optimize.BFGS{})
	if res == nil || (err != nil && math.IsNaN(res.F)) {
		return math.Inf(1)
	}
	return res.F
}

// crossing walks from q in steps of step until f exceeds delta (or the
// limit is passed: then ±Inf), then bisects for f = delta.
func (d *sigData) crossing(f func(float64) float64, q, step, delta, limit float64) float64 {
	a := q
	b := q + step
	for f(b) < delta {
		a = b
		step *= 1.6
		b = a + step
		if (step < 0 && b < limit) || (step > 0 && b > limit) {
			return math.Copysign(math.Inf(1), step)
		}
	}
	for range 50 {
		m := (a + b) / 2
		if f(m) < delta {
			a = m
		} else {
			b = m
		}
	}
	return (a + b) / 2
}

// fitSettings stops at a small gradient or when the likelihood stops
// improving for a few iterations.
func fitSettings(maxIter int) *optimize.Settings {
	return &optimize.Settings{
		GradientThreshold: 1e-8,
		MajorIterations:   maxIter,
		Converger:         &optimize.FunctionConverge{Absolute: 1e-11, Relative: 1e-13, Iterations: 4},
	}
}
