package ephem_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"phasecast/ephem"
)

// randomStars returns n targets spread uniformly over the sky, a third with
// proper motions up to ±1.5″/yr, from a fixed seed.
func randomStars(tb testing.TB, n int, seed uint64) []ephem.Star {
	tb.Helper()
	rng := rand.New(rand.NewPCG(seed, 1))
	out := make([]ephem.Star, n)
	for i := range out {
		st := ephem.Star{
			RADeg:  rng.Float64() * 360,
			DecDeg: math.Asin(2*rng.Float64()-1) * 180 / math.Pi,
		}
		if i%3 == 0 {
			st.PMRAmasyr = (2*rng.Float64() - 1) * 1500
			st.PMDecmasyr = (2*rng.Float64() - 1) * 1500
		}
		if err := st.Validate(); err != nil {
			tb.Fatal(err)
		}
		out[i] = st
	}
	return out
}

// skySepArcsec returns the angle, arcseconds, between two horizontal
// directions (altitude, azimuth in degrees).
func skySepArcsec(alt1, az1, alt2, az2 float64) float64 {
	// SeparationDeg works on any spherical pair: azimuth as longitude.
	return ephem.SeparationDeg(az1, alt1, az2, alt2) * 3600
}

var fastSites = []struct {
	name string
	site ephem.Site
}{
	{"North-East", ephem.Site{LatDeg: 47.3, LonEastDeg: 11.4, ElevM: 2000}},
	{"North-West", ephem.Site{LatDeg: 31.96, LonEastDeg: -111.6, ElevM: 2096}},
	{"South-West", ephem.Site{LatDeg: -30.24, LonEastDeg: -70.74, ElevM: 2700}},
	{"South-East", ephem.Site{LatDeg: -31.27, LonEastDeg: 149.06, ElevM: 1165}},
	{"HighNorth", ephem.Site{LatDeg: 78.2, LonEastDeg: 15.6, ElevM: 10}},
	{"Equator", ephem.Site{LatDeg: 0.3, LonEastDeg: -78.5, ElevM: 4000}},
}

// TestTrackMatchesFull compares the fast path with the full computation
// (ApparentPlace + Site.Horizontal) for 60 random targets over a 36-hour span
// at several sites, every 7 minutes: the directions must agree within 0.1″.
func TestTrackMatchesFull(t *testing.T) {
	stars := randomStars(t, 60, 20260512)
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	to := from.Add(36 * time.Hour)
	const tolArcsec = 0.1
	var worst, worstHA, worstQ float64
	for _, tc := range fastSites {
		t.Run(tc.name, func(t *testing.T) {
			frame := ephem.NewSkyFrame(tc.site, from, to)
			for i, st := range stars {
				tr := frame.Track(st)
				for tm := from; !tm.After(to); tm = tm.Add(7 * time.Minute) {
					alt, az := tr.AltAz(tm)
					ra, dec := ephem.ApparentPlace(st, tm)
					full := tc.site.Horizontal(ra, dec, tm)
					d := skySepArcsec(alt, az, full.AltDeg, full.AzDeg)
					if d > worst {
						worst = d
					}
					if d > tolArcsec || math.Abs(alt-full.AltDeg)*3600 > tolArcsec {
						t.Fatalf("star %d at %v: fast (%.7f, %.7f) full (%.7f, %.7f): %.3f″ apart",
							i, tm, alt, az, full.AltDeg, full.AzDeg, d)
					}
					dha := math.Abs(math.Remainder(tr.HourAngleHours(tm)-full.HourAngleHours, 24)) * 15 * 3600 *
						math.Cos(dec*math.Pi/180)
					worstHA = math.Max(worstHA, dha)
					// q is undefined at the zenith and at the pole: weigh its
					// error by the distance from the nearer of the two.
					dq := math.Abs(math.Remainder(tr.ParallacticDeg(tm)-full.ParallacticDeg, 360)) * 3600
					w := math.Min(math.Cos(full.AltDeg*math.Pi/180), math.Cos(dec*math.Pi/180))
					worstQ = math.Max(worstQ, dq*w)
				}
			}
		})
	}
	t.Logf("fast vs full over 36 h, %d targets × %d sites: worst %.4f″ on the sky; hour angle %.4f″ (×cos δ); parallactic angle %.4f″ (× sine of distance from zenith or pole)",
		len(stars), len(fastSites), worst, worstHA, worstQ)
	if worstHA > tolArcsec {
		t.Errorf("hour angle: worst %.4f″ > %.1f″", worstHA, tolArcsec)
	}
	if worstQ > tolArcsec {
		t.Errorf("parallactic angle: worst %.4f″ > %.1f″", worstQ, tolArcsec)
	}
}

