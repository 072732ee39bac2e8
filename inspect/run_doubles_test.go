package inspect_test

// Test doubles standing in for packages still being written: a small
// calendar Builder, an ordinary-bootstrap Scheme and an OLS by the normal
// equations. They keep the contracts of features.Builder, resample.Scheme
// and fit.Fitter/fit.Coefficients/fit.FrequencyWeigher, nothing more.

import (
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"gonum.org/v1/gonum/mat"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"github.com/kalends/kalends/internal/rng"
	"github.com/kalends/kalends/resample"
)

// calBuilder makes the named columns of a date:
//
//	intercept  1
//	trend      days since the mean date learned (learned state)
//	sin, cos   sin and cos of 2π·yearday/365.25
//	weekend    1 on Saturday and Sunday
//	december   1 in December (a holiday-season stand-in)
//	noise      a column unrelated to the outcome (a hash of the date)
//
// With dropAbsent, a 0/1 column that is constant 0 in the learned dates is
// left out, as a learned level set would be.
type calBuilder struct {
	cols       []string
	dropAbsent bool
}

type calEncoder struct {
	cols   []string
	origin float64 // mean day number learned
}

func dayNumber(t time.Time) float64 {
	y, m, d := t.Date()
	return float64(time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Unix() / 86400)
}

func calValue(col string, t time.Time, origin float64) float64 {
	switch col {
	case "intercept":
		return 1
	case "trend":
		return dayNumber(t) - origin
	case "sin":
		return math.Sin(2 * math.Pi * float64(t.YearDay()) / 365.25)
	case "cos":
		return math.Cos(2 * math.Pi * float64(t.YearDay()) / 365.25)
	case "weekend":
		if wd := t.Weekday(); wd == time.Saturday || wd == time.Sunday {
			return 1
		}
		return 0
	case "december":
		if t.Month() == time.December {
			return 1
		}
		return 0
	case "noise":
		return float64(rng.Mix(uint64(dayNumber(t)))>>11)*0x1p-53 - 0.5
	}
	panic("calBuilder: unknown column " + col)
}

func (b calBuilder) Learn(dates []time.Time) (features.Encoder, error) {
	if len(dates) == 0 {
		return nil, fmt.Errorf("calBuilder: no dates")
	}
	var s float64
	for _, t := range dates {
		s += dayNumber(t)
	}
	e := &calEncoder{origin: s / float64(len(dates))}
	for _, c := range b.cols {
		if b.dropAbsent && (c == "december" || c == "weekend") {
			seen := false
			for _, t := range dates {
				if calValue(c, t, 0) != 0 {
					seen = true
					break
				}
			}
			if !seen {
				continue
			}
		}
		e.cols = append(e.cols, c)
	}
	return e, nil
}

func (e *calEncoder) Names() []string { return append([]string(nil), e.cols...) }

func (e *calEncoder) Encode(dst *features.Table, dates []time.Time) error {
	for _, c := range e.cols {
		v := make([]float64, len(dates))
		for i, t := range dates {
			v[i] = calValue(c, t, e.origin)
		}
		if err := dst.Append(c, v); err != nil {
			return err
		}
	}
	return nil
}

// bootstrap is the ordinary bootstrap: n draws with replacement from
// rng.Replicate(seed, r).
type bootstrap struct{ B int }

type bootPlan struct {
	n, b int
	seed uint64
}

func (s bootstrap) Plan(n int, seed uint64) (resample.Plan, error) {
	if n < 2 {
		return nil, fmt.Errorf("bootstrap: %d rows", n)
	}
	return bootPlan{n: n, b: s.B, seed: seed}, nil
}

func (p bootPlan) Len() int { return p.b }

func (p bootPlan) Split(r int, dst *resample.Split) *resample.Split {
	if dst == nil {
		dst = &resample.Split{}
	}
	dst.Replicate = r
	dst.Weights = nil
	if cap(dst.Counts) < p.n {
		dst.Counts = make([]int32, p.n)
	}
	dst.Counts = dst.Counts[:p.n]
	clear(dst.Counts)
	g := rng.Replicate(p.seed, r)
	for range p.n {
		dst.Counts[g.IntN(p.n)]++
	}
	dst.Out = dst.Out[:0]
	for i, c := range dst.Counts {
		if c == 0 {
			dst.Out = append(dst.Out, i)
		}
	}
	return dst
}

// ols is least squares by the normal equations with frequency-weight
// semantics (σ² = RSS / (Σw − p)). It fails with *fit.ConditionError when
// XᵀWX is singular or its condition number exceeds 1e12.
type ols struct{}

