package holiday

// Adaptive reports whether the columns Learn makes depend on the dates it
// is given: only when Seen is set. Otherwise Learn takes the holidays from
// the calendar, never from the dates (see [Columns]), so the encoder
// learned from any selection of valid dates makes the same columns with
// the same values. It implements features.Adaptive.
func (c Columns) Adaptive() bool { return c.Seen }