// maxFastError returns the largest angle, arcseconds, between the fast and
// the full computation for the stars at the instants from, from+step, … ≤ to.
func maxFastError(tb testing.TB, frame *ephem.SkyFrame, stars []ephem.Star, from, to time.Time, step time.Duration) float64 {
	tb.Helper()
	site := frame.Site()
	worst := 0.0
	for _, st := range stars {
		tr := frame.Track(st)
		for tm := from; !tm.After(to); tm = tm.Add(step) {
			alt, az := tr.AltAz(tm)
			ra, dec := ephem.ApparentPlace(st, tm)
			full := site.Horizontal(ra, dec, tm)
			worst = math.Max(worst, skySepArcsec(alt, az, full.AltDeg, full.AzDeg))
		}
	}
	return worst
}

// TestSkyFrameSpans checks the fast path's accuracy for spans other than a
// night: a long span cut into segments, an empty span, and (logged only,
// as documented to degrade) instants outside the span.
func TestSkyFrameSpans(t *testing.T) {
	stars := randomStars(t, 15, 99)
	site := fastSites[2].site
	from := time.Date(2031, time.November, 2, 18, 0, 0, 0, time.UTC)
	t.Run("FiveDays", func(t *testing.T) {
		to := from.Add(5 * 24 * time.Hour)
		w := maxFastError(t, ephem.NewSkyFrame(site, from, to), stars, from, to, 37*time.Minute)
		t.Logf("5-day span (4 segments): worst %.4f″", w)
		if w > 0.1 {
			t.Errorf("worst %.4f″ > 0.1″", w)
		}
	})
	t.Run("EmptySpan", func(t *testing.T) {
		frame := ephem.NewSkyFrame(site, from, from)
		if f, to := frame.Span(); !f.Equal(from) || !to.Equal(from.Add(time.Hour)) {
			t.Errorf("span %v – %v, want one hour from %v", f, to, from)
		}
		w := maxFastError(t, frame, stars, from, from.Add(time.Hour), 5*time.Minute)
		if w > 0.1 {
			t.Errorf("worst %.4f″ > 0.1″", w)
		}
	})
	t.Run("Outside", func(t *testing.T) {
		to := from.Add(12 * time.Hour)
		frame := ephem.NewSkyFrame(site, from, to)
		before := maxFastError(t, frame, stars, from.Add(-6*time.Hour), from.Add(-6*time.Hour), time.Hour)
		after := maxFastError(t, frame, stars, to.Add(24*time.Hour), to.Add(24*time.Hour), time.Hour)
		t.Logf("extrapolated 6 h before the span: %.4f″; 24 h after: %.4f″", before, after)
		if after > 0.1 {
			t.Errorf("24 h after the span the error is %.3f″, more than 0.1″", after)
		}
	})
}

// TestTrackGrid checks that AltAzGrid gives AltAzUnix's results, and the
// grid's input errors.
func TestTrackGrid(t *testing.T) {
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	frame := ephem.NewSkyFrame(fastSites[3].site, from, from.Add(30*time.Hour))
	g, err := frame.Grid(from.Add(-30*time.Minute), 90*time.Second, 1300)
	if err != nil {
		t.Fatal(err)
	}
	alt := make([]float64, g.Len())
	az := make([]float64, g.Len())
	altOnly := make([]float64, g.Len())
	for _, st := range randomStars(t, 10, 3) {
		tr := frame.Track(st)
		tr.AltAzGrid(g, alt, az)
		tr.AltAzGrid(g, altOnly, nil)
		for i := range alt {
			u := float64(g.Time(i).UnixNano()) / 1e9
			wantAlt, wantAz := tr.AltAzUnix(u)
			if math.Abs(alt[i]-wantAlt) > 1e-9 || math.Abs(math.Remainder(az[i]-wantAz, 360)) > 1e-9 || altOnly[i] != alt[i] {
				t.Fatalf("instant %d: grid (%v, %v, %v), AltAzUnix (%v, %v)", i, alt[i], az[i], altOnly[i], wantAlt, wantAz)
			}
			if a := tr.AltUnix(u); a != wantAlt {
				t.Fatalf("instant %d: AltUnix %v, AltAzUnix %v", i, a, wantAlt)
			}
			// HorizonUnix: the same altitude, and the unit vector of
			// (altitude, azimuth) built with sines and cosines.
			a, dir := tr.HorizonUnix(u)
			sa, ca := math.Sincos(wantAlt * math.Pi / 180)
			sz, cz := math.Sincos(wantAz * math.Pi / 180)
			want := [3]float64{ca * cz, ca * sz, sa}
			if a != wantAlt || math.Abs(dir[0]-want[0]) > 1e-12 || math.Abs(dir[1]-want[1]) > 1e-12 || math.Abs(dir[2]-want[2]) > 1e-12 {
				t.Fatalf("instant %d: HorizonUnix (%v, %v), want (%v, %v)", i, a, dir, wantAlt, want)
			}
		}
	}
	t.Run("ErrStep", func(t *testing.T) {
		if _, err := frame.Grid(from, 0, 10); !isInputError(err, "step") {
			t.Errorf("err = %v, want an *InputError for step", err)
		}
	})
	t.Run("ErrCount", func(t *testing.T) {
		if _, err := frame.Grid(from, time.Minute, 0); !isInputError(err, "n") {
			t.Errorf("err = %v, want an *InputError for n", err)
		}
	})
	t.Run("OtherFrame", func(t *testing.T) {
		other := ephem.NewSkyFrame(fastSites[0].site, from, from.Add(time.Hour))
		other.Track(ephem.Star{RADeg: 1, DecDeg: 2}).AltAzGrid(g, alt, az)
		if alt[0] != -90 || az[0] != 0 {
			t.Errorf("track from another frame gave (%v, %v), want (−90, 0)", alt[0], az[0])
		}
	})
}

