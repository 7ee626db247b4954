package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// TestTargetFormBrightness saves a target with a band, a variable's
// magnitudes and an S/N goal through the form, and refuses bad values on
// their own fields, writing nothing.
func TestTargetFormBrightness(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	c := h.client("editor")
	bright := func() url.Values {
		form := validTargetForm(f.listID)
		form.Set("name", "SNR form target")
		form.Set("mag", "16.4")
		form.Set("band", "r")
		form.Set("faint_mag", "16.9")
		form.Set("faint_phase", "0")
		form.Set("bright_mag", "16.1")
		form.Set("bright_phase", "0.5")
		form.Set("goals[0].snr", "80")
		form.Set("goals[0].max_smear", "0.01")
		return form
	}
	for _, tt := range []struct{ name, field, value, errID string }{
		{"ErrBand", "band", "X", "err-band"},
		{"ErrMag", "mag", "35", "err-mag"},
		{"ErrSNR", "goals[0].snr", "-4", "err-goals[0].snr"},
		{"ErrSmear", "goals[0].max_smear", "0.7", "err-goals[0].max_smear"},
	} {
		t.Run(tt.name, func(t *testing.T) {
			form := bright()
			form.Set(tt.field, tt.value)
			if tt.field == "mag" {
				for _, k := range []string{"faint_mag", "faint_phase", "bright_mag", "bright_phase"} {
					form.Del(k)
				}
			}
			resp, body := h.postBody(c, "/targets", form)
			if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, tt.errID) || !strings.Contains(body, tt.value) {
				t.Errorf("status %d, %s shown %v", resp.StatusCode, tt.errID, hasTestID(body, tt.errID))
			}
		})
	}
	ts, err := h.store.ListTargets(context.Background(), h.actor("editor"), f.listID)
	if err != nil || len(ts) != 1 {
		t.Fatalf("after refused forms: %d targets, %v; want the fixture's one", len(ts), err)
	}
	if resp := h.post(c, "/targets", bright()); resp.StatusCode != http.StatusSeeOther {
		_, body := h.postBody(c, "/targets", bright())
		t.Fatalf("save: status %d: %s", resp.StatusCode, regexp.MustCompile(`data-testid="err-[^<]*`).FindAllString(body, -1))
	}
	ts, _ = h.store.ListTargets(context.Background(), h.actor("editor"), f.listID)
	var got bool
	for _, st := range ts {
		g := st.Target
		if g.Name == "SNR form target" {
			got = g.Band == "r" && g.Mag == 16.4 && g.FaintMag == 16.9 && g.BrightPhase == 0.5 && g.Goals[0].SNR == 80 && g.Goals[0].MaxSmear == 0.01
			if !got {
				t.Errorf("saved %+v", g)
			}
			_, body := h.get(c, "/targets/"+i64s(st.ID)+"/edit")
			if !strings.Contains(body, `value="16.9"`) || !strings.Contains(body, `value="80"`) {
				t.Errorf("edit form does not show the saved brightness and S/N")
			}
		}
	}
	if !got {
		t.Error("the target was not saved")
	}
}

// TestSiteFormInstruments saves a site with two instruments through the
// form, shows them again, and refuses a zero aperture on the field.
func TestSiteFormInstruments(t *testing.T) {
	h := newHarness(t)
	c := h.client("owner")
	form := url.Values{"name": {"Instrumented"}, "lat": {"30"}, "lon": {"-110"}, "elev": {"2000"}, "zone": {"America/Phoenix"},
		"twilight": {"nautical"}, "max_airmass": {"2"}, "horizon": {"0 10\n180 5\n"},
		"instruments": {`[{"name": "CCD", "aperture_m": 0.8, "zero_points": {"V": 8e8}, "read_noise_e": 7, "dark_e_per_s_pix": 0.01,
			"pixel_arcsec": 0.5, "seeing_arcsec": 1.6},
			{"name": "Spectro", "aperture_m": 0.8, "throughput": 0.05, "read_noise_e": 3, "dark_e_per_s_pix": 0, "pixel_arcsec": 0.7,
			"slit_width_arcsec": 2, "seeing_arcsec": 1.6}]`}}
	bad := url.Values{}
	for k, v := range form {
		bad[k] = v
	}
	bad.Set("instruments", strings.Replace(form.Get("instruments"), `"aperture_m": 0.8, "throughput"`, `"aperture_m": 0, "throughput"`, 1))
	resp, body := h.postBody(c, "/sites", bad)
	if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "err-instruments") || !strings.Contains(body, "instruments[1].aperture") {
		t.Errorf("zero aperture: status %d, error shown %v", resp.StatusCode, hasTestID(body, "err-instruments"))
	}
	bad.Set("instruments", `[{"name": "CCD", "colour": "blue"}]`)
	if resp, body := h.postBody(c, "/sites", bad); resp.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "colour") {
		t.Errorf("unknown key: status %d", resp.StatusCode)
	}
	if resp := h.post(c, "/sites", form); resp.StatusCode != http.StatusSeeOther {
		_, body := h.postBody(c, "/sites", form)
		t.Fatalf("save: status %d: %s", resp.StatusCode, regexp.MustCompile(`data-testid="err-[^<]*`).FindAllString(body, -1))
	}
	sites, err := h.store.ListSites(context.Background(), h.actor("owner"), h.teamID)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range sites {
		if s.Name == "Instrumented" {
			if len(s.Instruments) != 2 || s.Instruments[1].SlitWidthArcsec != 2 {
				t.Errorf("instruments = %+v", s.Instruments)
			}
			_, body := h.get(c, "/sites/"+i64s(s.ID))
			if !strings.Contains(body, "&#34;Spectro&#34;") && !strings.Contains(body, `"Spectro"`) {
				t.Errorf("the site page does not show its instruments")
			}
			return
		}
	}
	t.Error("the site was not saved")
}
