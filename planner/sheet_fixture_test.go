package planner_test

import (
	"encoding/json"
	"math"
	"os"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// sheetHeader is the header of testdata/sheet_astropy.json
// (testdata/gen/gen_sheet_astropy.py).
type sheetHeader struct {
	Header struct {
		Libraries map[string]string `json:"libraries"`
		Site      struct {
			LatDeg     float64 `json:"lat_deg"`
			LonEastDeg float64 `json:"lon_east_deg"`
			ElevM      float64 `json:"elev_m"`
		} `json:"site"`
	} `json:"header"`
}

// TestSheetFixture checks the telescope sheet's places against astropy for
// a fixture night (the README's, at the invented Cerro Quilla site): ICRS
// at the instant within 0.05″ and apparent of date within 0.1″ (a fast
// star from J2016.0 included), airless altitude and azimuth within 1″
// (azimuth scaled by cos alt), LST within 5 ms, hour angle within 0.4″ on
// the sky (phasecast's refers to the diurnally aberrated direction: up to
// 0.32″, Site.Horizontal), parallactic angle within 1″/cos alt of the
// Meeus (14.1) value from astropy's coordinates. The tolerances are common
// practice for pointing; the worst differences are logged.
func TestSheetFixture(t *testing.T) {
	raw, err := os.ReadFile("../testdata/sheet_astropy.json")
	if err != nil {
		t.Fatal(err)
	}
	var fx sheetHeader
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	var named struct {
		Cases []map[string]any `json:"cases"`
	}
	if err := json.Unmarshal(raw, &named); err != nil {
		t.Fatal(err)
	}
	site := ephem.Site{LatDeg: fx.Header.Site.LatDeg, LonEastDeg: fx.Header.Site.LonEastDeg, ElevM: fx.Header.Site.ElevM}
	t.Logf("fixture from astropy %s, pyerfa %s; %d cases", fx.Header.Libraries["astropy"], fx.Header.Libraries["pyerfa"], len(named.Cases))
	if len(named.Cases) < 60 {
		t.Fatalf("%d cases", len(named.Cases))
	}
	const as = 1.0 / 3600
	var worst [6]float64
	for i, c := range named.Cases {
		f := func(k string) float64 { return c[k].(float64) }
		at, err := time.Parse(time.RFC3339, c["utc"].(string))
		if err != nil {
			t.Fatal(err)
		}
		tg := planner.Target{Name: c["star"].(string), RADeg: f("ra_deg"), DecDeg: f("dec_deg"), PMRAmasyr: f("pm_ra_masyr"),
			PMDecmasyr: f("pm_dec_masyr"), CoordEpochJY: f("epoch_jy")}
		// One block with this instant as its middle: start and end a
		// minute either side.
		b := planner.Block{Target: tg.Name, TargetIndex: 0, Start: at.Add(-time.Minute), End: at.Add(time.Minute)}
		rows, err := planner.TelescopeSheet(site, []planner.Target{tg}, []planner.Block{b})
		if err != nil {
			t.Fatal(err)
		}
		r := rows[0]
		p := r.Points[1]
		if p.Label != "mid" || !p.At.Equal(at) {
			t.Fatalf("case %d: point %q at %s", i, p.Label, p.At)
		}
		cosd := math.Cos(f("dec_date_deg") * math.Pi / 180)
		cosa := math.Cos(f("alt_airless_deg") * math.Pi / 180)
		diffs := [6]float64{
			math.Hypot(wrap180(r.RAICRSDeg-f("ra_icrs_deg"))*math.Cos(f("dec_icrs_deg")*math.Pi/180), r.DecICRSDeg-f("dec_icrs_deg")) / as,
			math.Hypot(wrap180(r.RADateDeg-f("ra_date_deg"))*cosd, r.DecDateDeg-f("dec_date_deg")) / as,
			math.Hypot(p.AltAirlessDeg-f("alt_airless_deg"), wrap180(p.AzDeg-f("az_deg"))*cosa) / as,
			math.Abs(wrap12(p.LSTHours-f("lst_hours"))) * 3600,
			math.Abs(wrap12(p.HourAngleHours-f("hour_angle_hours"))) * 15 * 3600 * cosd,
			math.Abs(wrap180(p.ParallacticDeg-f("parallactic_deg"))) * cosa / as,
		}
		limits := [6]float64{0.05, 0.1, 1, 0.005, 0.4, 1}
		names := [6]string{"ICRS (″)", "of date (″)", "alt/az (″)", "LST (s)", "hour angle × 15 cos δ (″)", "parallactic × cos alt (″)"}
		for k := range diffs {
			worst[k] = math.Max(worst[k], diffs[k])
			if diffs[k] > limits[k] {
				t.Errorf("case %d (%s at %s): %s off by %.4g, limit %g", i, tg.Name, c["utc"], names[k], diffs[k], limits[k])
			}
		}
	}
	t.Logf("worst: ICRS %.4f″, of date %.4f″, alt/az %.3f″, LST %.2f ms, HA×15 cos δ %.3f″, parallactic×cos alt %.3f″",
		worst[0], worst[1], worst[2], worst[3]*1000, worst[4], worst[5])
}

func wrap180(d float64) float64 { return math.Remainder(d, 360) }
func wrap12(h float64) float64  { return math.Remainder(h, 24) }