// TestTrackZero checks the documented zero Track.
func TestTrackZero(t *testing.T) {
	var tr ephem.Track
	tm := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	alt, az := tr.AltAz(tm)
	if a, dir := tr.HorizonUnix(0); a != -90 || dir != [3]float64{0, 0, -1} {
		t.Errorf("zero Track: HorizonUnix (%v, %v), want (−90, nadir)", a, dir)
	}
	if alt != -90 || az != 0 || tr.HourAngleHours(tm) != 0 || tr.ParallacticDeg(tm) != 0 {
		t.Errorf("zero Track: (%v, %v, %v, %v), want (−90, 0, 0, 0)", alt, az, tr.HourAngleHours(tm), tr.ParallacticDeg(tm))
	}
}

func isInputError(err error, field string) bool {
	var ie *ephem.InputError
	return errors.As(err, &ie) && ie.Field == field
}

// BenchmarkTrackAltAz measures one fast-path sample (AltAzUnix).
func BenchmarkTrackAltAz(b *testing.B) {
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	frame := ephem.NewSkyFrame(fastSites[0].site, from, from.Add(24*time.Hour))
	tr := frame.Track(ephem.Star{RADeg: 83.8, DecDeg: -5.4})
	u0 := float64(from.Unix())
	var sink float64
	i := 0
	for b.Loop() {
		alt, az := tr.AltAzUnix(u0 + float64(i%1440)*60)
		sink += alt + az
		i++
	}
	_ = sink
}

// BenchmarkNight100Targets measures a whole night for 100 targets at 1-minute
// steps: the frame, the 100 tracks and 1441 × 100 altitude/azimuth samples.
func BenchmarkNight100Targets(b *testing.B) {
	stars := randomStars(b, 100, 7)
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	to := from.Add(24 * time.Hour)
	u0 := float64(from.Unix())
	var sink float64
	for b.Loop() {
		frame := ephem.NewSkyFrame(fastSites[1].site, from, to)
		for _, st := range stars {
			tr := frame.Track(st)
			for m := 0; m <= 1440; m++ {
				alt, az := tr.AltAzUnix(u0 + float64(m)*60)
				sink += alt + az
			}
		}
	}
	_ = sink
}

// BenchmarkNewSkyFrame measures the per-span precomputation.
func BenchmarkNewSkyFrame(b *testing.B) {
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	for b.Loop() {
		ephem.NewSkyFrame(fastSites[1].site, from, from.Add(24*time.Hour))
	}
}

// BenchmarkTrack measures the per-target precomputation.
func BenchmarkTrack(b *testing.B) {
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	frame := ephem.NewSkyFrame(fastSites[1].site, from, from.Add(24*time.Hour))
	st := ephem.Star{RADeg: 83.8, DecDeg: -5.4, PMRAmasyr: 100}
	for b.Loop() {
		frame.Track(st)
	}
}

// BenchmarkNight100TargetsGrid is BenchmarkNight100Targets through a
// TimeGrid shared by all targets (Track.AltAzGrid).
func BenchmarkNight100TargetsGrid(b *testing.B) {
	stars := randomStars(b, 100, 7)
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	to := from.Add(24 * time.Hour)
	alt := make([]float64, 1441)
	az := make([]float64, 1441)
	for b.Loop() {
		frame := ephem.NewSkyFrame(fastSites[1].site, from, to)
		g, err := frame.Grid(from, time.Minute, 1441)
		if err != nil {
			b.Fatal(err)
		}
		for _, st := range stars {
			frame.Track(st).AltAzGrid(g, alt, az)
		}
	}
}
