package planner

import (
	"math"
	"testing"
	"time"

	"phasecast/ephem"
)

func TestSampleNight(t *testing.T) {
	site := ephem.Site{LatDeg: 31.9, LonEastDeg: -111.6, ElevM: 2100}
	from, to := NightWindow(2026, time.March, 14, time.FixedZone("MST", -7*3600))
	tg := Target{Name: "T-1", RADeg: 150, DecDeg: 20, Priority: 1,
		Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5), PeriodDays: 0.1, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 60}}}
	s, err := SampleNight(site, from, to, []Target{tg}, 2*time.Minute)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := len(s.Times), int(to.Sub(from)/(2*time.Minute))+1; got != want {
		t.Fatalf("samples = %d, want %d", got, want)
	}
	t.Run("BandsCoverSpan", func(t *testing.T) {
		if !s.Bands[0].Start.Equal(from) || !s.Bands[len(s.Bands)-1].End.Equal(s.Times[len(s.Times)-1]) {
			t.Errorf("bands span %v..%v, want %v..%v", s.Bands[0].Start, s.Bands[len(s.Bands)-1].End, from, to)
		}
		kinds := map[string]bool{}
		for i, b := range s.Bands {
			kinds[b.Kind] = true
			if i > 0 && !b.Start.Equal(s.Bands[i-1].End) {
				t.Errorf("band %d starts %v, previous ends %v", i, b.Start, s.Bands[i-1].End)
			}
		}
		for _, k := range []string{"day", "civil", "nautical", "astronomical", "night"} {
			if !kinds[k] {
				t.Errorf("no %s band in a March night at 32° N", k)
			}
		}
	})
	t.Run("AltitudeAgainstFullPath", func(t *testing.T) {
		worst := 0.0
		for _, i := range []int{0, 100, 300, len(s.Times) - 1} {
			p := ephem.Observe(site, tg.Star(), s.Times[i])
			worst = math.Max(worst, math.Abs(p.AltRefractedDeg-s.Targets[0].AltDeg[i]))
		}
		t.Logf("worst altitude difference against ephem.Observe: %.2g°", worst)
		if worst > 1e-3 {
			t.Errorf("altitude differs from the full path by %g°", worst)
		}
	})
	t.Run("PhaseAgainstFullPath", func(t *testing.T) {
		worst := 0.0
		for _, i := range []int{0, 200, 500} {
			_, ph, _ := ephem.PhaseAtUTC(site, tg.Star(), tg.Ephem, s.Times[i])
			d := math.Abs(ph - s.Targets[0].Phase[i])
			worst = math.Max(worst, math.Min(d, 1-d))
		}
		t.Logf("worst phase difference against ephem.PhaseAtUTC: %.2g", worst)
		if worst > 1e-6 {
			t.Errorf("phase differs by %g", worst)
		}
	})
	t.Run("Windows", func(t *testing.T) {
		// A 0.1-day period over a 24-hour span: 10 windows of ±0.05 phase.
		if n := len(s.Targets[0].Windows); n < 9 || n > 11 {
			t.Errorf("windows = %d, want about 10", n)
		}
		for _, w := range s.Targets[0].Windows {
			mid := w.Start.Add(w.End.Sub(w.Start) / 2)
			if w.Start.Equal(from) || w.End.Equal(to) {
				continue // cut by the span
			}
			_, ph, _ := ephem.PhaseAtUTC(site, tg.Star(), tg.Ephem, mid)
			if math.Abs(ph-0.25) > 1e-4 {
				t.Errorf("window %v–%v: phase at its middle %g, want 0.25", w.Start, w.End, ph)
			}
		}
	})
	t.Run("ErrBadSpan", func(t *testing.T) {
		if _, err := SampleNight(site, to, from, nil, time.Minute); err == nil {
			t.Error("accepted a span ending before it starts")
		}
		if _, err := SampleNight(site, from, to, nil, 0); err == nil {
			t.Error("accepted a zero step")
		}
	})
}

func TestAirmassAltDeg(t *testing.T) {
	for _, x := range []float64{1.2, 1.5, 2, 3} {
		alt := AirmassAltDeg(x)
		got, ok := ephem.Airmass(alt)
		if !ok || math.Abs(got-x) > 1e-6 {
			t.Errorf("Airmass(AirmassAltDeg(%g) = %g) = %g, want %g", x, alt, got, x)
		}
	}
}
