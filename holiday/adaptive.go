package holiday

// Adaptive reports false: Learn takes the holidays from the calendar, never
// from the dates it is given (see [Columns]), so the encoder learned from
// any selection of valid dates makes the same columns with the same values.
// It implements features.Adaptive.
func (Columns) Adaptive() bool { return false }
