package ephem_test

import (
	"math"
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"phasecast/ephem"
)

// TestAirTableMatchesFull compares the tabulated refraction and airmass with
// the full functions (Site.RefractedAltDeg, ephem.Airmass) at 200,000
// random airless altitudes from −5° to 90° and at every knot's midpoint,
// for the standard atmosphere, no air, and the thinnest and densest
// atmospheres Site.Validate accepts: within 0.01″ in refracted altitude and
// 1e-6 in airmass, and the same verdict on the horizon (away from it by
// more than 1e-6°).
func TestAirTableMatchesFull(t *testing.T) {
	sites := map[string]ephem.Site{
		"Standard": {LatDeg: 30},
		"NoAir":    {LatDeg: 30, PressureHPa: 1e-9, TempC: 10},
		"Dense":    {LatDeg: 30, PressureHPa: 1100, TempC: -90},
		"Thin":     {LatDeg: 30, PressureHPa: 500, TempC: 60},
	}
	for name, site := range sites {
		t.Run(name, func(t *testing.T) {
			tab := site.AirTable()
			rng := rand.New(rand.NewPCG(21, 5))
			var hs []float64
			for range 200_000 {
				hs = append(hs, -5+95*rng.Float64())
			}
			for h := -1.9; h < 90; h += 1.0 / 32 {
				hs = append(hs, h+1.0/64)
			}
			hs = append(hs, 90, -90, 0)
			worstR, worstX := 0.0, 0.0
			for _, h := range hs {
				want := site.RefractedAltDeg(h)
				if got := tab.RefractedAltDeg(h); math.Abs(got-want)*3600 > worstR {
					worstR = math.Abs(got-want) * 3600
				}
				gotR, gotX, gotOK := tab.RefractedAirmass(h)
				wantX, wantOK := ephem.Airmass(want)
				if d := math.Abs(gotR-want) * 3600; d > 0.01 {
					t.Fatalf("h %.6f°: RefractedAirmass altitude %.9f°, want %.9f° (%.4f″ off)", h, gotR, want, d)
				}
				if math.Abs(want) < 1e-6 {
					continue
				}
				if gotOK != wantOK {
					t.Fatalf("h %.6f° (refracted %.9f°): ok %v, want %v", h, want, gotOK, wantOK)
				}
				worstX = math.Max(worstX, math.Abs(gotX-wantX))
			}
			t.Logf("worst refracted altitude %.2e″, worst airmass %.2e over %d altitudes", worstR, worstX, len(hs))
			if worstR > 0.01 || worstX > 1e-6 {
				t.Errorf("worst refracted altitude %.4f″ (limit 0.01″), worst airmass %.3g (limit 1e-6)", worstR, worstX)
			}
		})
	}
	if math.IsNaN(ephem.Site{}.AirTable().RefractedAltDeg(math.NaN())) == false {
		t.Error("RefractedAltDeg(NaN) is a number")
	}
	if _, _, ok := (ephem.Site{}).AirTable().RefractedAirmass(math.NaN()); ok {
		t.Error("RefractedAirmass(NaN) ok")
	}
}

// TestAirTableShared checks that sites with the same atmosphere share one
// table and different ones do not.
func TestAirTableShared(t *testing.T) {
	a := ephem.Site{LatDeg: 10}.AirTable()
	b := ephem.Site{LatDeg: -40, PressureHPa: 1010, TempC: 10}.AirTable()
	c := ephem.Site{LatDeg: 10, PressureHPa: 700, TempC: 0}.AirTable()
	if a != b {
		t.Error("standard atmosphere: two tables")
	}
	if a == c {
		t.Error("700 hPa shares the standard table")
	}
}

// benchTrackSample times one fast-path sample (Track.AltAzUnix) and then
// the refracted altitude and airmass by finish.
func benchTrackSample(b *testing.B, finish func(site ephem.Site, alt float64) float64) {
	from := time.Date(2027, time.March, 14, 12, 0, 0, 0, time.UTC)
	site := fastSites[0].site
	frame := ephem.NewSkyFrame(site, from, from.Add(24*time.Hour))
	tr := frame.Track(ephem.Star{RADeg: 83.8, DecDeg: -5.4})
	u0 := float64(from.Unix())
	var sink float64
	i := 0
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	c0, ok0 := threadCPU()
	for b.Loop() {
		alt, az := tr.AltAzUnix(u0 + float64(i%1440)*60)
		sink += alt
		if finish != nil {
			sink += az + finish(site, alt)
		}
		i++
	}
	// cpu-ns/op: the thread's CPU time per sample (see threadCPU).
	if c1, ok1 := threadCPU(); ok0 && ok1 && b.N > 0 {
		b.ReportMetric(float64(c1-c0)/float64(b.N), "cpu-ns/op")
	}
	_ = sink
}

// BenchmarkTrackSampleAltAz is the fast-path sample alone (AltAzUnix), timed
// like the two below, for the ratio.
func BenchmarkTrackSampleAltAz(b *testing.B) {
	benchTrackSample(b, func(ephem.Site, float64) float64 { return 0 })
}

// BenchmarkTrackSampleAirTable is one fast-path sample with refraction and
// airmass from the table: compare with BenchmarkTrackAltAz (alt/az alone)
// and BenchmarkTrackSampleFull (refraction and airmass by the formulas).
func BenchmarkTrackSampleAirTable(b *testing.B) {
	tab := fastSites[0].site.AirTable()
	benchTrackSample(b, func(_ ephem.Site, alt float64) float64 {
		hr, x, _ := tab.RefractedAirmass(alt)
		return hr + x
	})
}

// BenchmarkTrackSampleFull is one fast-path sample with refraction
// (Site.RefractedAltDeg) and airmass (ephem.Airmass) by the full formulas,
// as the fast path did before AirTable.
func BenchmarkTrackSampleFull(b *testing.B) {
	benchTrackSample(b, func(site ephem.Site, alt float64) float64 {
		hr := site.RefractedAltDeg(alt)
		x, _ := ephem.Airmass(hr)
		return hr + x
	})
}
