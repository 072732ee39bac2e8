// Package features turns dates into named numeric columns: calendar parts
// (year, month, ISO week, weekday, ...) in plain, indicator or cyclic
// encodings, a trend, and the [Table] type that carries columns through the
// whole of kalends. A feature set ([Builder]) learns its state from the rows
// it is given and applies it unchanged to any others, so a resampling run
// can learn on in-bag rows and apply to out-of-bag rows without leakage.
package features
