package planner

import (
	"fmt"
	"math"
	"strings"
	"time"

	"phasecast/ephem"
)

// MaxRunNights is the most nights a run holds, and the longest span in days
// from its first night to its last: 366 (a year, leap years included).
const MaxRunNights = 366

// NightPart is the part of an allocated night a run holds.
type NightPart string

// Night parts. Half nights are split at the middle of the dark time (between
// the evening and morning twilight of the run's twilight limit), common
// practice for shared telescope time.
const (
	PartFull   NightPart = "full"
	PartFirst  NightPart = "first"  // evening twilight to the middle of the dark time
	PartSecond NightPart = "second" // the middle of the dark time to morning twilight
)

// RunNight is one allocated night of a run: the local calendar date (in the
// run's zone) of the evening it begins, and the part held ("" = full).
type RunNight struct {
	Year  int
	Month time.Month
	Day   int
	Part  NightPart
}

// String reads "2026-03-14" or "2026-03-14:first".
func (n RunNight) String() string {
	s := fmt.Sprintf("%04d-%02d-%02d", n.Year, int(n.Month), n.Day)
	if n.Part != "" && n.Part != PartFull {
		s += ":" + string(n.Part)
	}
	return s
}

// part returns the part, "" read as full.
func (n RunNight) part() NightPart {
	if n.Part == "" {
		return PartFull
	}
	return n.Part
}

// NightsFrom returns n consecutive full nights starting on the evening of
// (year, month, day). n must be 1..MaxRunNights.
func NightsFrom(year int, month time.Month, day, n int) ([]RunNight, error) {
	if n < 1 || n > MaxRunNights {
		return nil, &ephem.InputError{Field: "nights", Value: fmt.Sprint(n), Accepted: fmt.Sprintf("1..%d nights", MaxRunNights)}
	}
	out := make([]RunNight, n)
	for i := range out {
		d := time.Date(year, month, day+i, 12, 0, 0, 0, time.UTC)
		out[i] = RunNight{Year: d.Year(), Month: d.Month(), Day: d.Day(), Part: PartFull}
	}
	return out, nil
}

// ParseRunNights reads a list of allocated nights separated by commas:
// each a local date YYYY-MM-DD (the evening the night begins), optionally
// followed by ":first" or ":second" for half a night
// ("2026-03-14,2026-03-15:second"). The list must be in date order without
// overlaps (see ValidateRunNights). The error names the item and what is
// accepted.
func ParseRunNights(s string) ([]RunNight, error) {
	var out []RunNight
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		date, part, hasPart := strings.Cut(item, ":")
		field := fmt.Sprintf("nights[%d]", i)
		y, m, d, err := ephem.ParseDate(date)
		if err != nil {
			return nil, &ephem.InputError{Field: field, Value: fmt.Sprintf("%q", ClipValue(item)),
				Accepted: "a date YYYY-MM-DD, optionally followed by :first or :second"}
		}
		n := RunNight{Year: y, Month: m, Day: d, Part: PartFull}
		if hasPart {
			switch NightPart(part) {
			case PartFirst, PartSecond, PartFull:
				n.Part = NightPart(part)
			default:
				return nil, &ephem.InputError{Field: field, Value: fmt.Sprintf("%q", ClipValue(item)),
					Accepted: "a date YYYY-MM-DD, optionally followed by :first or :second (half nights)"}
			}
		}
		out = append(out, n)
	}
	if err := ValidateRunNights(out); err != nil {
		return nil, err
	}
	return out, nil
}

// ValidateRunNights checks a list of nights: 1..MaxRunNights of them, real
// dates (years ephem.MinYear..ephem.MaxYear), known parts, in date order,
// no night given twice or overlapping (a full night and a half of the same
// date, or the same half twice; the first and second halves of one date
// may both be given), and at most MaxRunNights days from the first to the
// last. The error is an *ephem.InputError naming the night.
func ValidateRunNights(nights []RunNight) error {
	if len(nights) == 0 || len(nights) > MaxRunNights {
		return &ephem.InputError{Field: "nights", Value: fmt.Sprintf("%d nights", len(nights)), Accepted: fmt.Sprintf("1..%d nights", MaxRunNights)}
	}
	for i, n := range nights {
		field := fmt.Sprintf("nights[%d]", i)
		d := time.Date(n.Year, n.Month, n.Day, 12, 0, 0, 0, time.UTC)
		if n.Year < ephem.MinYear || n.Year > ephem.MaxYear || d.Year() != n.Year || d.Month() != n.Month || d.Day() != n.Day {
			return &ephem.InputError{Field: field, Value: n.String(), Accepted: fmt.Sprintf("a calendar date in the years %d..%d", ephem.MinYear, ephem.MaxYear)}
		}
		switch n.part() {
		case PartFull, PartFirst, PartSecond:
		default:
			return &ephem.InputError{Field: field + ".part", Value: fmt.Sprintf("%q", string(n.Part)), Accepted: "full, first or second"}
		}
		if i == 0 {
			continue
		}
		p := nights[i-1]
		pd := time.Date(p.Year, p.Month, p.Day, 12, 0, 0, 0, time.UTC)
		switch {
		case d.Before(pd):
			return &ephem.InputError{Field: field, Value: n.String(),
				Accepted: fmt.Sprintf("a night after nights[%d] (%s): list the nights in date order", i-1, p)}
		case d.Equal(pd) && !(p.part() == PartFirst && n.part() == PartSecond):
			return &ephem.InputError{Field: field, Value: n.String(),
				Accepted: fmt.Sprintf("a night that does not overlap nights[%d] (%s): one date holds a full night, or its first and then its second half", i-1, p)}
		}
	}
	first, last := nights[0], nights[len(nights)-1]
	fd := time.Date(first.Year, first.Month, first.Day, 12, 0, 0, 0, time.UTC)
	ld := time.Date(last.Year, last.Month, last.Day, 12, 0, 0, 0, time.UTC)
	if days := ld.Sub(fd).Hours() / 24; days > MaxRunNights {
		return &ephem.InputError{Field: fmt.Sprintf("nights[%d]", len(nights)-1), Value: last.String(),
			Accepted: fmt.Sprintf("a night at most %d days after the first (%s)", MaxRunNights, first)}
	}
	return nil
}

