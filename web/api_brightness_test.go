package web

import (
	"fmt"
	"net/http"
	"strings"
	"testing"
)

// TestAPITargetBrightness checks that the API carries a target's band,
// a variable's magnitudes and the goals' S/N and max smear, and answers bad
// values 422 naming the field, the value and what is accepted, writing
// nothing.
func TestAPITargetBrightness(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	editor := h.token("editor")
	list := "/api/v1/lists/" + i64s(f.listID)
	bright := func(name string) map[string]any {
		in := newTarget(name)
		in["mag"], in["band"] = 16.5, "V"
		in["faint_mag"], in["faint_phase"], in["bright_mag"], in["bright_phase"] = 17.0, 0.0, 16.0, 0.5
		in["goals"] = []any{map[string]any{"phase": 0.25, "phase_halfwidth": 0.05, "exposure_s": 60, "overhead_s": 5, "snr": 50, "max_smear": 0.01}}
		return in
	}
	t.Run("RoundTrip", func(t *testing.T) {
		code, body := h.apiCall(editor, "POST", list+"/targets", bright("SNR-1"))
		if code != http.StatusCreated {
			t.Fatalf("status %d: %v", code, body)
		}
		code, got := h.apiCall(editor, "GET", "/api/v1/targets/"+i64s(int64(body["id"].(float64))), nil)
		g := got["goals"].([]any)[0].(map[string]any)
		if code != http.StatusOK || got["band"] != "V" || got["mag"] != 16.5 || got["faint_mag"] != 17.0 || got["bright_phase"] != 0.5 ||
			g["snr"] != 50.0 || g["max_smear"] != 0.01 {
			t.Errorf("status %d: %v", code, got)
		}
	})
	bad := []struct {
		name, want string
		edit       func(map[string]any)
	}{
		{"NegativeSNR", "goals[0].snr", func(m map[string]any) { m["goals"].([]any)[0].(map[string]any)["snr"] = -3 }},
		{"MagOutOfRange", "mag", func(m map[string]any) { delete(m, "faint_mag"); delete(m, "bright_mag"); m["mag"] = 31 }},
		{"UnknownBand", "band", func(m map[string]any) { m["band"] = "K" }},
		{"UnknownMember", "brightness", func(m map[string]any) { m["brightness"] = 3 }},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			in := bright("SNR-bad " + c.name)
			c.edit(in)
			code, body := h.apiCall(editor, "POST", list+"/targets", in)
			e, _ := body["error"].(map[string]any)
			msg, _ := e["message"].(string)
			msg += " " + fmt.Sprint(e["fields"])
			if code != http.StatusUnprocessableEntity && !(c.name == "UnknownMember" && code == http.StatusBadRequest) {
				t.Errorf("status %d, want 422: %v", code, body)
			}
			if !strings.Contains(msg, c.want) || (c.name != "UnknownMember" && !strings.Contains(msg, "accepted")) {
				t.Errorf("error %q does not name %s and what is accepted", msg, c.want)
			}
			_, listed := h.apiCall(editor, "GET", list+"/targets", nil)
			for _, x := range listed["targets"].([]any) {
				if strings.HasPrefix(x.(map[string]any)["name"].(string), "SNR-bad") {
					t.Errorf("a refused target was written: %v", x)
				}
			}
		})
	}
}
