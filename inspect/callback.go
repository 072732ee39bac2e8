package inspect

import (
	"context"
	"fmt"
	"sync/atomic"
)

// ReplicateError is the failure of one replicate: its learn, fit, encoding or
// prediction failed, or one of its callbacks returned an error or panicked.
// Replicate is the 0-based replicate number, as in [resample.Split]; it is
// −1 for the full-data fit. Err is the reason, so errors.Is(err,
// fit.ErrSingular) still holds for a replicate whose design was singular.
//
// Errors of this type are not modified after they are returned and are
// safe to read concurrently.
type ReplicateError struct {
	Replicate int
	Err       error
}

// Error reads "replicate R: reason", or "full-data fit: reason".
func (e *ReplicateError) Error() string {
	if e.Replicate < 0 {
		return "full-data fit: " + e.Err.Error()
	}
	return fmt.Sprintf("replicate %d: %v", e.Replicate, e.Err)
}

// Unwrap returns the reason.
func (e *ReplicateError) Unwrap() error { return e.Err }

// PanicError is a panic caught in a worker goroutine: in a callback, or in
// the Builder, Encoder, Fitter or Predictor of a run. Value is what was
// passed to panic and Stack the panicking goroutine's stack from
// [runtime/debug.Stack]. A run re-raises it on the caller's goroutine with
// panic(PanicError{...}), or records it as the replicate's failure when
// [Options.RecordPanics] is set.
//
// A PanicError is a plain value, not modified after it is made, and safe
// to read concurrently.
type PanicError struct {
	Replicate int    // 0-based replicate, −1 for the full-data fit
	Where     string // what panicked: "learn", "fit", "callback \"name\"", ...
	Value     any
	Stack     []byte
}

// Error returns a one-line description followed by the original stack.
func (p PanicError) Error() string {
	return fmt.Sprintf("inspect: replicate %d: panic in %s: %v\n\noriginal stack:\n%s", p.Replicate, p.Where, p.Value, p.Stack)
}

// Unwrap returns Value if it is an error, and nil otherwise.
func (p PanicError) Unwrap() error {
	err, _ := p.Value.(error)
	return err
}

// StopError reports a run that ended before every replicate was delivered:
// its context was cancelled, a replicate failed under [Options.StopOnError],
// or the [Sink] returned an error. Finished replicates were delivered
// (kept, or passed to the sink); the others are marked [ErrNotRun]. Err is
// the cause (ctx.Err(), the first *ReplicateError or the sink's error), so
// errors.Is(err, context.Canceled) holds for a cancelled run.
//
// Errors of this type are not modified after they are returned and are
// safe to read concurrently.
type StopError struct {
	Finished, Total int
	Err             error
}

// Error says how many replicates finished before the stop, and why.
func (e *StopError) Error() string {
	return fmt.Sprintf("inspect: run stopped after %d of %d replicates: %v", e.Finished, e.Total, e.Err)
}

// Unwrap returns the cause.
func (e *StopError) Unwrap() error { return e.Err }

// Callback computes a value of the caller's type from one fitted replicate.
// It is called once per replicate, on a worker goroutine, concurrently with
// the callbacks of other replicates, and once for the full-data fit before
// any replicate. It must not keep r or the slices it refers to after it
// returns (copy what it needs), and must not modify them. Its result must
// depend only on r (and ctx) for a run to be reproducible.
type Callback[T any] func(ctx context.Context, r *Replicate) (T, error)

// Keeper is a callback registered with a run. Values of type *[Kept] are
// the only Keepers; make them with [Keep] or a built-in such as
// [KeepCoefficients].
type Keeper interface {
	// Name returns the name given to Keep.
	Name() string
	base() *keepBase
}

// keepBase holds what a run needs from every Keeper, whatever its T.
type keepBase struct {
	name string
	busy atomic.Bool
	// builtin says which built-in Keeper this is, for the batched path.
	builtin builtinKind
	// call runs the callback for r, stores its outcome in the slot and
	// returns the stored error.
	call func(ctx context.Context, r *Replicate, slot any) error
	// errOf returns the error stored in the slot.
	errOf func(slot any) error
	// fail stores err in the slot.
	fail func(slot any, err error)
	// newSlot returns an empty slot.
	newSlot func() any
	// begin prepares storage for b replicates (none if streaming).
	begin func(b int, stream bool)
	// store moves the slot's outcome into replicate r's storage.
	store func(r int, slot any)
	// storeFull moves the slot's outcome into the full-data storage.
	storeFull func(slot any)
}

