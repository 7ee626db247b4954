package web

import (
	"net/http"
	"regexp"
	"strings"
	"testing"
)

// fieldErrs returns the inline messages of body, by field.
func fieldErrs(body string) map[string]string {
	out := map[string]string{}
	re := regexp.MustCompile(`data-testid="err-([^"]+)">([^<]*)<`)
	for _, m := range re.FindAllStringSubmatch(body, -1) {
		out[m[1]] = m[2]
	}
	return out
}

// summary returns the error summary at the top of a form, or "".
func summary(body string) string {
	i := strings.Index(body, `data-testid="error-summary"`)
	if i < 0 {
		return ""
	}
	j := strings.Index(body[i:], "</ul>")
	if j < 0 {
		return body[i:]
	}
	return body[i : i+j]
}

func TestNightFormErrorsVisible(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	c := h.client("viewer")
	base := "/night?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID)
	tests := []struct {
		name, query string
		fields      []string
	}{
		{"ErrAirmass", "&date=2026-03-14&max_airmass=0.5", []string{"max_airmass"}},
		{"ErrTwoConstraints", "&date=2026-03-14&max_airmass=0.5&min_alt=high", []string{"max_airmass", "min_alt"}},
		{"ErrThreeConstraints", "&date=2026-03-14&max_airmass=0.5&max_moon_illum=2&sun_avoid=120", []string{"max_airmass", "max_moon_illum", "sun_avoid"}},
		{"ErrDateAndConstraint", "&date=2026-02-30&min_moon_sep=200", []string{"date", "min_moon_sep"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			resp, body := h.get(c, base+tt.query)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Fatalf("status %d, want 422", resp.StatusCode)
			}
			errs := fieldErrs(body)
			sum := summary(body)
			if sum == "" {
				t.Fatal("no error summary")
			}
			if strings.Index(body, `data-testid="error-summary"`) > strings.Index(body, `data-testid="night-form"`) {
				t.Error("the error summary is not above the form")
			}
			for _, fld := range tt.fields {
				msg, ok := errs[fld]
				if !ok {
					t.Errorf("no message on field %s (have %v)", fld, errs)
					continue
				}
				if !strings.Contains(sum, msg) {
					t.Errorf("summary lacks the %s message %q", fld, msg)
				}
			}
			if !regexp.MustCompile(`<details[^>]* open[^>]*><summary>Constraints`).MatchString(body) {
				t.Error("the Constraints box stays closed over its errors")
			}
		})
	}
	t.Run("OK", func(t *testing.T) {
		resp, body := h.get(c, base+"&date=2026-03-14")
		if resp.StatusCode != http.StatusOK || summary(body) != "" {
			t.Errorf("status %d, summary %q", resp.StatusCode, summary(body))
		}
		if regexp.MustCompile(`<details[^>]* open[^>]*><summary>Constraints`).MatchString(body) {
			t.Error("the Constraints box is open without an error")
		}
	})
}

func TestTargetFormListsEveryError(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	c := h.client("editor")
	form := validTargetForm(f.listID)
	form.Set("ra", "24:61:00")
	form.Set("period_days", "0")
	form.Set("goals[0].phase_halfwidth", "0.7")
	form.Set("priority", "nine")
	for _, path := range []string{"/targets", "/targets/" + i64s(f.targetIDs[0])} {
		t.Run(path, func(t *testing.T) {
			form.Set("version", "1")
			resp, body := h.postBody(c, path, form)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Fatalf("status %d, want 422", resp.StatusCode)
			}
			errs := fieldErrs(body)
			sum := summary(body)
			for _, fld := range []string{"ra", "period_days", "goals[0].phase_halfwidth", "priority"} {
				if _, ok := errs[fld]; !ok {
					t.Errorf("no message on %s (have %v)", fld, errs)
				} else if !strings.Contains(sum, errs[fld]) {
					t.Errorf("summary lacks the %s message", fld)
				}
			}
			if len(errs) != 4 {
				t.Errorf("messages on %d fields, want 4: %v", len(errs), errs)
			}
		})
	}
}
