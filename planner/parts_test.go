package planner

import (
	"errors"
	"math"
	"strings"
	"testing"

	"phasecast/ephem"
)

func TestHorizonAltDeg(t *testing.T) {
	mask := []HorizonPoint{{AzDeg: 350, AltDeg: 10}, {AzDeg: 90, AltDeg: 20}, {AzDeg: 180, AltDeg: 5}}
	tests := []struct {
		name   string
		points []HorizonPoint
		az     float64
		want   float64
	}{
		{"AtPoint", mask, 90, 20},
		{"Between", mask, 135, 12.5},        // halfway from 20° at 90° to 5° at 180°
		{"WrapBeforeFirst", mask, 10, 12},   // 350°→90° spans 100°; 10° is 20° in: 10 + 0.2×10
		{"WrapAfterLast", mask, 355, 10.5},  // 350°→450° (90° + 360°): 5/100 of the way from 10 to 20
		{"AfterLastPoint", mask, 265, 7.5},  // 180°→350°: 85/170 of the way from 5 to 10
		{"NegativeAzimuth", mask, -5, 10.5}, // −5° is 355°
		{"OnePointConstant", []HorizonPoint{{AzDeg: 40, AltDeg: 7}}, 250, 7},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := HorizonAltDeg(tc.points, tc.az)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tc.want) > 1e-12 {
				t.Errorf("got %.12g, want %.12g", got, tc.want)
			}
		})
	}
}

func TestValidateHorizon(t *testing.T) {
	tests := []struct {
		name   string
		points []HorizonPoint
		field  string
	}{
		{"AzNegative", []HorizonPoint{{AzDeg: -1, AltDeg: 0}}, "horizon[0].az"},
		{"Az360", []HorizonPoint{{AzDeg: 0, AltDeg: 0}, {AzDeg: 360, AltDeg: 0}}, "horizon[1].az"},
		{"AltHigh", []HorizonPoint{{AzDeg: 10, AltDeg: 90}}, "horizon[0].alt"},
		{"AltNaN", []HorizonPoint{{AzDeg: 10, AltDeg: math.NaN()}}, "horizon[0].alt"},
		{"Duplicate", []HorizonPoint{{AzDeg: 10, AltDeg: 1}, {AzDeg: 10, AltDeg: 2}}, "horizon[1].az"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var ie *ephem.InputError
			if err := ValidateHorizon(tc.points); !errors.As(err, &ie) || ie.Field != tc.field {
				t.Errorf("got %v, want an error on %s", err, tc.field)
			}
		})
	}
	if err := ValidateHorizon(nil); err != nil {
		t.Errorf("empty mask: %v", err)
	}
}

func TestParseHorizon(t *testing.T) {
	t.Run("OK", func(t *testing.T) {
		pts, err := ParseHorizon(strings.NewReader("# dome slit limits\n0 12\n90, 20\n\n180\t5.5\n"))
		if err != nil {
			t.Fatal(err)
		}
		if len(pts) != 3 || pts[2] != (HorizonPoint{180, 5.5}) {
			t.Errorf("got %v", pts)
		}
	})
	t.Run("EveryBadLine", func(t *testing.T) {
		_, err := ParseHorizon(strings.NewReader("0 12\n90 x\n180\nabc 5\n"))
		if err == nil {
			t.Fatal("no error")
		}
		for _, want := range []string{"line 2 column 2 (alt)", "line 3: 1 fields", "line 4 column 1 (az)"} {
			if !strings.Contains(err.Error(), want) {
				t.Errorf("error %q lacks %q", err, want)
			}
		}
	})
	t.Run("ErrEmpty", func(t *testing.T) {
		if _, err := ParseHorizon(strings.NewReader("# nothing\n")); err == nil {
			t.Error("no error for an empty mask file")
		}
	})
}

func TestSpans(t *testing.T) {
	a := []span{{0, 10}, {20, 30}}
	b := []span{{5, 25}}
	if got, want := intersectSpans(a, b), []span{{5, 10}, {20, 25}}; !equalSpans(got, want) {
		t.Errorf("intersect: got %v, want %v", got, want)
	}
	if got, want := subtractSpans(a, b), []span{{0, 5}, {25, 30}}; !equalSpans(got, want) {
		t.Errorf("subtract: got %v, want %v", got, want)
	}
	if got, want := normalizeSpans([]span{{20, 30}, {0, 10}, {9, 12}, {5, 4}}), []span{{0, 12}, {20, 30}}; !equalSpans(got, want) {
		t.Errorf("normalize: got %v, want %v", got, want)
	}
	if got := spanContaining(a, 21, 29); got != 1 {
		t.Errorf("spanContaining: got %d, want 1", got)
	}
	if got := spanContaining(a, 9, 21); got != -1 {
		t.Errorf("spanContaining across a gap: got %d, want -1", got)
	}
	if got := totalLength(a); got != 20 {
		t.Errorf("totalLength %g, want 20", got)
	}
}