var (
	_ fit.Fitter           = ols{}
	_ fit.FrequencyWeigher = ols{}
	_ fit.Coefficients     = (*olsModel)(nil)
)

type olsModel struct {
	names []string
	beta  []float64
	se    []float64
}

func (ols) FrequencyWeighted() fit.Fitter { return ols{} }

func column(x mat.Matrix, j int, buf []float64) []float64 {
	if t, ok := x.(*features.Table); ok {
		return t.Column(j)
	}
	r, _ := x.Dims()
	buf = buf[:0]
	for i := range r {
		buf = append(buf, x.At(i, j))
	}
	return buf
}

func (ols) Fit(x mat.Matrix, y, w []float64) (fit.Predictor, error) {
	n, p := x.Dims()
	if len(y) != n {
		panic("ols: len(y) != rows")
	}
	cols := make([][]float64, p)
	for j := range p {
		cols[j] = column(x, j, nil)
	}
	xtx := mat.NewSymDense(p, nil)
	xty := mat.NewVecDense(p, nil)
	var sw float64
	for i := range n {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		sw += wi
	}
	for a := range p {
		ca := cols[a]
		var s float64
		for i := range n {
			wi := 1.0
			if w != nil {
				wi = w[i]
			}
			s += wi * ca[i] * y[i]
		}
		xty.SetVec(a, s)
		for b := a; b < p; b++ {
			cb := cols[b]
			var s float64
			for i := range n {
				wi := 1.0
				if w != nil {
					wi = w[i]
				}
				s += wi * ca[i] * cb[i]
			}
			xtx.SetSym(a, b, s)
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(xtx) {
		return nil, &fit.ConditionError{Cond: math.Inf(1)}
	}
	if c := ch.Cond(); c > 1e12 {
		return nil, &fit.ConditionError{Cond: c}
	}
	var beta mat.VecDense
	if err := ch.SolveVecTo(&beta, xty); err != nil {
		return nil, &fit.ConditionError{Cond: math.Inf(1)}
	}
	m := &olsModel{beta: make([]float64, p), se: make([]float64, p), names: make([]string, p)}
	for j := range p {
		m.beta[j] = beta.AtVec(j)
		if nm, ok := x.(fit.Namer); ok {
			m.names[j] = nm.Name(j)
		}
	}
	var rss float64
	for i := range n {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		e := y[i]
		for j := range p {
			e -= cols[j][i] * m.beta[j]
		}
		rss += wi * e * e
	}
	s2 := rss / (sw - float64(p))
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return nil, &fit.ConditionError{Cond: math.Inf(1)}
	}
	for j := range p {
		m.se[j] = math.Sqrt(s2 * inv.At(j, j))
	}
	return m, nil
}

func (m *olsModel) Predict(dst []float64, x mat.Matrix) []float64 {
	n, p := x.Dims()
	if p != len(m.beta) {
		panic(fmt.Sprintf("ols: predict with %d columns, fitted %d", p, len(m.beta)))
	}
	if dst == nil {
		dst = make([]float64, n)
	} else if len(dst) != n {
		panic("ols: wrong dst length")
	}
	clear(dst)
	var buf []float64
	for j := range p {
		c := column(x, j, buf)
		for i := range n {
			dst[i] += c[i] * m.beta[j]
		}
	}
	return dst
}

func (m *olsModel) Coefficients() []fit.Coefficient {
	cs := make([]fit.Coefficient, len(m.beta))
	for j := range cs {
		cs[j] = fit.Coefficient{Name: m.names[j], Estimate: m.beta[j], StdErr: m.se[j], Estimable: true}
	}
	return cs
}

// allCols is the benchmark's six-column design.
var allCols = []string{"intercept", "trend", "sin", "cos", "weekend", "december"}

// simulate returns n invented events every three days from 2021-11-20 with
// outcome 100 + 0.05·trend + 5·sin + 3·cos + 8·weekend + 12·december +
// N(0, sigma²), from a generator seeded with seed.
func simulate(n int, sigma float64, seed uint64) ([]time.Time, []float64) {
	g := rand.New(rand.NewPCG(seed, 17))
	start := time.Date(2021, 11, 20, 0, 0, 0, 0, time.UTC)
	dates := make([]time.Time, n)
	y := make([]float64, n)
	origin := dayNumber(start)
	for i := range n {
		t := start.AddDate(0, 0, 3*i)
		dates[i] = t
		y[i] = 100 + 0.05*(dayNumber(t)-origin) + 5*calValue("sin", t, 0) + 3*calValue("cos", t, 0) +
			8*calValue("weekend", t, 0) + 12*calValue("december", t, 0) + sigma*g.NormFloat64()
	}
	return dates, y
}