// RunRequest is a run of nights to plan at one site.
type RunRequest struct {
	Site ephem.Site
	// Zone is the site's time zone: the nights are local dates, each from
	// local noon to the next local noon (NightWindow). nil means UTC.
	Zone        *time.Location
	Nights      []RunNight
	Targets     []Target
	Constraints Constraints
	// Options are the night planner's options for every night.
	Options Options
	// Instrument, when set, sizes S/N goals' exposures as the night
	// planner does (NightRequest.Instrument), each occurrence once for both
	// the best-night search and the night's schedule.
	Instrument *Instrument
	// Bins, when 2..MaxBins, adds phase-bin counts to the coverage; 0 means
	// none.
	Bins int
	// Observed are the exposures actually taken (from a log, ParseObservedCSV,
	// or from marked blocks, RunPlan.Replan). They must fall in the first
	// Past nights.
	Observed []Exposure
	// Past is the number of nights already over (0..len(Nights)): they are
	// not planned, and what they contribute to the coverage is Observed.
	Past int
	// Rounds bounds the optimizer's improvement rounds after the greedy
	// pass: 0 means the default (2), a negative value none.
	Rounds int
	// CompareIndependent also plans every remaining night on its own, as
	// PlanNight does (no knowledge of the other nights), and reports that
	// schedule's run objective in RunPlan.IndependentValue.
	CompareIndependent bool
}

// MaxBins is the most phase bins a coverage report takes.
const MaxBins = 100

// runWindow returns the full-night planning window of night n in zone loc,
// as UTC Unix seconds: local noon to the next local noon (NightWindow); a
// half night is cut from it by leanBase.nightBounds.
func runWindow(n RunNight, loc *time.Location) (from, to float64) {
	f, t := NightWindow(n.Year, n.Month, n.Day, loc)
	return unixSec(f), unixSec(t)
}

// halfSplit returns the instant (Unix seconds) that splits the night
// [from, to] into halves: the middle of its dark time under base's
// twilight (to the second), or of [from, to] when it has no dark time.
func (b *leanBase) halfSplit(from, to float64) float64 {
	full := b.night(from, to)
	if len(full.dark) == 0 {
		return math.Round(0.5 * (from + to))
	}
	return math.Round(0.5 * (full.dark[0].lo + full.dark[len(full.dark)-1].hi))
}

// nightBounds returns the planning window of each night (Unix seconds):
// local noon to local noon in loc, half nights split by halfSplit.
func (b *leanBase) nightBounds(nights []RunNight, loc *time.Location) (from, to []float64) {
	from, to = make([]float64, len(nights)), make([]float64, len(nights))
	for k, n := range nights {
		from[k], to[k] = runWindow(n, loc)
		switch n.part() {
		case PartFirst:
			to[k] = b.halfSplit(from[k], to[k])
		case PartSecond:
			from[k] = b.halfSplit(from[k], to[k])
		}
	}
	return from, to
}

// RunNightWindows returns the planning window (UTC) of each night of a run
// as PlanRun uses it: local noon to the next local noon in zone (nil: UTC),
// a half night ending or starting at the middle of the dark time under the
// constraints' twilight. Bad input gives an *ephem.InputError.
func RunNightWindows(site ephem.Site, zone *time.Location, c Constraints, nights []RunNight) ([]Interval, error) {
	if err := ValidateRunNights(nights); err != nil {
		return nil, err
	}
	base, err := newLeanBase(site, c, Options{})
	if err != nil {
		return nil, err
	}
	if zone == nil {
		zone = time.UTC
	}
	from, to := base.nightBounds(nights, zone)
	out := make([]Interval, len(nights))
	for k := range out {
		out[k] = span{from[k], to[k]}.interval()
	}
	return out, nil
}
