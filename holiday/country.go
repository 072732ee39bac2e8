package holiday

import (
	"fmt"
	"slices"
	"strings"

	"github.com/rickar/cal/v2"
	"github.com/rickar/cal/v2/ar"
	"github.com/rickar/cal/v2/at"
	"github.com/rickar/cal/v2/au"
	"github.com/rickar/cal/v2/be"
	"github.com/rickar/cal/v2/bg"
	"github.com/rickar/cal/v2/br"
	"github.com/rickar/cal/v2/ca"
	"github.com/rickar/cal/v2/ch"
	"github.com/rickar/cal/v2/cy"
	"github.com/rickar/cal/v2/cz"
	"github.com/rickar/cal/v2/de"
	"github.com/rickar/cal/v2/dk"
	"github.com/rickar/cal/v2/ecb"
	"github.com/rickar/cal/v2/ee"
	"github.com/rickar/cal/v2/es"
	"github.com/rickar/cal/v2/fi"
	"github.com/rickar/cal/v2/fr"
	"github.com/rickar/cal/v2/gb"
	"github.com/rickar/cal/v2/gr"
	"github.com/rickar/cal/v2/hr"
	"github.com/rickar/cal/v2/hu"
	"github.com/rickar/cal/v2/ie"
	"github.com/rickar/cal/v2/is"
	"github.com/rickar/cal/v2/it"
	"github.com/rickar/cal/v2/jp"
	"github.com/rickar/cal/v2/ke"
	"github.com/rickar/cal/v2/lt"
	"github.com/rickar/cal/v2/lu"
	"github.com/rickar/cal/v2/lv"
	"github.com/rickar/cal/v2/mt"
	"github.com/rickar/cal/v2/mw"
	"github.com/rickar/cal/v2/mx"
	"github.com/rickar/cal/v2/nc"
	"github.com/rickar/cal/v2/nl"
	"github.com/rickar/cal/v2/no"
	"github.com/rickar/cal/v2/nz"
	"github.com/rickar/cal/v2/pl"
	"github.com/rickar/cal/v2/pt"
	"github.com/rickar/cal/v2/ro"
	"github.com/rickar/cal/v2/rs"
	"github.com/rickar/cal/v2/ru"
	"github.com/rickar/cal/v2/se"
	"github.com/rickar/cal/v2/si"
	"github.com/rickar/cal/v2/sk"
	"github.com/rickar/cal/v2/th"
	"github.com/rickar/cal/v2/ua"
	"github.com/rickar/cal/v2/us"
	"github.com/rickar/cal/v2/za"
)

// regions lists every holiday list that rickar/cal v2.1.26 exports, by
// code: ISO 3166-1 alpha-2 for national lists, ISO 3166-2 for the
// Australian states and territories, German Länder and Swiss cantons.
// "ECB" is the European Central Bank's list of TARGET closing days (not a
// country). Package aa has no list: it holds building blocks without
// weekend rules that the country packages clone, so it is not offered.
// Australia has no national list in rickar/cal, so "AU" alone is unknown.
var regions = []struct {
	code string
	list []*cal.Holiday
}{
	{"AR", ar.Holidays},
	{"AT", at.Holidays},
	{"AU-ACT", au.HolidaysACT},
	{"AU-NSW", au.HolidaysNSW},
	{"AU-NT", au.HolidaysNT},
	{"AU-QLD", au.HolidaysQLD},
	{"AU-SA", au.HolidaysSA},
	{"AU-TAS", au.HolidaysTAS},
	{"AU-VIC", au.HolidaysVIC},
	{"AU-WA", au.HolidaysWA},
	{"BE", be.Holidays},
	{"BG", bg.Holidays},
	{"BR", br.Holidays},
	{"CA", ca.Holidays},
	{"CH", ch.Holidays},
	{"CH-AG", ch.HolidaysAG},
	{"CH-AI", ch.HolidaysAI},
	{"CH-AR", ch.HolidaysAR},
	{"CH-BE", ch.HolidaysBE},
	{"CH-BL", ch.HolidaysBL},
	{"CH-BS", ch.HolidaysBS},
	{"CH-FR", ch.HolidaysFR},
	{"CH-GE", ch.HolidaysGE},
	{"CH-GL", ch.HolidaysGL},
	{"CH-GR", ch.HolidaysGR},
	{"CH-JU", ch.HolidaysJU},
	{"CH-LU", ch.HolidaysLU},
	{"CH-NE", ch.HolidaysNE},
	{"CH-NW", ch.HolidaysNW},
	{"CH-OW", ch.HolidaysOW},
	{"CH-SG", ch.HolidaysSG},
	{"CH-SH", ch.HolidaysSH},
	{"CH-SO", ch.HolidaysSO},
	{"CH-SZ", ch.HolidaysSZ},
	{"CH-TG", ch.HolidaysTG},
	{"CH-TI", ch.HolidaysTI},
	{"CH-UR", ch.HolidaysUR},
	{"CH-VD", ch.HolidaysVD},
	{"CH-VS", ch.HolidaysVS},
	{"CH-ZG", ch.HolidaysZG},
	{"CH-ZH", ch.HolidaysZH},
	{"CY", cy.Holidays},
	{"CZ", cz.Holidays},
	{"DE", de.Holidays},
	{"DE-BB", de.HolidaysBB},
	{"DE-BE", de.HolidaysBE},
	{"DE-BW", de.HolidaysBW},
	{"DE-BY", de.HolidaysBY},
	{"DE-HB", de.HolidaysHB},
	{"DE-HE", de.HolidaysHE},
	{"DE-HH", de.HolidaysHH},
	{"DE-MV", de.HolidaysMV},
	{"DE-NI", de.HolidaysNI},
	{"DE-NW", de.HolidaysNW},
	{"DE-RP", de.HolidaysRP},
	{"DE-SH", de.HolidaysSH},
	{"DE-SL", de.HolidaysSL},
	{"DE-SN", de.HolidaysSN},
	{"DE-ST", de.HolidaysST},
	{"DE-TH", de.HolidaysTH},
	{"DK", dk.Holidays},
	{"ECB", ecb.Holidays},
	{"EE", ee.Holidays},
	{"ES", es.Holidays},
	{"FI", fi.Holidays},
	{"FR", fr.Holidays},
	{"GB", gb.Holidays},
	{"GR", gr.Holidays},
	{"HR", hr.Holidays},
	{"HU", hu.Holidays},
	{"IE", ie.Holidays},
	{"IS", is.Holidays},
	{"IT", it.Holidays},
	{"JP", jp.Holidays},
	{"KE", ke.Holidays},
	{"LT", lt.Holidays},
	{"LU", lu.Holidays},
	{"LV", lv.Holidays},
	{"MT", mt.Holidays},
	{"MW", mw.Holidays},
	{"MX", mx.Holidays},
	{"NC", nc.Holidays},
	{"NL", nl.Holidays},
	{"NO", no.Holidays},
	{"NZ", nz.Holidays},
	{"PL", pl.Holidays},
	{"PT", pt.Holidays},
	{"RO", ro.Holidays},
	{"RS", rs.Holidays},
	{"RU", ru.Holidays},
	{"SE", se.Holidays},
	{"SI", si.Holidays},
	{"SK", sk.Holidays},
	{"TH", th.Holidays},
	{"UA", ua.Holidays},
	{"US", us.Holidays},
	{"ZA", za.Holidays},
}

