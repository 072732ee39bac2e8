package main

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/holiday"
	"github.com/kalends/kalends/inspect"
	"github.com/kalends/kalends/resample"
)

// partSpec is one item of -parts.
type partSpec struct {
	spec features.Spec
	auto bool // an indicator part whose reference level is chosen from the data
}

// parseParts reads -parts: a comma-separated list of part[:encoding[=level]]
// items and "trend" (in years) or "trend:days".
func parseParts(s string) (parts []partSpec, trend *features.TrendUnit, err error) {
	names := map[string]features.Part{}
	for p := features.Year; p <= features.LeapYear; p++ {
		names[p.String()] = p
	}
	encodings := map[string]features.Encoding{}
	for _, e := range []features.Encoding{features.Number, features.Indicator, features.Cyclic} {
		encodings[e.String()] = e
	}
	for _, item := range strings.Split(s, ",") {
		item = strings.ToLower(strings.TrimSpace(item))
		if item == "" {
			continue
		}
		name, enc, _ := strings.Cut(item, ":")
		if name == "trend" {
			u := features.Years
			switch enc {
			case "", "years":
			case "days":
				u = features.Days
			default:
				return nil, nil, fmt.Errorf("-parts %q: trend takes :years or :days, not %q", item, enc)
			}
			trend = &u
			continue
		}
		p, ok := names[name]
		if !ok {
			return nil, nil, fmt.Errorf("-parts %q: unknown part %q (parts: %s, trend)", item, name, strings.Join(partNames(), ", "))
		}
		enc, ref, hasRef := strings.Cut(enc, "=")
		ps := partSpec{spec: features.Spec{Part: p}}
		if enc != "" {
			e, ok := encodings[enc]
			if !ok {
				return nil, nil, fmt.Errorf("-parts %q: unknown encoding %q (number, indicator or cyclic)", item, enc)
			}
			ps.spec.Encoding = e
		}
		switch {
		case hasRef && ps.spec.Encoding != features.Indicator:
			return nil, nil, fmt.Errorf("-parts %q: only indicator parts take a reference level", item)
		case hasRef:
			ps.spec.Reference = titleLevel(ref)
		case ps.spec.Encoding == features.Indicator:
			ps.auto = true
		}
		parts = append(parts, ps)
	}
	if len(parts) == 0 && trend == nil {
		return nil, nil, fmt.Errorf("-parts %q: no calendar parts given", s)
	}
	return parts, trend, nil
}

func partNames() []string {
	var out []string
	for p := features.Year; p <= features.LeapYear; p++ {
		out = append(out, p.String())
	}
	return out
}

