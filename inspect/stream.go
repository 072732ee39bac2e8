package inspect

import "fmt"

// Order says in which order a [Sink] receives replicates.
type Order int

const (
	// InOrder delivers replicates 0, 1, 2, ... in turn. A replicate that
	// finishes early waits in a reorder buffer of [Options.Buffer] records
	// until every earlier one has been delivered; while the buffer is full,
	// no later replicate is started.
	InOrder Order = iota
	// AsDone delivers each replicate as soon as it finishes, in an order
	// that depends on scheduling; [Record.Replicate] says which it is.
	AsDone
)

// String returns "in order" or "as done".
func (o Order) String() string {
	switch o {
	case InOrder:
		return "in order"
	case AsDone:
		return "as done"
	}
	return fmt.Sprintf("Order(%d)", int(o))
}

// Record is one finished replicate passed to a [Sink]: its number, its
// failure if it failed, and the outcome of every registered callback, read
// with [Kept.From]. A Record and everything it refers to are valid only
// during the Receive call; the run reuses it afterwards.
type Record struct {
	// Replicate is the 0-based replicate number.
	Replicate int
	// Err is nil, or the *ReplicateError of a replicate whose learn, fit,
	// encoding or prediction failed (every callback's From then returns it
	// too). A callback's own failure is reported by From, not here.
	Err error

	keepers []*keepBase
	slots   []any
	failed  bool        // the replicate or one of its callbacks failed
	panic   *PanicError // a panic to re-raise
	payload any         // per-record state of Compare and Predict
}

// Sink receives the replicates of a streamed run (see [Options.Sink]).
// Receive is called once per delivered replicate, never concurrently, on
// the goroutine that called the run, in the [Order] asked for. If it
// returns an error the run stops and returns a *[StopError] wrapping it.
type Sink interface {
	Receive(rec *Record) error
}

// SinkFunc adapts an ordinary function to the [Sink] interface.
type SinkFunc func(rec *Record) error

// Receive calls f(rec).
func (f SinkFunc) Receive(rec *Record) error { return f(rec) }
