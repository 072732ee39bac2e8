package features

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"time"
)

// encoderFormat and encoderVersion identify the JSON written by
// MarshalEncoder.
const (
	encoderFormat  = "kalends features encoder"
	encoderVersion = 1
)

// ErrEncoderFormat is wrapped by the errors of [UnmarshalEncoder] for data
// that is not a serialised encoder of a version this build reads.
var ErrEncoderFormat = errors.New("features: not a serialised encoder of a known version")

// MarshalEncoder serialises an [Encoder] learned by a [Set], or by a
// [Join] of Sets, as versioned JSON, so that the learned state (the levels
// seen, the trend origin, the location) can be shipped to other processes
// or machines and applied there with [UnmarshalEncoder]. The decoded
// encoder makes the same columns, with the same names and bit-identical
// values, as e.
//
// The location is recorded by name: nil (each date's own location), "UTC",
// or a name that time.LoadLocation resolves, which the reading side must
// resolve too (its time zone database, or the time/tzdata package). A
// location that has no such name (time.Local, a time.FixedZone) is an
// error; so is an Encoder of any other kind (holiday columns, say).
//
// # Format
//
// The JSON object has the members "format" ("kalends features encoder"),
// "version" (1) and "encoder". An encoder is an object with "kind"
// "calendar" or "join". A calendar has "location", "zero_unseen",
// "parts" (in column order, each with "part" and "encoding" named as by
// [Part.String] and [Encoding.String], and for indicator parts "levels",
// the levels that have a column in ascending order, and "reference", the
// level left out or ""), "trend" (null, or "unit" and "origin", the
// origin in the trend's unit: days since 1970-01-01 with the clock time
// as a fraction, or the calendar year with the elapsed fraction of it),
// "date" and "columns", the column names, which the reader checks. A join
// has "members", a list of encoders. Members that are false, empty or
// null are left out.
//
// The version promise: a reader accepts exactly the versions it knows and
// rejects any other, and unknown members, with an error (it never
// misreads them); within a version the layout and the meaning of every
// member stay as described. A change gets a new version number.
func MarshalEncoder(e Encoder) ([]byte, error) {
	enc, err := encodeEncoder(e)
	if err != nil {
		return nil, err
	}
	return json.MarshalIndent(encoderFile{Format: encoderFormat, Version: encoderVersion, Encoder: enc}, "", "  ")
}

// UnmarshalEncoder decodes an encoder written by [MarshalEncoder]. It
// returns an error wrapping [ErrEncoderFormat] for malformed JSON, another
// format or version, an unknown member, a part, encoding, level or unit it
// does not know, levels out of order, columns that do not match the parts,
// or a location that time.LoadLocation cannot resolve here.
func UnmarshalEncoder(data []byte) (Encoder, error) {
	var head struct {
		Format  string `json:"format"`
		Version int    `json:"version"`
	}
	if err := json.Unmarshal(data, &head); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrEncoderFormat, err)
	}
	if head.Format != encoderFormat {
		return nil, fmt.Errorf("%w: format %q, want %q", ErrEncoderFormat, head.Format, encoderFormat)
	}
	if head.Version != encoderVersion {
		return nil, fmt.Errorf("%w: version %d, this build reads version %d", ErrEncoderFormat, head.Version, encoderVersion)
	}
	var f encoderFile
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&f); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrEncoderFormat, err)
	}
	if f.Encoder == nil {
		return nil, fmt.Errorf("%w: no encoder", ErrEncoderFormat)
	}
	e, err := decodeEncoder(f.Encoder, "encoder")
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrEncoderFormat, err)
	}
	return e, nil
}

type encoderFile struct {
	Format  string       `json:"format"`
	Version int          `json:"version"`
	Encoder *encoderJSON `json:"encoder"`
}

type encoderJSON struct {
	Kind string `json:"kind"`

	// calendar
	Location   *string        `json:"location,omitempty"`
	ZeroUnseen bool           `json:"zero_unseen,omitempty"`
	Parts      []partJSON     `json:"parts,omitempty"`
	Trend      *trendJSON     `json:"trend,omitempty"`
	Date       bool           `json:"date,omitempty"`
	Columns    []string       `json:"columns,omitempty"`
	Members    []*encoderJSON `json:"members,omitempty"`
}

