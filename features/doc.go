// Package features turns dates into named numeric columns: calendar parts
// (year, month, ISO week, weekday, ...) in plain, indicator or cyclic
// encodings, a trend, and the [Table] type that carries columns through the
// whole of kalends. A feature set ([Builder], such as [Set]) learns its
// state from the rows it is given and applies it unchanged to any others,
// so a resampling run can learn on in-bag rows and apply to out-of-bag rows
// without leakage. Dates are read as civil dates in [Set.Location], by
// default each value's own location, for years 1 to 9999; a zero
// time.Time, a year outside that range or an indicator level Learn never
// saw is an error naming the 1-based row ([DateError]).
//
// # Column names
//
// A part as a [Number] is named by [Part.String] ("month", "isoweek",
// "weekend"); as [Indicator] columns by the part, "=" and the level
// ("month=March", "weekday=Sunday", "year=2019", "isoweek=53"); as
// [Cyclic] by the part with ".sin" and ".cos" ("yearday.sin"). The trend
// is "trend.days" or "trend.years" and the date itself "date". These names
// are stable: they do not change between releases.
package features
