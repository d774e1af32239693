package score

import (
	"encoding/json"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// EfficiencyCL is the two-sided confidence level of the Wilson and
// Clopper–Pearson intervals written to efficiency tables, and of the
// Clopper–Pearson lower bound used by Reach.
const EfficiencyCL = 0.95

// An Interval is a closed range [Low, High], e.g. of a proportion
// (dimensionless). In JSON it is {"low": x, "high": y}; a non-finite end
// (an unbounded profile interval) is written as null and read back as NaN.
type Interval struct {
	Low, High float64
}

type intervalJSON struct {
	Low  *float64 `json:"low"`
	High *float64 `json:"high"`
}

func finitePtr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// MarshalJSON writes {"low": Low, "high": High} with null for NaN or ±Inf.
func (iv Interval) MarshalJSON() ([]byte, error) {
	return json.Marshal(intervalJSON{finitePtr(iv.Low), finitePtr(iv.High)})
}

// UnmarshalJSON reads {"low": x, "high": y}; null or absent gives NaN.
func (iv *Interval) UnmarshalJSON(b []byte) error {
	var j intervalJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return fmt.Errorf("score: interval: %w", err)
	}
	iv.Low, iv.High = math.NaN(), math.NaN()
	if j.Low != nil {
		iv.Low = *j.Low
	}
	if j.High != nil {
		iv.High = *j.High
	}
	return nil
}

func checkBinomial(k, n int, cl float64) error {
	if n < 0 || k < 0 || k > n {
		return fmt.Errorf("score: binomial counts need 0 ≤ k ≤ n, got k=%d n=%d", k, n)
	}
	if !(cl > 0 && cl < 1) {
		return fmt.Errorf("score: confidence level %g is not in (0, 1)", cl)
	}
	return nil
}

// Wilson returns the Wilson score interval for k successes in n trials at
// two-sided confidence level cl (E. B. Wilson, JASA 22, 209 (1927)):
// centre (p̂ + z²/2n)/(1 + z²/n), half-width z/(1 + z²/n)·√(p̂(1−p̂)/n + z²/4n²),
// with z the 1−(1−cl)/2 normal quantile. For n = 0 it is [0, 1].
func Wilson(k, n int, cl float64) (Interval, error) {
	if err := checkBinomial(k, n, cl); err != nil {
		return Interval{}, err
	}
	if n == 0 {
		return Interval{0, 1}, nil
	}
	z := distuv.UnitNormal.Quantile(1 - (1-cl)/2)
	nf := float64(n)
	p := float64(k) / nf
	z2n := z * z / nf
	centre := (p + z2n/2) / (1 + z2n)
	half := z / (1 + z2n) * math.Sqrt(p*(1-p)/nf+z*z/(4*nf*nf))
	iv := Interval{math.Max(0, centre-half), math.Min(1, centre+half)}
	if k == 0 {
		iv.Low = 0
	}
	if k == n {
		iv.High = 1
	}
	return iv, nil
}

// ClopperPearson returns the exact (Clopper–Pearson) interval for k
// successes in n trials at two-sided confidence level cl (C. J. Clopper,
// E. S. Pearson, Biometrika 26, 404 (1934)): with α = 1−cl,
// Low = I⁻¹_{α/2}(k, n−k+1) and High = I⁻¹_{1−α/2}(k+1, n−k), where I⁻¹ is
// the inverse regularized incomplete beta function; Low = 0 for k = 0 and
// High = 1 for k = n. For n = 0 it is [0, 1].
func ClopperPearson(k, n int, cl float64) (Interval, error) {
	if err := checkBinomial(k, n, cl); err != nil {
		return Interval{}, err
	}
	alpha := 1 - cl
	iv := Interval{0, 1}
	if k > 0 {
		iv.Low = mathext.InvRegIncBeta(float64(k), float64(n-k+1), alpha/2)
	}
	if k < n {
		iv.High = mathext.InvRegIncBeta(float64(k+1), float64(n-k), 1-alpha/2)
	}
	return iv, nil
}

// PoissonZeroFactor returns −ln(1−cl): the expected number of events μ for
// which observing none has probability 1−cl, i.e. the upper limit on a
// Poisson mean after zero observed events (2.303 at 90 %, 2.996 at 95 %).
// It returns NaN when cl is not in (0, 1).
func PoissonZeroFactor(cl float64) float64 {
	if !(cl > 0 && cl < 1) {
		return math.NaN()
	}
	return -math.Log1p(-cl)
}