type partJSON struct {
	Part      string   `json:"part"`
	Encoding  string   `json:"encoding"`
	Levels    []string `json:"levels,omitempty"`
	Reference string   `json:"reference,omitempty"`
}

type trendJSON struct {
	Unit   string  `json:"unit"`
	Origin float64 `json:"origin"`
}

func encodeEncoder(e Encoder) (*encoderJSON, error) {
	switch e := e.(type) {
	case *calendar:
		return encodeCalendar(e)
	case joinedEncoder:
		j := &encoderJSON{Kind: "join", Members: make([]*encoderJSON, len(e))}
		for k, m := range e {
			var err error
			if j.Members[k], err = encodeEncoder(m); err != nil {
				return nil, err
			}
		}
		return j, nil
	}
	return nil, fmt.Errorf("features: MarshalEncoder: cannot serialise an encoder of type %T (only those learned by Set and Join)", e)
}

func encodeCalendar(e *calendar) (*encoderJSON, error) {
	name := ""
	if e.loc != nil {
		name = e.loc.String()
		if e.loc == time.Local || name == "Local" {
			return nil, errors.New("features: MarshalEncoder: location time.Local has no portable name; use time.UTC or a location from time.LoadLocation")
		}
		if _, err := time.LoadLocation(name); err != nil {
			return nil, fmt.Errorf("features: MarshalEncoder: location %q cannot be loaded by name (a time.FixedZone?): %w", name, err)
		}
	}
	j := &encoderJSON{Kind: "calendar", Location: &name, ZeroUnseen: e.zeroUnseen, Columns: slices.Clone(e.names)}
	for _, jb := range e.jobs {
		switch jb.kind {
		case kindNumber, kindCyclic:
			enc := Number
			if jb.kind == kindCyclic {
				enc = Cyclic
			}
			j.Parts = append(j.Parts, partJSON{Part: jb.part.String(), Encoding: enc.String()})
		case kindIndicator:
			pj := partJSON{Part: jb.part.String(), Encoding: Indicator.String(), Levels: []string{}}
			for k, s := range jb.slot {
				v := int(jb.lo) + k
				switch {
				case s >= 0:
					pj.Levels = append(pj.Levels, jb.part.label(v))
				case s == slotReference:
					pj.Reference = jb.part.label(v)
				}
			}
			j.Parts = append(j.Parts, pj)
		case kindTrend:
			j.Trend = &trendJSON{Unit: e.unit.String(), Origin: e.origin}
		case kindDate:
			j.Date = true
		}
	}
	return j, nil
}

func decodeEncoder(j *encoderJSON, where string) (Encoder, error) {
	if j == nil {
		return nil, fmt.Errorf("%s: null", where)
	}
	switch j.Kind {
	case "calendar":
		if j.Members != nil {
			return nil, fmt.Errorf("%s: a calendar has no members", where)
		}
		return decodeCalendar(j, where)
	case "join":
		if j.Location != nil || j.ZeroUnseen || j.Parts != nil || j.Trend != nil || j.Date || j.Columns != nil {
			return nil, fmt.Errorf("%s: a join has only members", where)
		}
		if len(j.Members) == 0 {
			return nil, fmt.Errorf("%s: a join with no members", where)
		}
		es := make(joinedEncoder, len(j.Members))
		seen := make(map[string]bool)
		for k, m := range j.Members {
			e, err := decodeEncoder(m, fmt.Sprintf("%s.members[%d]", where, k))
			if err != nil {
				return nil, err
			}
			for _, name := range e.Names() {
				if seen[name] {
					return nil, fmt.Errorf("%s: column %q made twice", where, name)
				}
				seen[name] = true
			}
			es[k] = e
		}
		return es, nil
	}
	return nil, fmt.Errorf("%s: unknown kind %q", where, j.Kind)
}

