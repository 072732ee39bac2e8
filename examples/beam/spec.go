package main

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/kalends/kalends/features"
	"github.com/kalends/kalends/fit"
	"gonum.org/v1/gonum/mat"
)

// specVersion is the version of the Spec JSON this program reads and writes.
const specVersion = 1

// Spec is everything learned beforehand, on the machine that launches the
// pipeline, and shipped to the workers: the input's layout, the learned
// feature set (in the versioned JSON of features.MarshalEncoder) and the
// standardization every shard's accumulator must share. It is written as
// JSON so that it can be kept beside the results.
type Spec struct {
	Version int `json:"version"`
	// Header is the input's CSV header; every input line has these fields
	// in this order, and lines equal to the header are skipped.
	Header []string `json:"header"`
	// Key names the column whose value identifies a row; a row's
	// Poisson counts are a function of (seed, replicate, RowKey(value)).
	// Values must be unique across the whole input.
	Key string `json:"key"`
	// Date names the date column, written as YYYY-MM-DD (read in UTC).
	Date string `json:"date"`
	// Outcome names the outcome column, Extra the other numeric columns
	// appended to the design after the calendar columns.
	Outcome string   `json:"outcome"`
	Extra   []string `json:"extra"`
	// Features is the learned feature set.
	Features json.RawMessage `json:"features"`
	// Columns names the design columns: "intercept", the feature set's
	// columns, then Extra.
	Columns []string `json:"columns"`
	// Standardization is the change of units of the accumulators, learned
	// on the same rows as the feature set.
	Standardization fit.Standardization `json:"standardization"`
}

// Row is one input row, parsed.
type Row struct {
	ID      string    // the key column's value
	Key     uint64    // RowKey(ID)
	Day     time.Time // the date, UTC midnight
	Outcome float64
	Extra   []float64
}

// RowKey is the key from which a row's Poisson counts are derived: the
// 64-bit FNV-1a hash of the key column's value. It depends on nothing but
// the value, so how the input is split into files, bundles or shards
// changes no count.
func RowKey(id string) uint64 {
	h := fnv.New64a()
	h.Write([]byte(id))
	return h.Sum64()
}

// calendarSet is the example's feature set: weekday indicators with
// Tuesday left out (the theatre is dark on Mondays, so Monday is never
// seen), the month as a sine and cosine, and a trend in years from the
// first date learned on.
func calendarSet(origin time.Time) features.Set {
	return features.Set{
		Parts: []features.Spec{
			{Part: features.Weekday, Encoding: features.Indicator, Reference: "Tuesday"},
			{Part: features.Month, Encoding: features.Cyclic},
		},
		Trend:    &features.Trend{Origin: origin, Unit: features.Years},
		Location: time.UTC,
	}
}

// parser reads input lines laid out as a Spec says.
type parser struct {
	header               string
	width                int
	key, date, outcome   int
	extra                []int
	keyName, outcomeName string
	extraNames           []string
}

func newParser(header []string, key, date, outcome string, extra []string) (*parser, error) {
	p := &parser{header: strings.Join(header, ","), width: len(header), keyName: key, outcomeName: outcome, extraNames: extra}
	find := func(name string) (int, error) {
		i := slices.Index(header, name)
		if i < 0 {
			return 0, fmt.Errorf("column %q not in the header %q", name, p.header)
		}
		return i, nil
	}
	var err error
	if p.key, err = find(key); err != nil {
		return nil, err
	}
	if p.date, err = find(date); err != nil {
		return nil, err
	}
	if p.outcome, err = find(outcome); err != nil {
		return nil, err
	}
	for _, name := range extra {
		i, err := find(name)
		if err != nil {
			return nil, err
		}
		p.extra = append(p.extra, i)
	}
	return p, nil
}

// errHeader marks a header line.
var errHeader = errors.New("header line")

// parse parses one CSV line. It returns errHeader for the header line
// and otherwise an error naming the row by its key (or quoting the line
// when there is no key) and the column.
func (p *parser) parse(line string) (Row, error) {
	line = strings.TrimSuffix(line, "\r")
	if line == p.header {
		return Row{}, errHeader
	}
	r := csv.NewReader(strings.NewReader(line))
	r.FieldsPerRecord = p.width
	fields, err := r.Read()
	if err != nil {
		if err == io.EOF {
			err = errors.New("empty line")
		}
		return Row{}, fmt.Errorf("line %q: %w", line, err)
	}
	row := Row{ID: fields[p.key], Key: RowKey(fields[p.key])}
	if row.ID == "" {
		return Row{}, fmt.Errorf("line %q: empty %s", line, p.keyName)
	}
	where := func(col string) string { return fmt.Sprintf("row %s=%s: column %s", p.keyName, row.ID, col) }
	if row.Day, err = time.Parse(time.DateOnly, fields[p.date]); err != nil {
		return Row{}, fmt.Errorf("%s: %w", where("date"), err)
	}
	num := func(i int, name string) (float64, error) {
		v, err := strconv.ParseFloat(fields[i], 64)
		if err != nil {
			return 0, fmt.Errorf("%s: %w", where(name), err)
		}
		return v, nil
	}
	if row.Outcome, err = num(p.outcome, p.outcomeName); err != nil {
		return Row{}, err
	}
	row.Extra = make([]float64, len(p.extra))
	for k, i := range p.extra {
		if row.Extra[k], err = num(i, p.extraNames[k]); err != nil {
			return Row{}, err
		}
	}
	return row, nil
}

