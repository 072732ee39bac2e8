package main

import (
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/holiday"
)

// quizDesign is the model fitted to the broadcasts: an intercept, the
// annual season as the sine and cosine of the month, a trend in years since
// 1 January 2011, and an indicator for the day off of each holiday of gb.
// It has the same form as the process that made the data, so the true
// effects are the coefficients it estimates.
func quizDesign(gb holiday.Calendar) features.Builder {
	return features.Join(
		features.Intercept{},
		features.Set{
			Parts: []features.Spec{{Part: features.Month, Encoding: features.Cyclic}},
			Trend: &features.Trend{Origin: time.Date(firstYear, 1, 1, 0, 0, 0, 0, time.UTC), Unit: features.Years},
		},
		holiday.Columns{Calendar: gb, Each: holiday.Parts{Indicator: true}},
	)
}
