package resample

// Jackknife is the delete-one jackknife: replicate i leaves row i out and
// keeps every other row once, so a plan over n rows has n replicates.
// Counts are 1 for every row but i, which has 0, and Out is [i]. It draws
// nothing: the seed is ignored.
//
// Its main use is the BCa acceleration, which is computed from the n
// leave-one-out estimates (Efron 1987; Efron & Tibshirani 1993, §14.3).
// Plan returns an error wrapping [ErrTooFewRows] for fewer than 2 rows.
// The zero value is ready to use.
type Jackknife struct{}

// Plan checks n and returns the n leave-one-out replicates.
func (Jackknife) Plan(n int, _ uint64) (Plan, error) {
	if err := checkRows("Jackknife", n); err != nil {
		return nil, err
	}
	if n < 2 {
		return nil, &InputError{Option: "Jackknife", Detail: "1 row, need at least 2", Err: ErrTooFewRows}
	}
	return jackknifePlan(n), nil
}

type jackknifePlan int

func (p jackknifePlan) Len() int { return int(p) }

func (p jackknifePlan) Split(r int, dst *Split) *Split {
	n := int(p)
	checkReplicate(r, n)
	dst = countsDst(dst, r, n)
	for i := range dst.Counts {
		dst.Counts[i] = 1
	}
	dst.Counts[r] = 0
	dst.Out = append(dst.Out, r)
	return dst
}
