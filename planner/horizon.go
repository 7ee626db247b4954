package planner

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"phasecast/ephem"
)

// Horizon-mask limits accepted for a point: azimuth 0 ≤ az < 360° (from north
// through east), altitude −5..89° (refracted, apparent; a little below 0
// allows a sea horizon seen from a height).
const (
	horizonAltMinDeg = -5.0
	horizonAltMaxDeg = 89.0
)

// ValidateHorizon checks a horizon mask: every point finite, azimuth
// 0 ≤ az < 360°, altitude −5..89°, no azimuth given twice. An empty mask is
// valid (no mask). The error is an *ephem.InputError naming the point.
func ValidateHorizon(points []HorizonPoint) error {
	seen := make(map[float64]int, len(points))
	for i, p := range points {
		field := fmt.Sprintf("horizon[%d].az", i)
		if !finite(p.AzDeg) || p.AzDeg < 0 || p.AzDeg >= 360 {
			return &ephem.InputError{Field: field, Value: fmtNum(p.AzDeg), Accepted: "0 ≤ az < 360 degrees from north through east"}
		}
		if !finite(p.AltDeg) || p.AltDeg < horizonAltMinDeg || p.AltDeg > horizonAltMaxDeg {
			return &ephem.InputError{Field: fmt.Sprintf("horizon[%d].alt", i), Value: fmtNum(p.AltDeg), Accepted: "−5..89 degrees (refracted altitude)"}
		}
		if j, dup := seen[p.AzDeg]; dup {
			return &ephem.InputError{Field: field, Value: fmtNum(p.AzDeg), Accepted: fmt.Sprintf("each azimuth once (also given at horizon[%d])", j)}
		}
		seen[p.AzDeg] = i
	}
	return nil
}

// horizonMask is a validated mask sorted by azimuth, ready for lookup.
type horizonMask struct {
	az, alt []float64
}

// newHorizonMask sorts a validated mask. A nil result means no mask.
func newHorizonMask(points []HorizonPoint) *horizonMask {
	if len(points) == 0 {
		return nil
	}
	ps := append([]HorizonPoint(nil), points...)
	sort.Slice(ps, func(i, j int) bool { return ps[i].AzDeg < ps[j].AzDeg })
	m := &horizonMask{az: make([]float64, len(ps)), alt: make([]float64, len(ps))}
	for i, p := range ps {
		m.az[i], m.alt[i] = p.AzDeg, p.AltDeg
	}
	return m
}

// minAltDeg returns the mask's lowest usable (refracted) altitude at azimuth
// azDeg (any value; reduced to 0..360), interpolated linearly in azimuth
// between neighbouring points, wrapping through north (the segment from the
// last point to the first crosses 360°). One point gives a constant mask.
func (m *horizonMask) minAltDeg(azDeg float64) float64 {
	n := len(m.az)
	if n == 1 {
		return m.alt[0]
	}
	a := math.Mod(azDeg, 360)
	if a < 0 {
		a += 360
	}
	// i is the first point with az > a; the segment is (i−1, i), wrapping.
	i := sort.SearchFloat64s(m.az, a)
	if i < n && m.az[i] == a {
		return m.alt[i]
	}
	var a0, h0, a1, h1 float64
	switch {
	case i == 0: // before the first point: segment from the last, across north
		a0, h0 = m.az[n-1]-360, m.alt[n-1]
		a1, h1 = m.az[0], m.alt[0]
	case i == n: // after the last point: segment to the first, across north
		a0, h0 = m.az[n-1], m.alt[n-1]
		a1, h1 = m.az[0]+360, m.alt[0]
	default:
		a0, h0 = m.az[i-1], m.alt[i-1]
		a1, h1 = m.az[i], m.alt[i]
	}
	f := (a - a0) / (a1 - a0)
	return h0 + f*(h1-h0)
}

