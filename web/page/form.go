package page

import (
	"cmp"
	"fmt"
	"net/url"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// Errs holds a form's rejected fields: field name → message naming the value
// and what is accepted. The empty key holds a message for the whole form.
type Errs map[string]string

// Has reports whether field was rejected.
func (e Errs) Has(field string) bool {
	_, ok := e[field]
	return ok
}

// Invalid returns "true" for a rejected field, for aria-invalid.
func (e Errs) Invalid(field string) string {
	if e.Has(field) {
		return "true"
	}
	return "false"
}

// Any reports whether any field was rejected.
func (e Errs) Any() bool { return len(e) > 0 }

// Option is one entry of a <select>.
type Option struct {
	Value    string
	Label    string
	Selected bool
}

// FieldLabel names a form field for the error summary.
type FieldLabel struct{ Field, Label string }

// Summary returns every field message of e as "label: message", in the
// order of labels, then goal rows ("goal 2, exposure s: …") and any other
// field by name. The whole-form message (field "") is left to FormErr.
func (e Errs) Summary(labels []FieldLabel) []string {
	var out []string
	done := map[string]bool{"": true}
	for _, l := range labels {
		if msg, ok := e[l.Field]; ok {
			out = append(out, l.Label+": "+msg)
			done[l.Field] = true
		}
	}
	var rest []string
	for f := range e {
		if !done[f] {
			rest = append(rest, f)
		}
	}
	slices.SortFunc(rest, func(a, b string) int { return cmp.Compare(goalOrder(a), goalOrder(b)) })
	for _, f := range rest {
		out = append(out, fieldLabel(f)+": "+e[f])
	}
	return out
}

// goalOrder sorts goal fields by row number, then name; others after.
func goalOrder(f string) string {
	if row, name, ok := goalFieldOf(f); ok {
		return fmt.Sprintf("0 %04d %s", row, name)
	}
	return "1 " + f
}

// fieldLabel is a readable name for a field without a label: "goal 2,
// phase halfwidth" for goals[1].phase_halfwidth.
func fieldLabel(f string) string {
	if row, name, ok := goalFieldOf(f); ok {
		return fmt.Sprintf("goal %d, %s", row+1, strings.ReplaceAll(name, "_", " "))
	}
	return strings.ReplaceAll(f, "_", " ")
}

// goalFieldRE matches a goal row's field name, as GoalField writes it.
var goalFieldRE = regexp.MustCompile(`^goals\[(\d{1,4})\]\.(\w+)$`)

// goalFieldOf splits "goals[2].exposure_s" into row 2 and "exposure_s".
func goalFieldOf(f string) (row int, name string, ok bool) {
	m := goalFieldRE.FindStringSubmatch(f)
	if m == nil {
		return 0, "", false
	}
	row, err := strconv.Atoi(m[1])
	return row, m[2], err == nil
}

// NightLabels name the Night form's fields in page order.
var NightLabels = []FieldLabel{{"site", "Site"}, {"date", "Night of"}, {"list", "Target list"}, {"twilight", "Twilight"},
	{"part", "Part of the night"}, {"max_airmass", "Maximum airmass"}, {"min_alt", "Minimum altitude"},
	{"min_moon_sep", "Minimum Moon separation"}, {"max_moon_illum", "Maximum Moon illumination"}, {"sun_avoid", "Sun avoidance"}}

// TargetLabels name the target form's top-level fields in page order.
var TargetLabels = []FieldLabel{{"name", "Name"}, {"ra", "RA"}, {"dec", "Dec"}, {"pm_ra_masyr", "Proper motion RA"},
	{"pm_dec_masyr", "Proper motion Dec"}, {"mag", "Magnitude"}, {"priority", "Priority"}, {"acquire_s", "Acquisition"},
	{"tags", "Tags"}, {"t0", "T0"}, {"t0_standard", "T0 time standard"}, {"t0_form", "T0 written as"},
	{"t0_convention", "T0 marks"}, {"phase_offset", "Phase of T0"}, {"t0_err_days", "σ T0"}, {"period_days", "Period"},
	{"period_err_days", "σ period"}, {"pdot", "Ṗ"}, {"ecc", "Eccentricity"}, {"omega_deg", "ω"},
	{"goals", "Goals"}, {"notes", "Notes"}, {"ephem_note", "Ephemeris note"}}

// ConstraintErr reports whether any of the Night form's constraint fields
// (inside the Constraints box) was rejected.
func (f NightForm) ConstraintErr() bool {
	for _, k := range []string{"max_airmass", "min_alt", "min_moon_sep", "max_moon_illum", "sun_avoid"} {
		if f.Errs.Has(k) {
			return true
		}
	}
	return false
}

// splitQuery splits an encoded query into its key/value pairs, for hidden
// form fields; a malformed query gives none.
func splitQuery(q string) [][2]string {
	vals, err := url.ParseQuery(q)
	if err != nil {
		return nil
	}
	var out [][2]string
	for k, vs := range vals {
		for _, v := range vs {
			out = append(out, [2]string{k, v})
		}
	}
	sort.Slice(out, func(a, b int) bool { return out[a][0] < out[b][0] })
	return out
}
