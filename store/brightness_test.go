package store_test

import (
	"bytes"
	"context"
	"strings"
	"testing"

	"phasecast/planner"
	"phasecast/store"
)

// brightTarget is a variable with a band and two S/N goals (invented).
func brightTarget(name string) store.TargetInput {
	in := targetInput(name, 40, 10)
	in.Target.Mag, in.Target.Band = 16.2, "V"
	in.Target.FaintMag, in.Target.FaintPhase, in.Target.BrightMag, in.Target.BrightPhase = 17.1, 0, 15.9, 0.5
	in.Target.Goals = []planner.Goal{
		{Center: 0.25, HalfWidth: 0.05, ExposureS: 120, SNR: 40, MaxSmear: 0.01},
		{Center: 0.75, HalfWidth: 0.05, ExposureS: 120, SNR: 25},
	}
	return in
}

func TestTargetBrightnessStored(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	st, err := w.s.CreateTarget(ctx, w.editor, w.list.ID, brightTarget("PCX V0001+0001"))
	if err != nil {
		t.Fatal(err)
	}
	got, err := w.s.GetTarget(ctx, w.viewer, st.ID)
	if err != nil {
		t.Fatal(err)
	}
	g := got.Target
	if g.Band != "V" || g.Mag != 16.2 || g.FaintMag != 17.1 || g.BrightMag != 15.9 || g.BrightPhase != 0.5 ||
		g.Goals[0].SNR != 40 || g.Goals[0].MaxSmear != 0.01 || g.Goals[1].SNR != 25 {
		t.Errorf("stored target = %+v", g)
	}
}

func TestTargetBrightnessRefused(t *testing.T) {
	ctx := context.Background()
	cases := []struct {
		name, field, value, accepted string
		edit                         func(*planner.Target)
	}{
		{"UnknownBand", "band", "H", "U, B, V", func(t *planner.Target) { t.Band = "H" }},
		{"MagOutOfRange", "mag", "31", "−2..30", func(t *planner.Target) { t.FaintMag, t.BrightMag = 0, 0; t.Mag = 31 }},
		{"NegativeSNR", "goals[0].snr", "-5", "S/N", func(t *planner.Target) { t.Goals[0].SNR = -5 }},
		{"SmearTooLarge", "goals[1].max_smear", "0.6", "below 0.5", func(t *planner.Target) { t.Goals[1].MaxSmear = 0.6 }},
		{"SNRWithoutBand", "goals[0].snr", "40", "band", func(t *planner.Target) { t.Band, t.FaintMag, t.BrightMag = "", 0, 0 }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w := newWorld(t)
			in := brightTarget("PCX V0002+0002")
			c.edit(&in.Target)
			_, err := w.s.CreateTarget(ctx, w.editor, w.list.ID, in)
			wantCode(t, err, store.EINVALID)
			ve := validationFields(t, err)
			found := false
			for _, f := range ve {
				if f.Field == c.field && f.Value == c.value && strings.Contains(f.Accepted, c.accepted) {
					found = true
				}
			}
			if !found {
				t.Errorf("fields = %+v, want %s=%s accepting %q", ve, c.field, c.value, c.accepted)
			}
			ts, err := w.s.ListTargets(ctx, w.viewer, w.list.ID)
			if err != nil || len(ts) != 1 {
				t.Errorf("targets after a refused create = %d, %v; want only the world's one", len(ts), err)
			}
		})
	}
}

func TestBrightnessFileRoundTrip(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	if _, err := w.s.CreateTarget(ctx, w.editor, w.list.ID, brightTarget("PCX V0003+0003")); err != nil {
		t.Fatal(err)
	}
	for _, f := range []store.FileFormat{store.FormatCSV, store.FormatJSON} {
		t.Run(string(f), func(t *testing.T) {
			var out bytes.Buffer
			if err := w.s.ExportTargets(ctx, w.viewer, w.list.ID, &out, f); err != nil {
				t.Fatal(err)
			}
			l2, res := importInto(t, w, "Copy "+string(f), out.String(), f)
			if res.Added != 2 {
				t.Fatalf("re-import = %+v", res)
			}
			ts, err := w.s.ListTargets(ctx, w.viewer, l2.ID)
			if err != nil {
				t.Fatal(err)
			}
			var g planner.Target
			for _, st := range ts {
				if st.Target.Name == "PCX V0003+0003" {
					g = st.Target
				}
			}
			if g.Band != "V" || g.Mag != 16.2 || g.FaintMag != 17.1 || g.FaintPhase != 0 || g.BrightMag != 15.9 ||
				g.BrightPhase != 0.5 || len(g.Goals) != 2 || g.Goals[0].SNR != 40 || g.Goals[0].MaxSmear != 0.01 ||
				g.Goals[1].SNR != 25 || g.Goals[1].MaxSmear != 0 {
				t.Errorf("%s round trip: %+v\n%s", f, g, out.String())
			}
		})
	}
}