// titleLevel writes a level as features names it: "monday" → "Monday".
func titleLevel(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// holidayFlags collects repeated -holiday values.
type holidayFlags []string

func (h *holidayFlags) String() string     { return strings.Join(*h, "; ") }
func (h *holidayFlags) Set(v string) error { *h = append(*h, v); return nil }

var ordinals = map[string]int{"1st": 1, "first": 1, "2nd": 2, "second": 2, "3rd": 3, "third": 3,
	"4th": 4, "fourth": 4, "5th": 5, "fifth": 5, "last": -1}

// parseHoliday reads one -holiday value, "Name=WHEN", where WHEN is
//
//	MM-DD                          the same day every year (12-31)
//	YYYY-MM-DD[,YYYY-MM-DD...]     one-off days
//	easter+N, easter-N             N days after or before Western Easter Sunday
//	orthodox+N, orthodox-N         the same for Orthodox Easter
//	<nth> <weekday> of <month>     1st…5th or last, e.g. "2nd saturday of august"
func parseHoliday(v string) (holiday.Rule, error) {
	name, when, ok := strings.Cut(v, "=")
	name, when = strings.TrimSpace(name), strings.ToLower(strings.TrimSpace(when))
	if !ok || name == "" || when == "" {
		return holiday.Rule{}, fmt.Errorf("-holiday %q: want Name=WHEN, such as \"Harbour Day=07-14\"", v)
	}
	r := holiday.Rule{Name: name}
	bad := func(why string) (holiday.Rule, error) {
		return holiday.Rule{}, fmt.Errorf("-holiday %q: %s (see -h for the forms of WHEN)", v, why)
	}
	switch {
	case strings.HasPrefix(when, "easter") || strings.HasPrefix(when, "orthodox"):
		r.Kind = holiday.EasterOffset
		rest := strings.TrimPrefix(when, "easter")
		if strings.HasPrefix(when, "orthodox") {
			r.Kind, rest = holiday.OrthodoxOffset, strings.TrimPrefix(when, "orthodox")
		}
		if rest != "" {
			n, err := strconv.Atoi(rest)
			if err != nil {
				return bad("the offset after easter or orthodox must be like +1 or -2")
			}
			r.Offset = n
		}
	case strings.Contains(when, " of "):
		f := strings.Fields(when)
		if len(f) != 4 || f[2] != "of" {
			return bad("want <nth> <weekday> of <month>, such as \"last monday of may\"")
		}
		n, ok := ordinals[f[0]]
		wd, okd := weekday(f[1])
		m, okm := month(f[3])
		if !ok || !okd || !okm {
			return bad("want 1st…5th or last, a weekday name and a month name")
		}
		r.Kind, r.N, r.Weekday, r.Month = holiday.NthWeekday, n, wd, m
	case len(when) == 5:
		t, err := time.Parse("01-02", when)
		if err != nil {
			return bad("MM-DD is not a date")
		}
		r.Kind, r.Month, r.Day = holiday.Fixed, t.Month(), t.Day()
	default:
		r.Kind = holiday.OneOff
		for _, d := range strings.Split(when, ",") {
			t, err := time.Parse(time.DateOnly, strings.TrimSpace(d))
			if err != nil {
				return bad(fmt.Sprintf("%q is not a YYYY-MM-DD date", d))
			}
			r.Dates = append(r.Dates, t)
		}
	}
	return r, nil
}

func weekday(s string) (time.Weekday, bool) {
	for d := time.Sunday; d <= time.Saturday; d++ {
		if strings.EqualFold(d.String(), s) {
			return d, true
		}
	}
	return 0, false
}

func month(s string) (time.Month, bool) {
	for m := time.January; m <= time.December; m++ {
		if strings.EqualFold(m.String(), s) {
			return m, true
		}
	}
	return 0, false
}

// parseScheme returns the resampling scheme named by -scheme. Block schemes
// with length 0 take the automatic length from series.
func parseScheme(name string, b, block int, series func() ([]float64, error)) (resample.Scheme, error) {
	needSeries := func() ([]float64, error) {
		if block > 0 {
			return nil, nil
		}
		return series()
	}
	switch strings.ToLower(name) {
	case "bootstrap":
		return resample.Bootstrap{B: b}, nil
	case "balanced":
		return resample.Balanced{B: b}, nil
	case "bayesian":
		return resample.Bayesian{B: b}, nil
	case "poisson":
		return resample.Poisson{B: b}, nil
	case "stationary":
		s, err := needSeries()
		return resample.Stationary{B: b, Mean: float64(block), Series: s}, err
	case "moving-block":
		s, err := needSeries()
		return resample.MovingBlock{B: b, Length: block, Series: s}, err
	case "circular-block":
		s, err := needSeries()
		return resample.CircularBlock{B: b, Length: block, Series: s}, err
	}
	return nil, fmt.Errorf("-scheme %q: want bootstrap, balanced, bayesian, poisson, stationary, moving-block or circular-block", name)
}

// parseMethod returns the interval method named by -interval.
func parseMethod(name string) (inspect.Method, error) {
	for _, m := range []inspect.Method{inspect.Percentile, inspect.Basic, inspect.Normal, inspect.BCa, inspect.Studentized} {
		if strings.EqualFold(name, m.String()) {
			return m, nil
		}
	}
	return 0, fmt.Errorf("-interval %q: want percentile, basic, normal, bca or studentized", name)
}
