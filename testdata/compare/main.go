// Command compare is the phasecast half of the speed and accuracy comparison
// with the astronomy-engine library (npm). It makes one work set, 100
// targets × one night at 1-minute steps at an invented site, computes the
// targets' airless altitude and azimuth, refracted altitude and airmass with
// phasecast's fast path (ephem.SkyFrame, Track.AltAzUnix and AltAzGrid) and
// with its full-precision path (ephem.ApparentPlace with Site.Horizontal, and
// ephem.Observe), times each over the same work (best of N repetitions),
// and writes the instants, targets, results and timings to one JSON file.
// compare.mjs reads that file, does the same work with astronomy-engine, and
// prints the comparison. run.sh runs both:
//
//	bash testdata/compare/run.sh
//
// It lives under testdata/ so that `go test ./...` and `go vet ./...` skip it.
package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"slices"
	"time"

	"phasecast/ephem"
)

// The invented site: 41.7° N, 93.6° W, 300 m, standard atmosphere for the
// refraction (1010 hPa, 10 °C; Site.PressureHPa zero). A western longitude
// checks that both libraries count longitude east-positive.
var site = ephem.Site{LatDeg: 41.7, LonEastDeg: -93.6, ElevM: 300}

// The night: the one beginning on the evening of nightDate in nightZone, from
// sunset (rounded down to the minute) to sunrise (rounded up), 1-minute steps.
const (
	nightDate = "2026-10-14"
	nightZone = "America/Chicago"
	nTargets  = 100
	seed      = 20261014
)

func main() {
	if err := run(os.Args[1:], os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "compare:", err)
		os.Exit(1)
	}
}

// result holds one method's outputs, target-major: index j·len(unix) + i is
// target j at instant i.
type result struct {
	AltDeg          []float64 `json:"alt_deg"`
	AzDeg           []float64 `json:"az_deg"`
	AltRefractedDeg []float64 `json:"alt_refracted_deg"`
	Airmass         []float64 `json:"airmass"` // 0 when below the refracted horizon
}

func newResult(n int) *result {
	return &result{
		AltDeg:          make([]float64, n),
		AzDeg:           make([]float64, n),
		AltRefractedDeg: make([]float64, n),
		Airmass:         make([]float64, n),
	}
}

// timing is a method's wall-clock times over the whole work set, ms.
type timing struct {
	Key    string    `json:"key"`
	What   string    `json:"what"`
	BestMS float64   `json:"best_ms"`
	AllMS  []float64 `json:"all_ms"`
}

type target struct {
	RADeg  float64 `json:"ra_deg"`
	DecDeg float64 `json:"dec_deg"`
}

type output struct {
	Generator      string  `json:"generator"`
	PhasecastRev   string  `json:"phasecast_rev"`
	GoVersion      string  `json:"go_version"`
	GOMAXPROCS     int     `json:"gomaxprocs"`
	Created        string  `json:"created"`
	LatDeg         float64 `json:"lat_deg"`
	LonEastDeg     float64 `json:"lon_east_deg"`
	ElevM          float64 `json:"elev_m"`
	Refraction     string  `json:"refraction"`
	AirmassFormula string  `json:"airmass_formula"`
	NightDate      string  `json:"night_date"`
	NightZone      string  `json:"night_zone"`
	From           string  `json:"from"`
	To             string  `json:"to"`
	StepS          int     `json:"step_s"`
	// TTMinusUTCS is phasecast's TT − UTC over the night (leap-second table),
	// s; compare.mjs can hand it to astronomy-engine as a diagnostic.
	TTMinusUTCS float64   `json:"tt_minus_utc_s"`
	Unix        []float64 `json:"unix"`
	Targets     []target  `json:"targets"`
	Reps        int       `json:"reps"`
	Timings     []timing  `json:"timings"`
	Fast        *result   `json:"fast"`
	Full        *result   `json:"full"`
}

