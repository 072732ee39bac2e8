package inspect

import (
	"context"
	"sync"
)

// engine runs total replicates on a bounded pool and delivers their records
// on the caller's goroutine. It is shared by Run, Compare and Predict.
type engine struct {
	total       int
	first       int // replicates before first were delivered already, in order
	workers     int // ≥ 1
	buffer      int // reorder buffer when ordered
	ordered     bool
	progress    func(done, total int)
	stopOnError bool
}

// workFunc fills rec with replicate r. It runs on a worker goroutine (or the
// caller's when workers == 1) and must catch its own panics into rec.panic.
type workFunc func(ctx context.Context, r int, rec *Record)

type job struct {
	r   int
	rec *Record
}

// run runs every replicate and returns the number delivered. It re-raises
// a caught panic on the caller's goroutine after every worker has exited.
func (e *engine) run(ctx context.Context, newWork func() workFunc, newRecord func() *Record, deliver func(*Record) error) (int, error) {
	runCtx, cancel := context.WithCancel(ctx)
	defer cancel()

	var (
		delivered  = e.first
		cause      error
		pnc        *PanicError
		stopping   bool
		sinkFailed bool
		free       []*Record
	)
	stop := func(err error) {
		if cause == nil {
			cause = err
		}
		stopping = true
		cancel()
	}
	get := func() *Record {
		if k := len(free); k > 0 {
			rec := free[k-1]
			free = free[:k-1]
			return rec
		}
		return newRecord()
	}
	// finish reports whether a completed record may be delivered.
	finish := func(rec *Record) bool {
		if rec.panic != nil {
			if pnc == nil {
				pnc = rec.panic
			}
			stop(nil)
			return false
		}
		if rec.failed && e.stopOnError && cause == nil {
			stop(firstFailure(rec))
		}
		return true
	}
	deliverOne := func(rec *Record) {
		if sinkFailed || pnc != nil {
			return
		}
		err := deliver(rec)
		delivered++
		if e.progress != nil {
			e.progress(delivered, e.total)
		}
		if err != nil {
			sinkFailed = true
			stop(err)
		}
	}

	if e.workers == 1 {
		work := newWork()
		rec := newRecord()
		for r := e.first; r < e.total && !stopping; r++ {
			if err := ctx.Err(); err != nil {
				stop(err)
				break
			}
			reset(rec, r)
			work(runCtx, r, rec)
			if finish(rec) {
				deliverOne(rec)
			}
		}
	} else {
		jobs := make(chan job)
		done := make(chan *Record, e.workers)
		var wg sync.WaitGroup
		for range e.workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				work := newWork()
				for j := range jobs {
					work(runCtx, j.r, j.rec)
					done <- j.rec
				}
			}()
		}
		window := e.total
		var pending []*Record
		if e.ordered {
			window = e.buffer
			pending = make([]*Record, window)
		}
		next, inflight, nextOut := e.first, 0, e.first
		ctxDone := ctx.Done()
		var staged *Record
		for {
			var send chan job
			if !stopping && next < e.total && next < nextOut+window {
				if staged == nil {
					staged = get()
				}
				reset(staged, next)
				send = jobs
			}
			if send == nil && inflight == 0 {
				break
			}
			select {
			case send <- job{next, staged}:
				next++
				inflight++
				staged = nil
			case rec := <-done:
				inflight--
				if !finish(rec) {
					free = append(free, rec)
					continue
				}
				if !e.ordered {
					deliverOne(rec)
					free = append(free, rec)
					continue
				}
				pending[rec.Replicate%window] = rec
				for {
					p := pending[nextOut%window]
					if p == nil || p.Replicate != nextOut {
						break
					}
					pending[nextOut%window] = nil
					deliverOne(p)
					free = append(free, p)
					nextOut++
				}
			case <-ctxDone:
				ctxDone = nil
				stop(ctx.Err())
			}
		}
		close(jobs)
		wg.Wait()
	}

	if pnc != nil {
		panic(*pnc)
	}
	if cause != nil && (delivered < e.total || e.stopOnError && cause != ctx.Err()) {
		return delivered, &StopError{Finished: delivered, Total: e.total, Err: cause}
	}
	return delivered, nil
}

func reset(rec *Record, r int) {
	rec.Replicate = r
	rec.Err = nil
	rec.failed = false
	rec.panic = nil
}

// firstFailure returns the replicate's error or its first callback error.
func firstFailure(rec *Record) error {
	if rec.Err != nil {
		return rec.Err
	}
	for i, kb := range rec.keepers {
		if err := kb.errOf(rec.slots[i]); err != nil {
			return err
		}
	}
	if err, ok := rec.payload.(interface{ failure() error }); ok {
		return err.failure()
	}
	return nil
}