// HorizonAltDeg returns the lowest usable (refracted) altitude, degrees, of
// the horizon mask at azimuth azDeg (degrees from north through east, any
// value): linear interpolation in azimuth between neighbouring points,
// wrapping through north; a single point is a constant mask. The points are
// validated first (ValidateHorizon); an empty mask gives 0 (the horizon).
func HorizonAltDeg(points []HorizonPoint, azDeg float64) (float64, error) {
	if err := ValidateHorizon(points); err != nil {
		return 0, err
	}
	if !finite(azDeg) {
		return 0, &ephem.InputError{Field: "az", Value: fmtNum(azDeg), Accepted: "a finite azimuth in degrees"}
	}
	if len(points) == 0 {
		return 0, nil
	}
	return newHorizonMask(points).minAltDeg(azDeg), nil
}

// MaxHorizonPoints is the most points ParseHorizon reads from one text: one
// per 0.1° of azimuth, finer than any surveyed horizon needs (common
// practice).
const MaxHorizonPoints = 3600

// ParseHorizon reads a horizon mask from text: one point per line, azimuth
// and altitude in degrees separated by white space or a comma; blank lines
// and lines starting with '#' are skipped. Numbers are plain decimals (no
// NaN, infinities, hexadecimal or '_' digit separators). Every bad line is
// reported (line number, column, value, what is accepted) and no mask is
// returned if any line is bad; the points are then checked by
// ValidateHorizon, whose *ephem.InputError is wrapped with the point's line.
// A text of more than MaxHorizonPoints points is refused at the first line
// past the limit, before the rest is read.
func ParseHorizon(r io.Reader) ([]HorizonPoint, error) {
	sc := bufio.NewScanner(r)
	var pts []HorizonPoint
	var lines []int // the line of each point
	var errs []string
	line, npts := 0, 0 // npts counts the point lines, good or bad
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		if npts++; npts > MaxHorizonPoints {
			return nil, fmt.Errorf("horizon: line %d: more than %d points; accepted: at most %d lines of \"azimuth altitude\" (one per 0.1° of azimuth)", line, MaxHorizonPoints, MaxHorizonPoints)
		}
		fields := strings.FieldsFunc(text, func(r rune) bool { return r == ',' || r == ' ' || r == '\t' })
		if len(fields) != 2 {
			errs = append(errs, fmt.Sprintf("line %d: %d fields; accepted: two numbers, azimuth and altitude in degrees", line, len(fields)))
			continue
		}
		var vals [2]float64
		bad := false
		for k, f := range fields {
			v, ok := parseFinite(f)
			if !ok {
				name := [2]string{"az", "alt"}[k]
				errs = append(errs, fmt.Sprintf("line %d column %d (%s): %q is not a number; accepted: decimal degrees", line, k+1, name, ClipValue(f)))
				bad = true
				continue
			}
			vals[k] = v
		}
		if !bad {
			pts = append(pts, HorizonPoint{AzDeg: vals[0], AltDeg: vals[1]})
			lines = append(lines, line)
		}
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, fmt.Errorf("horizon: line %d is longer than %d bytes; accepted: lines of \"azimuth altitude\" in degrees", line+1, bufio.MaxScanTokenSize)
		}
		return nil, fmt.Errorf("horizon: %w", err)
	}
	if len(errs) > 0 {
		return nil, fmt.Errorf("horizon: %s", strings.Join(errs, "; "))
	}
	if len(pts) == 0 {
		return nil, fmt.Errorf("horizon: no points; accepted: lines of \"azimuth altitude\" in degrees")
	}
	if err := ValidateHorizon(pts); err != nil {
		var ie *ephem.InputError
		var i int
		if errors.As(err, &ie) {
			if _, serr := fmt.Sscanf(ie.Field, "horizon[%d]", &i); serr == nil && i >= 0 && i < len(lines) {
				return nil, fmt.Errorf("horizon: line %d: %w", lines[i], err)
			}
		}
		return nil, err
	}
	return pts, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func fmtNum(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