func TestBrightnessCSVColumns(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	const file = `name,ra,dec,mag,band,t0,t0_standard,t0_convention,period_days,goals,phase_halfwidth,exposure_s,snr,max_smear
PCX J0100+0100,15,1,18.4,r,2460000.5,BJD_TDB,inferior_conjunction,0.2,0.25;0.75[snr=60 max_smear=0.01],0.05,300,30,0.015
`
	l, res := importInto(t, w, "Bright", file, store.FormatCSV)
	if res.Added != 1 {
		t.Fatalf("import = %+v", res)
	}
	ts, err := w.s.ListTargets(ctx, w.viewer, l.ID)
	if err != nil || len(ts) != 1 {
		t.Fatalf("ListTargets = %d, %v", len(ts), err)
	}
	g := ts[0].Target
	if g.Band != "r" || g.Mag != 18.4 || g.Goals[0].SNR != 30 || g.Goals[0].MaxSmear != 0.015 ||
		g.Goals[1].SNR != 60 || g.Goals[1].MaxSmear != 0.01 {
		t.Errorf("target = %+v", g)
	}
	// A bad band fails the whole file, naming the column and what is accepted.
	bad := strings.Replace(file, ",18.4,r,", ",18.4,Q,", 1)
	l3, err := w.s.CreateList(ctx, w.editor, w.team.ID, store.ListInput{Name: "Bad"})
	if err != nil {
		t.Fatal(err)
	}
	_, err = w.s.ImportTargets(ctx, w.editor, l3.ID, strings.NewReader(bad), store.FormatCSV)
	if err == nil || !strings.Contains(err.Error(), "band") || !strings.Contains(err.Error(), "Q") || !strings.Contains(err.Error(), "U, B, V") {
		t.Errorf("bad band: %v", err)
	}
	if ts, _ := w.s.ListTargets(ctx, w.viewer, l3.ID); len(ts) != 0 {
		t.Errorf("refused import wrote %d targets", len(ts))
	}
}

func TestSiteInstruments(t *testing.T) {
	ctx := context.Background()
	w := newWorld(t)
	in := siteInput("Instrumented Peak")
	in.Instruments = []planner.Instrument{
		{Name: "Imager", ApertureM: 1.2, ZeroPoints: map[string]float64{"V": 2.1e9}, ReadNoiseE: 5, DarkEPerSPix: 0.01,
			PixelArcsec: 0.4, SeeingArcsec: 1.3, Extinction: map[string]float64{"V": 0.16}, DarkSky: map[string]float64{"V": 21.4}},
		{Name: "Spectrograph", ApertureM: 1.2, Throughput: 0.1, ReadNoiseE: 3, PixelArcsec: 0.3, SlitWidthArcsec: 1.5,
			SeeingArcsec: 1.3},
	}
	r, err := w.s.CreateSite(ctx, w.editor, w.team.ID, in)
	if err != nil {
		t.Fatal(err)
	}
	got, err := w.s.GetSite(ctx, w.viewer, r.ID)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Instruments) != 2 || got.Instruments[0].ZeroPoints["V"] != 2.1e9 || got.Instruments[1].SlitWidthArcsec != 1.5 ||
		got.Instruments[0].DarkSky["V"] != 21.4 {
		t.Errorf("instruments = %+v", got.Instruments)
	}
	if first, err := got.Instrument(""); err != nil || first.Name != "Imager" {
		t.Errorf("default instrument = %+v, %v", first, err)
	}
	if _, err := got.Instrument("Camera"); err == nil || !strings.Contains(err.Error(), `"Spectrograph"`) {
		t.Errorf("unknown instrument: %v", err)
	}
	cases := []struct {
		name, field, value string
		edit               func(*planner.Instrument)
	}{
		{"ZeroAperture", "instruments[1].aperture", "0", func(i *planner.Instrument) { i.ApertureM = 0 }},
		{"UnknownBand", "instruments[1].band", "H", func(i *planner.Instrument) { i.Extinction = map[string]float64{"H": 0.1} }},
		{"SameName", "instruments[1].name", "Imager", func(i *planner.Instrument) { i.Name = "Imager" }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			bad := in
			bad.Name = "Bad " + c.name
			bad.Instruments = append([]planner.Instrument(nil), in.Instruments...)
			c.edit(&bad.Instruments[1])
			_, err := w.s.CreateSite(ctx, w.editor, w.team.ID, bad)
			wantCode(t, err, store.EINVALID)
			found := false
			for _, f := range validationFields(t, err) {
				found = found || (f.Field == c.field && f.Value == c.value && f.Accepted != "")
			}
			if !found {
				t.Errorf("fields = %+v, want %s = %s", validationFields(t, err), c.field, c.value)
			}
			if sites, _ := w.s.ListSites(ctx, w.viewer, w.team.ID); len(sites) != 2 {
				t.Errorf("sites after a refused create = %d, want 2", len(sites))
			}
		})
	}
}

// validationFields returns the rejected fields an EINVALID error carries.
func validationFields(tb testing.TB, err error) []store.FieldError {
	tb.Helper()
	e := asStoreError(err)
	if e == nil {
		tb.Fatalf("error %v is not a store error", err)
	}
	v, ok := e.Err.(*store.ValidationError)
	if !ok {
		tb.Fatalf("error %v carries no field list", err)
	}
	return v.Fields
}