// readRows parses a whole CSV file whose first line is its header.
func readRows(r io.Reader, key, date, outcome string, extra []string) ([]string, []Row, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, nil, err
	}
	lines := strings.Split(strings.TrimRight(string(data), "\n"), "\n")
	header := strings.Split(strings.TrimSuffix(lines[0], "\r"), ",")
	p, err := newParser(header, key, date, outcome, extra)
	if err != nil {
		return nil, nil, err
	}
	var rows []Row
	for _, line := range lines[1:] {
		row, err := p.parse(line)
		if err == errHeader {
			continue
		}
		if err != nil {
			return nil, nil, err
		}
		rows = append(rows, row)
	}
	return header, rows, nil
}

// design builds the design (intercept, calendar columns, extra columns)
// and the outcome of rows with the encoder e.
func design(e features.Encoder, rows []Row) (*mat.Dense, []float64, error) {
	if len(rows) == 0 {
		return nil, nil, errors.New("no rows")
	}
	dates := make([]time.Time, len(rows))
	for i, r := range rows {
		dates[i] = r.Day
	}
	tab, err := features.Apply(e, dates)
	if err != nil {
		var de *features.DateError
		if errors.As(err, &de) && de.Row >= 1 && de.Row <= len(rows) {
			return nil, nil, fmt.Errorf("row %s: %w", rows[de.Row-1].ID, err)
		}
		return nil, nil, err
	}
	p := 1 + tab.Width() + len(rows[0].Extra)
	x := mat.NewDense(len(rows), p, nil)
	y := make([]float64, len(rows))
	for i, r := range rows {
		x.Set(i, 0, 1)
		for j := range tab.Width() {
			x.Set(i, 1+j, tab.At(i, j))
		}
		for k, v := range r.Extra {
			x.Set(i, 1+tab.Width()+k, v)
		}
		y[i] = r.Outcome
	}
	return x, y, nil
}

// Learn learns a Spec from rows read from a file with the given header:
// the feature set (trend origin at the earliest date) and the
// standardization.
func Learn(header []string, rows []Row, key, date, outcome string, extra []string) (*Spec, error) {
	if len(rows) == 0 {
		return nil, errors.New("learn: no rows")
	}
	dates := make([]time.Time, len(rows))
	origin := rows[0].Day
	for i, r := range rows {
		dates[i] = r.Day
		if r.Day.Before(origin) {
			origin = r.Day
		}
	}
	enc, err := calendarSet(origin).Learn(dates)
	if err != nil {
		return nil, fmt.Errorf("learn: %w", err)
	}
	fj, err := features.MarshalEncoder(enc)
	if err != nil {
		return nil, fmt.Errorf("learn: %w", err)
	}
	x, y, err := design(enc, rows)
	if err != nil {
		return nil, fmt.Errorf("learn: %w", err)
	}
	std, err := fit.LearnStandardization(x, y, nil)
	if err != nil {
		return nil, fmt.Errorf("learn: %w", err)
	}
	cols := append(append([]string{"intercept"}, enc.Names()...), extra...)
	return &Spec{Version: specVersion, Header: header, Key: key, Date: date, Outcome: outcome, Extra: extra,
		Features: fj, Columns: cols, Standardization: std}, nil
}

// ReadSpec decodes a Spec written as JSON and checks that its parts fit
// together.
func ReadSpec(data []byte) (*Spec, error) {
	var s Spec
	if err := json.Unmarshal(data, &s); err != nil {
		return nil, fmt.Errorf("spec: %w", err)
	}
	if s.Version != specVersion {
		return nil, fmt.Errorf("spec: version %d, this program reads version %d", s.Version, specVersion)
	}
	if _, err := s.parser(); err != nil {
		return nil, err
	}
	e, err := s.encoder()
	if err != nil {
		return nil, err
	}
	if want := 1 + len(e.Names()) + len(s.Extra); len(s.Columns) != want {
		return nil, fmt.Errorf("spec: %d column names for %d design columns", len(s.Columns), want)
	}
	if len(s.Standardization.Centre) != len(s.Columns) {
		return nil, fmt.Errorf("spec: standardization of %d columns for %d design columns", len(s.Standardization.Centre), len(s.Columns))
	}
	return &s, nil
}

func (s *Spec) parser() (*parser, error) {
	p, err := newParser(s.Header, s.Key, s.Date, s.Outcome, s.Extra)
	if err != nil {
		return nil, fmt.Errorf("spec: %w", err)
	}
	return p, nil
}

func (s *Spec) encoder() (features.Encoder, error) {
	e, err := features.UnmarshalEncoder(s.Features)
	if err != nil {
		return nil, fmt.Errorf("spec: %w", err)
	}
	return e, nil
}

// specJSON writes s as indented JSON.
func specJSON(s *Spec) ([]byte, error) {
	data, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(data, '\n'), nil
}
