package page

import (
	"strings"
	"time"
)

// Month is one calendar month of a goal's queue windows, weeks from Monday.
type Month struct {
	Title string       // "November 2026"
	Weeks [][7]DayCell // Day 0 pads the weeks before the 1st and after the last day
}

// DayCell is one night (by the local date of its evening) of a Month.
type DayCell struct {
	Day     int
	Windows []WindowRow
}

// Dots marks a night's windows, one dot each (at most five, then "+").
func (d DayCell) Dots() string {
	if len(d.Windows) > 5 {
		return strings.Repeat("●", 5) + "+"
	}
	return strings.Repeat("●", len(d.Windows))
}

// Months lays the group's windows out as month grids from the month of
// the first window's night to that of the last; rows whose Night does not
// parse are left to the table.
func (g WindowGroup) Months() []Month {
	byNight := map[string][]WindowRow{}
	var first, last time.Time
	for _, r := range g.Rows {
		d, err := time.Parse("2006-01-02", r.Night)
		if err != nil {
			continue
		}
		byNight[r.Night] = append(byNight[r.Night], r)
		if first.IsZero() || d.Before(first) {
			first = d
		}
		if d.After(last) {
			last = d
		}
	}
	if first.IsZero() {
		return nil
	}
	var out []Month
	for m := time.Date(first.Year(), first.Month(), 1, 0, 0, 0, 0, time.UTC); !m.After(last); m = m.AddDate(0, 1, 0) {
		mo := Month{Title: m.Format("January 2006")}
		var week [7]DayCell
		col := (int(m.Weekday()) + 6) % 7 // Monday first
		for d := m; d.Month() == m.Month(); d = d.AddDate(0, 0, 1) {
			week[col] = DayCell{Day: d.Day(), Windows: byNight[d.Format("2006-01-02")]}
			col++
			if col == 7 {
				mo.Weeks = append(mo.Weeks, week)
				week, col = [7]DayCell{}, 0
			}
		}
		if col > 0 {
			mo.Weeks = append(mo.Weeks, week)
		}
		out = append(out, mo)
	}
	return out
}

// UTCSpan is the window's start and end in UTC to the minute, "03:10–04:01"
// (StartUTC carries the date, EndUTC only the time of day).
func (r WindowRow) UTCSpan() string {
	from, to := r.StartUTC, r.EndUTC
	if i := strings.IndexByte(from, ' '); i >= 0 {
		from = from[i+1:]
	}
	return minutes(from) + "–" + minutes(to)
}

// minutes cuts "15:04:05" to "15:04"; other text is kept as it is.
func minutes(hms string) string {
	if len(hms) == 8 && hms[2] == ':' && hms[5] == ':' {
		return hms[:5]
	}
	return hms
}
