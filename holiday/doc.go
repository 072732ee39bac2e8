// Package holiday gives the public holidays of a country or region, or of
// a calendar declared as data, and turns them into design columns: an
// indicator per holiday on its actual or observed date, any-holiday,
// windows before and after, capped days until and since, bridge and
// business days. [Columns] is a [features.Builder], so these join the
// calendar parts of package features in one design; by default it learns
// its columns from the calendar, never from the rows, so in-bag and
// out-of-bag designs match (with Seen, only the holidays the rows meet get
// a column of their own). A holiday coefficient is an association between
// the day and the outcome in your data, not the effect the holiday causes.
//
// # Coverage and limits
//
// Ready-made calendars ([Country], [Codes]) wrap every list of
// github.com/rickar/cal/v2 v2.1.26: 46 national lists, 8 Australian
// states and territories (there is no national AU list), 16 German Länder,
// 26 Swiss cantons, and the European Central Bank's TARGET closing days
// ("ECB"). Package aa of rickar/cal holds only building blocks and is not
// offered. The lists are volunteer-maintained: GB is England and Wales only
// (no Scotland or Northern Ireland), US is federal holidays only, most
// rules have no start year and so give dates for years before the holiday
// existed, and a one-off day exists only if someone added it. Where we
// checked a list against its published source and found it wrong we
// correct it in this package (see corrections.go; each is tested); add
// what is missing with [New] and [Combine]. Weekends are Saturday and
// Sunday for every calendar.
//
// # Validity
//
// Every calendar covers MinYear…MaxYear (1900–2149); dates outside give a
// [*DateError]. Easter is computed with Meeus' algorithms ([Easter],
// [OrthodoxEaster]) valid in every year, and rickar/cal's Orthodox dates,
// which are right only for 1900–2099, are recomputed outside those years.
// Japan's equinox days follow rickar/cal's formula, valid 1851–2150.
// rickar/cal returns dates at midnight in its package variable
// cal.DefaultLoc; we keep only their year, month and day, so any
// location works, but do not change cal.DefaultLoc while calendars are
// being built.
//
// # Concurrency
//
// Calendars and encoders are immutable once built and safe for concurrent
// use. Each calendar computes all its years once, on first use, in one
// goroutine (under a sync.Once) and answers per-date questions from
// arrays indexed by day. It works on private copies of rickar/cal's
// holidays, never on the shared package variables, so the data race in
// rickar/cal's jp.VernalEquinoxDay cannot occur through this package.
package holiday

import "github.com/kalends/kalends/features"

var _ features.Builder = Columns{}