func equalSpans(a, b []span) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestConstraintsResolved(t *testing.T) {
	tests := []struct {
		tw   Twilight
		want float64
	}{{"", -12}, {TwilightCivil, -6}, {TwilightNautical, -12}, {TwilightAstronomical, -18}}
	for _, tc := range tests {
		t.Run(string(tc.tw)+"Twilight", func(t *testing.T) {
			c := DefaultConstraints()
			c.Twilight, c.SunAltMaxDeg = tc.tw, 3 // overwritten by the name
			r, err := c.Resolved()
			if err != nil || r.SunAltMaxDeg != tc.want {
				t.Errorf("got %v %v, want %g", r.SunAltMaxDeg, err, tc.want)
			}
		})
	}
	c := DefaultConstraints()
	c.Twilight, c.SunAltMaxDeg = TwilightCustom, -15
	if r, err := c.Resolved(); err != nil || r.SunAltMaxDeg != -15 {
		t.Errorf("custom: %v %v", r.SunAltMaxDeg, err)
	}
	if _, err := ParseTwilight("dawnish"); err == nil {
		t.Error("ParseTwilight accepted a bad name")
	}
}

// TestAltForAirmass: the inverse of ephem.Airmass at the limits used.
func TestAltForAirmass(t *testing.T) {
	for _, x := range []float64{1.2, 1.5, 2, 3, 10} {
		h := altForAirmass(x)
		got, ok := ephem.Airmass(h)
		if !ok || math.Abs(got-x) > 1e-9 {
			t.Errorf("airmass %g: altitude %.9f gives %g", x, h, got)
		}
	}
	// Kasten & Young (1989): airmass 2 near 30° altitude.
	if h := altForAirmass(2); math.Abs(h-30) > 0.1 {
		t.Errorf("airmass 2 at %.3f°, want about 30°", h)
	}
}

func TestResolveGoals(t *testing.T) {
	tg := Target{Name: "Ev-1", Ephem: ephem.Ephemeris{T0: ephem.NewJD2(2460000.5), PeriodDays: 0.2, Convention: ephem.ConvInferiorConjunction},
		Goals: []Goal{{Event: EventQuadratures, HalfWidth: 0.05, ExposureS: 60}, {Event: EventEclipse, HalfWidth: 0.02, ExposureS: 30}, {Center: 0.4, HalfWidth: 0.1, ExposureS: 10}}}
	got, err := tg.ResolveGoals()
	if err != nil {
		t.Fatal(err)
	}
	// Inferior-conjunction convention: the companion recedes fastest a
	// quarter orbit after inferior conjunction, approaches fastest three
	// quarters after (ephem's event geometry).
	want := []struct {
		event  string
		center float64
	}{{"max_recession", 0.25}, {"max_approach", 0.75}, {"inferior_conjunction", 0}, {"", 0.4}}
	if len(got) != len(want) {
		t.Fatalf("%d goals, want %d", len(got), len(want))
	}
	for i, w := range want {
		if got[i].Event != w.event || math.Abs(got[i].Center-w.center) > 1e-12 {
			t.Errorf("goal %d: %q at %.4f, want %q at %.4f", i, got[i].Event, got[i].Center, w.event, w.center)
		}
	}
	tg.Goals = []Goal{{Event: "eclipse_ingress", HalfWidth: 0.05, ExposureS: 60}}
	if _, err := tg.ResolveGoals(); err == nil {
		t.Error("eclipse ingress without a duration accepted")
	}
}

func TestPriorityWeight(t *testing.T) {
	for p, want := range map[int]int64{1: 81, 2: 27, 3: 9, 4: 3, 5: 1} {
		if got := PriorityWeight(p); got != want {
			t.Errorf("w(%d) = %d, want %d", p, got, want)
		}
	}
	// One goal of priority p outweighs two of p+1 but not three.
	if !(PriorityWeight(1) > 2*PriorityWeight(2) && PriorityWeight(1) == 3*PriorityWeight(2)) {
		t.Error("weights do not scale by 3")
	}
}

func TestGoalValue(t *testing.T) {
	tests := []struct{ n, wanted, want int }{{1, 1, 1000000}, {1, 4, 625000}, {4, 4, 1000000}, {9, 4, 1000000}, {3, 12, 625000}}
	for _, tc := range tests {
		if got := goalValue(tc.n, tc.wanted); got != int64(tc.want) {
			t.Errorf("v(%d of %d) = %d, want %d", tc.n, tc.wanted, got, tc.want)
		}
	}
}