// orthodoxCountries use Orthodox Easter for their movable holidays.
var orthodoxCountries = map[string]bool{"BG": true, "CY": true, "GR": true, "RO": true, "RS": true, "UA": true}

// countries maps each code to its calendar, made once at start-up.
var countries = func() map[string]*Almanac {
	m := make(map[string]*Almanac, len(regions))
	for _, r := range regions {
		srcs := patch(r.code, snapshot(r.list))
		orthodox := orthodoxCountries[strings.SplitN(r.code, "-", 2)[0]]
		m[r.code] = &Almanac{code: r.code, compute: func() [][]Holiday {
			// compute runs once, inside the Almanac's sync.Once.
			if orthodox {
				markOrthodox(srcs)
			}
			return computeYears(srcs, firstYear, lastYear)
		}}
	}
	return m
}()

// Codes returns the codes accepted by [Country], sorted.
func Codes() []string {
	out := make([]string, 0, len(countries))
	for c := range countries {
		out = append(out, c)
	}
	slices.Sort(out)
	return out
}

// Country returns the ready-made calendar for an ISO 3166-1 alpha-2
// country code ("US", "GB", "FR") or, for regional lists, an ISO 3166-2
// subdivision code ("DE-BY", "AU-NSW", "CH-ZH"); see [Codes]. Codes are
// case-insensitive. The same *Almanac is returned on every call. An
// unknown code gives an error matching [ErrUnknownCode] that lists the
// regional codes when only those exist (as for "AU").
func Country(code string) (*Almanac, error) {
	c := strings.ToUpper(strings.TrimSpace(code))
	if a, ok := countries[c]; ok {
		return a, nil
	}
	var subs, related, national []string
	country, _, regional := strings.Cut(c, "-")
	for _, k := range Codes() {
		switch {
		case strings.HasPrefix(k, c+"-"):
			subs = append(subs, k)
		case regional && (k == country || strings.HasPrefix(k, country+"-")):
			related = append(related, k)
		case !strings.Contains(k, "-"):
			national = append(national, k)
		}
	}
	switch {
	case len(subs) > 0:
		return nil, fmt.Errorf("%w: %q has regional calendars only: %s", ErrUnknownCode, code, strings.Join(subs, ", "))
	case len(related) > 0:
		return nil, fmt.Errorf("%w: %q; the calendars of %s are %s", ErrUnknownCode, code, country, strings.Join(related, ", "))
	}
	return nil, fmt.Errorf("%w: %q; the national calendars are %s (ECB: the European Central Bank), and regional ones are written like DE-BY or AU-NSW (holiday.Codes lists all)",
		ErrUnknownCode, code, strings.Join(national, ", "))
}
