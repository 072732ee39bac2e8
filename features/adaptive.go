package features

// Adaptive is an optional interface of a [Builder] that says whether the
// Encoder Learn returns depends on which dates it is given.
//
// Adaptive() == false is a promise: whenever Learn succeeds on some dates,
// it also succeeds on any non-empty selection of them (with repeats, as in
// a bootstrap replicate) and returns an Encoder with the same column names
// that writes the same values for every date. Such a Builder learns nothing
// from the rows, only from its own configuration, so a resampling run may
// learn it once on all rows instead of once per replicate (package inspect
// does, to take its batched least-squares path).
//
// A Builder that does not implement Adaptive is taken to be adaptive; see
// [Adapts].
type Adaptive interface {
	Builder
	Adaptive() bool
}

// Adapts reports whether b's learned encoder may depend on the dates it
// learns from: false only if b implements [Adaptive] and says so.
func Adapts(b Builder) bool {
	a, ok := b.(Adaptive)
	return !ok || a.Adaptive()
}

// Adaptive reports false: Intercept learns nothing.
func (Intercept) Adaptive() bool { return false }

// Adaptive reports whether s has a part in the [Indicator] encoding, whose
// columns are the levels seen by Learn. Number and Cyclic parts, the
// trend and the date are computed from each date alone.
func (s Set) Adaptive() bool {
	for _, sp := range s.Parts {
		if sp.Encoding == Indicator {
			return true
		}
	}
	return false
}

// Adaptive reports whether any of the joined builders adapts (see
// [Adapts]).
func (js joined) Adaptive() bool {
	for _, b := range js {
		if Adapts(b) {
			return true
		}
	}
	return false
}