// builtinKind names the built-in Keepers whose values the batched
// least-squares path can produce without a fitted model.
type builtinKind uint8

const (
	userKeeper builtinKind = iota
	coefficientsKeeper
	metricsKeeper
)

// slot is one replicate's outcome of one callback.
type slot[T any] struct {
	v   T
	err error
}

// Kept is a callback registered with a run and, after the run, the values
// it returned, in replicate order.
//
// A Kept belongs to one run at a time: a run that is given a Kept already in
// use by another panics. A later run replaces the values of an earlier one
// (slices returned before stay valid). Read the values after the run has
// returned; the methods are not safe for use during it.
type Kept[T any] struct {
	b      keepBase
	fn     Callback[T]
	vals   []T
	errs   []error
	full   T
	ferr   error
	stream bool
}

// Keep returns a Keeper that calls fn on every replicate of a run and keeps
// its results. Keep panics if name is empty or fn is nil.
func Keep[T any](name string, fn Callback[T]) *Kept[T] {
	if name == "" {
		panic("inspect: Keep: empty name")
	}
	if fn == nil {
		panic("inspect: Keep: nil callback")
	}
	k := &Kept[T]{fn: fn}
	k.b = keepBase{
		name:    name,
		newSlot: func() any { return new(slot[T]) },
		call: func(ctx context.Context, r *Replicate, s any) error {
			sl := s.(*slot[T])
			v, err := fn(ctx, r)
			if err != nil {
				var zero T
				sl.v, sl.err = zero, &ReplicateError{Replicate: r.ID, Err: fmt.Errorf("inspect: callback %q: %w", name, err)}
				return sl.err
			}
			sl.v, sl.err = v, nil
			return nil
		},
		errOf: func(s any) error { return s.(*slot[T]).err },
		fail: func(s any, err error) {
			sl := s.(*slot[T])
			var zero T
			sl.v, sl.err = zero, err
		},
		begin: func(b int, stream bool) {
			k.stream = stream
			var zero T
			k.full, k.ferr = zero, nil
			if stream {
				k.vals, k.errs = nil, nil
				return
			}
			k.vals = make([]T, b)
			k.errs = make([]error, b)
			for i := range k.errs {
				k.errs[i] = ErrNotRun
			}
		},
		store: func(r int, s any) {
			sl := s.(*slot[T])
			k.vals[r], k.errs[r] = sl.v, sl.err
		},
		storeFull: func(s any) {
			sl := s.(*slot[T])
			k.full, k.ferr = sl.v, sl.err
		},
	}
	return k
}

// Name returns the name given to Keep.
func (k *Kept[T]) Name() string { return k.b.name }

func (k *Kept[T]) base() *keepBase { return &k.b }

// Values returns the callback's values in replicate order: Values()[r]
// belongs to replicate r. A replicate whose Err is non-nil holds the zero
// value of T. Values is nil before a run and after a streamed run, whose
// values went to the [Sink] instead.
func (k *Kept[T]) Values() []T { return k.vals }

// Errs returns, in replicate order, nil for every replicate whose value was
// kept and the reason for every other: a *[ReplicateError] (its fit failed,
// or the callback failed), or [ErrNotRun]. It is nil when Values is.
func (k *Kept[T]) Errs() []error { return k.errs }

// Count returns the number of replicates with a kept value and the number
// without one.
func (k *Kept[T]) Count() (ok, failed int) {
	for _, err := range k.errs {
		if err == nil {
			ok++
		} else {
			failed++
		}
	}
	return ok, failed
}

// OK returns the values of the replicates that succeeded, in replicate
// order, and their replicate numbers.
func (k *Kept[T]) OK() (vals []T, replicates []int) {
	for r, err := range k.errs {
		if err == nil {
			vals = append(vals, k.vals[r])
			replicates = append(replicates, r)
		}
	}
	return vals, replicates
}

// Full returns the callback's value on the full-data fit, or its error.
func (k *Kept[T]) Full() (T, error) { return k.full, k.ferr }

// From returns the callback's value in a streamed record, or the reason
// there is none. It panics if k was not registered with the run that made
// rec.
func (k *Kept[T]) From(rec *Record) (T, error) {
	for i, kb := range rec.keepers {
		if kb == &k.b {
			sl := rec.slots[i].(*slot[T])
			return sl.v, sl.err
		}
	}
	panic(fmt.Sprintf("inspect: Kept %q is not part of the run that made this record", k.b.name))
}
