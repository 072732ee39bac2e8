package holiday

import (
	"fmt"
	"hash/fnv"
	"strings"
	"unicode"
)

// translit maps lower-case letters outside ASCII to ASCII: Latin letters
// lose their diacritics (ß → ss, æ → ae, ø → o, þ → th, ð → d, ł → l),
// Greek and Cyrillic letters follow one fixed letter-by-letter table
// (θ → th, χ → ch, ж → zh, х → kh, щ → shch, ъ and ь are dropped). The
// table is part of the column-name contract: entries are only ever added.
var translit = map[rune]string{}

func init() {
	groups := []struct{ from, to string }{
		{"àáâãäåāăą", "a"}, {"çćĉċč", "c"}, {"ďđ", "d"}, {"èéêëēĕėęě", "e"}, {"ĝğġģ", "g"},
		{"ĥħ", "h"}, {"ìíîïĩīĭįı", "i"}, {"ĵ", "j"}, {"ķ", "k"}, {"ĺļľŀł", "l"}, {"ñńņňŉ", "n"},
		{"òóôõöøōŏő", "o"}, {"ŕŗř", "r"}, {"śŝşšș", "s"}, {"ţťŧț", "t"}, {"ùúûüũūŭůűų", "u"},
		{"ŵ", "w"}, {"ýÿŷ", "y"}, {"źżž", "z"},
		// Greek
		{"αά", "a"}, {"β", "v"}, {"γ", "g"}, {"δ", "d"}, {"εέ", "e"}, {"ζ", "z"}, {"ηή", "i"},
		{"θ", "th"}, {"ιίϊΐ", "i"}, {"κ", "k"}, {"λ", "l"}, {"μ", "m"}, {"ν", "n"}, {"ξ", "x"},
		{"οό", "o"}, {"π", "p"}, {"ρ", "r"}, {"σς", "s"}, {"τ", "t"}, {"υύϋΰ", "y"}, {"φ", "f"},
		{"χ", "ch"}, {"ψ", "ps"}, {"ωώ", "o"},
		// Cyrillic
		{"а", "a"}, {"б", "b"}, {"в", "v"}, {"гґ", "g"}, {"д", "d"}, {"её", "e"}, {"є", "ye"},
		{"ж", "zh"}, {"з", "z"}, {"иі", "i"}, {"ї", "yi"}, {"й", "i"}, {"ј", "j"}, {"к", "k"},
		{"л", "l"}, {"љ", "lj"}, {"м", "m"}, {"н", "n"}, {"њ", "nj"}, {"о", "o"}, {"п", "p"},
		{"р", "r"}, {"с", "s"}, {"т", "t"}, {"ћ", "c"}, {"ђ", "dj"}, {"у", "u"}, {"ф", "f"},
		{"х", "kh"}, {"ц", "ts"}, {"ч", "ch"}, {"џ", "dz"}, {"ш", "sh"}, {"щ", "shch"},
		{"ъь", ""}, {"ы", "y"}, {"э", "e"}, {"ю", "yu"}, {"я", "ya"},
	}
	for _, g := range groups {
		for _, r := range g.from {
			translit[r] = g.to
		}
	}
	for r, s := range map[rune]string{'ß': "ss", 'æ': "ae", 'œ': "oe", 'þ': "th", 'ð': "d", 'ĳ': "ij"} {
		translit[r] = s
	}
}

// Slug returns the column-safe form of a holiday name used in column
// names. The rule, which is stable:
//
//  1. the name is lower-cased; apostrophes (' and ’) are dropped;
//  2. ASCII letters and digits are kept, other letters are transliterated
//     to ASCII by a fixed table (accents removed: "Fête du Travail" →
//     "fete du travail"; Greek and Cyrillic letter by letter);
//  3. every run of other characters becomes one underscore, and leading
//     and trailing underscores are removed;
//  4. if a letter or digit had no transliteration (Thai script, say), the
//     result gets "_" and eight hex digits of the name's 32-bit FNV-1a hash
//     appended, and a result that would be empty or begin with a digit
//     gets the prefix "h_", so every name gives a non-empty identifier
//     that begins with a letter.
//
// So "New Year's Day" → "new_years_day", "Lundi de Pâques" →
// "lundi_de_paques", "AU-NSW: Labour Day" → "au_nsw_labour_day".
func Slug(name string) string {
	var b strings.Builder
	lossy, gap := false, false
	put := func(s string) {
		if gap && b.Len() > 0 {
			b.WriteByte('_')
		}
		gap = false
		b.WriteString(s)
	}
	for _, r := range strings.ToLower(name) {
		switch {
		case r == '\'' || r == '’':
		case r < 128 && (unicode.IsLetter(r) || unicode.IsDigit(r)):
			put(string(r))
		case translit[r] != "":
			put(translit[r])
		case r == 'ъ' || r == 'ь':
		case unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.Is(unicode.Mn, r) || unicode.Is(unicode.Mc, r):
			lossy, gap = true, true
		default:
			gap = true
		}
	}
	s := b.String()
	if lossy {
		h := fnv.New32a()
		h.Write([]byte(name))
		if s != "" {
			s += "_"
		}
		s += fmt.Sprintf("%08x", h.Sum32())
	}
	if s == "" || (s[0] >= '0' && s[0] <= '9') {
		s = "h_" + s
	}
	return s
}