func run(args []string, stdout io.Writer) error {
	fs := flag.NewFlagSet("compare", flag.ContinueOnError)
	out := fs.String("out", "", "JSON file to write (required)")
	reps := fs.Int("reps", 25, "repetitions of each fast-path timing (best is kept)")
	fullReps := fs.Int("full-reps", 5, "repetitions of the full-precision alt/az timing (Observe: at most 3)")
	rev := fs.String("rev", "unknown", "phasecast revision, recorded in the output")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *out == "" {
		return errors.New("-out: missing; accepted: a file path")
	}
	if *reps < 1 || *fullReps < 1 {
		return fmt.Errorf("-reps %d, -full-reps %d: accepted: 1 or more", *reps, *fullReps)
	}

	from, to, err := night()
	if err != nil {
		return err
	}
	var unix []float64
	var instants []time.Time
	for t := from; !t.After(to); t = t.Add(time.Minute) {
		instants = append(instants, t)
		unix = append(unix, float64(t.Unix()))
	}
	stars := randomStars(nTargets, seed)
	n := len(stars) * len(unix)

	o := output{
		Generator:      "testdata/compare/main.go",
		PhasecastRev:   *rev,
		GoVersion:      runtime.Version(),
		GOMAXPROCS:     runtime.GOMAXPROCS(0),
		Created:        time.Now().UTC().Format(time.RFC3339),
		LatDeg:         site.LatDeg,
		LonEastDeg:     site.LonEastDeg,
		ElevM:          site.ElevM,
		Refraction:     "Saemundsson, Meeus (16.4), standard 1010 hPa and 10 °C (ephem.Site.RefractedAltDeg; the fast paths read it from ephem.AirTable)",
		AirmassFormula: "Kasten & Young (1989), eq. 3 (ephem.Airmass; the fast paths read it from ephem.AirTable)",
		NightDate:      nightDate,
		NightZone:      nightZone,
		From:           from.Format(time.RFC3339),
		To:             to.Format(time.RFC3339),
		StepS:          60,
		TTMinusUTCS:    ephem.TTMinusUTC(from),
		Unix:           unix,
		Reps:           *reps,
	}
	for _, st := range stars {
		o.Targets = append(o.Targets, target{st.RADeg, st.DecDeg})
	}

	fast := newResult(n)
	grid := newResult(n)
	full := newResult(n)
	obs := newResult(n)
	scratch := newResult(n)
	var gridErr error
	o.Timings = []timing{
		bestOf("fast", "phasecast fast path: NewSkyFrame + 100 Track + Track.AltAzUnix per sample, AirTable.RefractedAirmass",
			*reps, func() { fastPath(stars, from, to, unix, fast) }),
		bestOf("grid", "phasecast fast path with a shared TimeGrid: NewSkyFrame + Grid + 100 Track + Track.AltAzGrid, AirTable.RefractedAirmass",
			*reps, func() {
				if err := gridPath(stars, from, to, len(unix), grid); err != nil {
					gridErr = err
				}
			}),
		bestOf("altaz", "phasecast fast path, alt/az only (no refraction, no airmass): NewSkyFrame + 100 Track + Track.AltAzUnix",
			*reps, func() { fastAltAzOnly(stars, from, to, unix, scratch) }),
		bestOf("full", "phasecast full precision alt/az: ApparentPlace + Site.Horizontal per sample, RefractedAltDeg, Airmass",
			*fullReps, func() { fullAltAz(stars, instants, full) }),
		bestOf("observe", "phasecast Observe per sample (full precision, also computes Sun, Moon and Moon separation)",
			min(*fullReps, 3), func() { observe(stars, instants, obs) }),
	}
	if gridErr != nil {
		return gridErr
	}
	o.Fast, o.Full = fast, full

	// The two fast variants must agree to rounding, and Observe with the
	// full alt/az; say so if not rather than compare the wrong numbers.
	if d := maxAbsDiff(fast.AltDeg, grid.AltDeg); d > 1e-9 {
		return fmt.Errorf("AltAzUnix and AltAzGrid differ by %.3g° (expected rounding only)", d)
	}
	// The table must match the formulas on the fast path's own altitudes.
	byFormula := newResult(n)
	copy(byFormula.AltDeg, fast.AltDeg)
	for k := range n {
		byFormula.finish(k)
	}
	if d := maxAbsDiff(fast.AltRefractedDeg, byFormula.AltRefractedDeg); d*3600 > 0.01 {
		return fmt.Errorf("AirTable refraction differs from Site.RefractedAltDeg by %.3g″ (limit 0.01″)", d*3600)
	}
	if d := maxAbsDiff(fast.Airmass, byFormula.Airmass); d > 1e-6 {
		return fmt.Errorf("AirTable airmass differs from Airmass by %.3g (limit 1e-6)", d)
	}
	if d := maxAbsDiff(full.AltDeg, obs.AltDeg); d > 1e-12 {
		return fmt.Errorf("ApparentPlace+Horizontal and Observe differ by %.3g°", d)
	}

	f, err := os.Create(*out)
	if err != nil {
		return err
	}
	if err := json.NewEncoder(f).Encode(&o); err != nil {
		f.Close()
		return fmt.Errorf("write %s: %w", *out, err)
	}
	if err := f.Close(); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "phasecast %s, %s, GOMAXPROCS %d: %d targets × %d instants (%s to %s, 1 min) = %d samples\n",
		*rev, o.GoVersion, o.GOMAXPROCS, len(stars), len(unix), o.From, o.To, n)
	for _, t := range o.Timings {
		fmt.Fprintf(stdout, "  %9.3f ms  best of %d  %s\n", t.BestMS, len(t.AllMS), t.What)
	}
	fmt.Fprintf(stdout, "wrote %s\n", *out)
	return nil
}