func decodeCalendar(j *encoderJSON, where string) (*calendar, error) {
	s := Set{ZeroUnseen: j.ZeroUnseen, Date: j.Date}
	if j.Location == nil {
		return nil, fmt.Errorf("%s: no location", where)
	}
	switch name := *j.Location; name {
	case "":
	case "UTC":
		s.Location = time.UTC
	case "Local":
		return nil, fmt.Errorf("%s: location Local is not portable", where)
	default:
		loc, err := time.LoadLocation(name)
		if err != nil {
			return nil, fmt.Errorf("%s: location: %w", where, err)
		}
		s.Location = loc
	}
	for k, pj := range j.Parts {
		p, ok := parsePart(pj.Part)
		if !ok {
			return nil, fmt.Errorf("%s.parts[%d]: unknown part %q", where, k, pj.Part)
		}
		enc, ok := parseEncoding(pj.Encoding)
		if !ok {
			return nil, fmt.Errorf("%s.parts[%d]: unknown encoding %q", where, k, pj.Encoding)
		}
		if enc != Indicator && (pj.Levels != nil || pj.Reference != "") {
			return nil, fmt.Errorf("%s.parts[%d]: levels given for %v encoding", where, k, enc)
		}
		s.Parts = append(s.Parts, Spec{Part: p, Encoding: enc, Reference: pj.Reference})
	}
	if j.Trend != nil {
		u, ok := parseTrendUnit(j.Trend.Unit)
		if !ok {
			return nil, fmt.Errorf("%s.trend: unknown unit %q", where, j.Trend.Unit)
		}
		// compile needs an origin date; the learned origin replaces it.
		s.Trend = &Trend{Origin: time.Unix(0, 0).UTC(), Unit: u}
	}
	e, err := s.compile()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", where, err)
	}
	if j.Trend != nil {
		if o := j.Trend.Origin; math.IsNaN(o) || math.IsInf(o, 0) {
			return nil, fmt.Errorf("%s.trend: origin %v", where, j.Trend.Origin)
		}
		e.origin = j.Trend.Origin
	}
	for k := range e.jobs {
		jb := &e.jobs[k]
		if jb.kind != kindIndicator {
			continue
		}
		pj := j.Parts[jb.spec]
		lo, hi := jb.part.levelRange()
		seen := make([]bool, hi-lo+1)
		prev := lo - 1
		for _, label := range pj.Levels {
			v, ok := jb.part.parseLabel(label)
			if !ok {
				return nil, fmt.Errorf("%s.parts[%d]: %q is not a level of %v", where, jb.spec, label, jb.part)
			}
			if v <= prev {
				return nil, fmt.Errorf("%s.parts[%d]: levels not in ascending order at %q", where, jb.spec, label)
			}
			prev = v
			seen[v-lo] = true
		}
		if pj.Reference != "" {
			v, _ := jb.part.parseLabel(pj.Reference) // checked by compile
			if seen[v-lo] {
				return nil, fmt.Errorf("%s.parts[%d]: reference %q also listed as a level", where, jb.spec, pj.Reference)
			}
			seen[v-lo] = true
		}
		if !slices.Contains(seen, true) {
			return nil, fmt.Errorf("%s.parts[%d]: no levels", where, jb.spec)
		}
		if err := jb.learnLevels(seen, pj.Reference, jb.spec); err != nil {
			return nil, fmt.Errorf("%s: %w", where, err)
		}
	}
	e.layout()
	if !slices.Equal(e.names, j.Columns) {
		return nil, fmt.Errorf("%s: columns %q do not match the parts, which make %q", where, j.Columns, e.names)
	}
	return e, nil
}

func parsePart(s string) (Part, bool) {
	for p := Year; p <= LeapYear; p++ {
		if p.String() == s {
			return p, true
		}
	}
	return 0, false
}

func parseEncoding(s string) (Encoding, bool) {
	for e := Number; e <= Cyclic; e++ {
		if e.String() == s {
			return e, true
		}
	}
	return 0, false
}

func parseTrendUnit(s string) (TrendUnit, bool) {
	for _, u := range []TrendUnit{Days, Years} {
		if u.String() == s {
			return u, true
		}
	}
	return 0, false
}