// night returns sunset and sunrise of the night of nightDate at the site,
// rounded outward to whole minutes.
func night() (from, to time.Time, err error) {
	loc, err := time.LoadLocation(nightZone)
	if err != nil {
		return from, to, err
	}
	y, m, d, err := ephem.ParseDate(nightDate)
	if err != nil {
		return from, to, err
	}
	ev := ephem.Night(site, y, m, d, loc)
	if ev.Sunset == nil || ev.Sunrise == nil {
		return from, to, fmt.Errorf("no sunset or sunrise on %s at the site", nightDate)
	}
	from = ev.Sunset.Truncate(time.Minute)
	to = ev.Sunrise.Truncate(time.Minute)
	if to.Before(*ev.Sunrise) {
		to = to.Add(time.Minute)
	}
	return from, to, nil
}

// randomStars returns n targets spread uniformly over the whole sky (some
// never rise at the site, some never set), without proper motion.
func randomStars(n int, s uint64) []ephem.Star {
	rng := rand.New(rand.NewPCG(s, s+1))
	stars := make([]ephem.Star, n)
	for i := range stars {
		stars[i] = ephem.Star{
			RADeg:  360 * rng.Float64(),
			DecDeg: math.Asin(2*rng.Float64()-1) * 180 / math.Pi,
		}
	}
	return stars
}

func bestOf(key, what string, reps int, f func()) timing {
	t := timing{Key: key, What: what}
	for range reps {
		runtime.GC()
		start := time.Now()
		f()
		t.AllMS = append(t.AllMS, float64(time.Since(start).Nanoseconds())/1e6)
	}
	t.BestMS = slices.Min(t.AllMS)
	return t
}

// finishFast fills the refracted altitude and airmass of sample k from its
// airless altitude with the fast path's table (ephem.AirTable).
func (r *result) finishFast(tab *ephem.AirTable, k int) {
	h, x, ok := tab.RefractedAirmass(r.AltDeg[k])
	r.AltRefractedDeg[k] = h
	if !ok {
		x = 0
	}
	r.Airmass[k] = x
}

// finish fills the refracted altitude and airmass of sample k from its
// airless altitude by the full formulas.
func (r *result) finish(k int) {
	h := site.RefractedAltDeg(r.AltDeg[k])
	r.AltRefractedDeg[k] = h
	if x, ok := ephem.Airmass(h); ok {
		r.Airmass[k] = x
	} else {
		r.Airmass[k] = 0
	}
}

func fastPath(stars []ephem.Star, from, to time.Time, unix []float64, r *result) {
	frame := ephem.NewSkyFrame(site, from, to)
	tab := site.AirTable()
	for j, st := range stars {
		tr := frame.Track(st)
		base := j * len(unix)
		for i, u := range unix {
			k := base + i
			r.AltDeg[k], r.AzDeg[k] = tr.AltAzUnix(u)
			r.finishFast(tab, k)
		}
	}
}

func fastAltAzOnly(stars []ephem.Star, from, to time.Time, unix []float64, r *result) {
	frame := ephem.NewSkyFrame(site, from, to)
	for j, st := range stars {
		tr := frame.Track(st)
		base := j * len(unix)
		for i, u := range unix {
			r.AltDeg[base+i], r.AzDeg[base+i] = tr.AltAzUnix(u)
		}
	}
}

func gridPath(stars []ephem.Star, from, to time.Time, n int, r *result) error {
	frame := ephem.NewSkyFrame(site, from, to)
	g, err := frame.Grid(from, time.Minute, n)
	if err != nil {
		return err
	}
	tab := site.AirTable()
	for j, st := range stars {
		base := j * n
		frame.Track(st).AltAzGrid(g, r.AltDeg[base:base+n], r.AzDeg[base:base+n])
		for k := base; k < base+n; k++ {
			r.finishFast(tab, k)
		}
	}
	return nil
}

func fullAltAz(stars []ephem.Star, instants []time.Time, r *result) {
	for j, st := range stars {
		base := j * len(instants)
		for i, t := range instants {
			k := base + i
			ra, dec := ephem.ApparentPlace(st, t)
			h := site.Horizontal(ra, dec, t)
			r.AltDeg[k], r.AzDeg[k] = h.AltDeg, h.AzDeg
			r.finish(k)
		}
	}
}

func observe(stars []ephem.Star, instants []time.Time, r *result) {
	for j, st := range stars {
		base := j * len(instants)
		for i, t := range instants {
			k := base + i
			p := ephem.Observe(site, st, t)
			r.AltDeg[k], r.AzDeg[k] = p.AltDeg, p.AzDeg
			r.AltRefractedDeg[k], r.Airmass[k] = p.AltRefractedDeg, p.Airmass
		}
	}
}

func maxAbsDiff(a, b []float64) float64 {
	m := 0.0
	for i := range a {
		m = max(m, math.Abs(a[i]-b[i]))
	}
	return m
}
