package web

import (
	"encoding/json"
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// siteFormIn is a parsed site form.
type siteFormIn struct {
	in   store.SiteInput
	form page.SiteForm
	errs page.Errs
}

// parseSiteForm reads the site form of r.
func parseSiteForm(r *http.Request) siteFormIn {
	f := func(k string) string { return strings.TrimSpace(r.PostFormValue(k)) }
	p := siteFormIn{errs: page.Errs{}}
	p.form = page.SiteForm{Name: f("name"), Lat: f("lat"), Lon: f("lon"), Elev: f("elev"), Zone: f("zone"), Pressure: f("pressure"),
		Temp: f("temperature"), Notes: r.PostFormValue("notes"), SunAltMax: f("sun_alt_max"), MaxAirmass: f("max_airmass"),
		MinAlt: f("min_alt"), MinMoonSep: f("min_moon_sep"), MaxMoonIllum: f("max_moon_illum"), HAMin: f("ha_min"), HAMax: f("ha_max"),
		ZenithExcl: f("zenith_excl"), SunAvoid: f("sun_avoid"), Horizon: r.PostFormValue("horizon"), Instruments: r.PostFormValue("instruments"),
		Telescope: f("telescope")}
	in := store.SiteInput{Name: p.form.Name, Zone: p.form.Zone, Notes: p.form.Notes}
	p.req("lat", p.form.Lat, &in.Site.LatDeg)
	p.req("lon", p.form.Lon, &in.Site.LonEastDeg)
	p.opt("elev", p.form.Elev, &in.Site.ElevM)
	p.opt("pressure", p.form.Pressure, &in.Site.PressureHPa)
	p.opt("temperature", p.form.Temp, &in.Site.TempC)
	c := &in.Constraints
	c.Twilight = planner.Twilight(r.PostFormValue("twilight"))
	for _, o := range []struct {
		k   string
		dst *float64
	}{{"sun_alt_max", &c.SunAltMaxDeg}, {"max_airmass", &c.MaxAirmass}, {"min_alt", &c.MinAltDeg}, {"min_moon_sep", &c.MinMoonSepDeg},
		{"max_moon_illum", &c.MaxMoonIllum}, {"ha_min", &c.HAMinHours}, {"ha_max", &c.HAMaxHours}, {"zenith_excl", &c.ZenithExclDeg},
		{"sun_avoid", &c.SunAvoidDeg}} {
		p.opt(o.k, f(o.k), o.dst)
	}
	h, err := planner.ParseHorizon(strings.NewReader(p.form.Horizon))
	if err != nil {
		p.errs["horizon"] = strings.ReplaceAll(err.Error(), "\n", "; ")
	}
	in.Horizon = h
	if text := strings.TrimSpace(p.form.Instruments); text != "" {
		dec := json.NewDecoder(strings.NewReader(text))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&in.Instruments); err != nil {
			p.errs["instruments"] = "not a JSON list of instruments (" + err.Error() + "); accepted: the keys listed above"
		}
	}
	if p.form.Telescope != "" {
		tel, err := planner.ParseTelescope([]byte(p.form.Telescope))
		if err != nil {
			p.errs["telescope"] = err.Error()
		} else {
			in.Telescope = &tel
		}
	}
	p.in = in
	p.form.Twilight = twilightOptions(string(c.Twilight))
	p.form.Preview = horizonChart(h, c.MinAltDeg)
	return p
}

func (p *siteFormIn) req(field, s string, dst *float64) {
	if s == "" {
		p.errs[field] = "required"
		return
	}
	p.opt(field, s, dst)
}

func (p *siteFormIn) opt(field, s string, dst *float64) {
	if s == "" {
		return
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		p.errs[field] = fmt.Sprintf("“%s” is not a number", s)
		return
	}
	*dst = v
}

// storeErrs puts the store's messages on the form's fields (every horizon
// point's message on the mask).
func (p *siteFormIn) storeErrs(err error) (page.Errs, int, bool) {
	errs, status, ok := formErrs(err)
	if !ok {
		return nil, status, false
	}
	out := page.Errs{}
	for k, v := range errs {
		switch {
		case strings.HasPrefix(k, "horizon"):
			k = "horizon"
		case strings.HasPrefix(k, "instruments"):
			v = k + ": " + v
			k = "instruments"
		case strings.HasPrefix(k, "telescope"):
			k = "telescope"
		}
		out[k] = v
	}
	return out, status, true
}

// twilightOptions lists the twilights for a select.
func twilightOptions(sel string) []page.Option {
	if sel == "" {
		sel = string(planner.TwilightNautical)
	}
	out := []page.Option{{Value: "civil", Label: "civil (Sun below −6°)"}, {Value: "nautical", Label: "nautical (−12°)"},
		{Value: "astronomical", Label: "astronomical (−18°)"}, {Value: "custom", Label: "custom Sun altitude"}}
	for i := range out {
		out[i].Selected = out[i].Value == sel
	}
	return out
}

// horizonChart is the polar preview of a mask.
func horizonChart(h []planner.HorizonPoint, minAlt float64) chart.Horizon {
	c := chart.Horizon{Title: "Horizon mask", MinAltDeg: minAlt}
	for _, p := range h {
		c.Points = append(c.Points, chart.HorizonPoint{AzDeg: p.AzDeg, AltDeg: p.AltDeg})
	}
	return c
}

// formFromSite fills the form from a stored site.
func formFromSite(s store.SiteRecord) page.SiteForm {
	c := s.Constraints
	var hb strings.Builder
	for _, p := range s.Horizon {
		fmt.Fprintf(&hb, "%s %s\n", num(p.AzDeg), num(p.AltDeg))
	}
	return page.SiteForm{ID: s.ID, Version: s.Version, Name: s.Name, Lat: num(s.Site.LatDeg), Lon: num(s.Site.LonEastDeg),
		Elev: num(s.Site.ElevM), Zone: s.Zone, Pressure: optNum(s.Site.PressureHPa), Temp: optNum(s.Site.TempC), Notes: s.Notes,
		Twilight: twilightOptions(string(c.Twilight)), SunAltMax: optNum(c.SunAltMaxDeg), MaxAirmass: optNum(c.MaxAirmass),
		MinAlt: optNum(c.MinAltDeg), MinMoonSep: optNum(c.MinMoonSepDeg), MaxMoonIllum: optNum(c.MaxMoonIllum), HAMin: optNum(c.HAMinHours),
		HAMax: optNum(c.HAMaxHours), ZenithExcl: optNum(c.ZenithExclDeg), SunAvoid: optNum(c.SunAvoidDeg), Horizon: hb.String(),
		Instruments: instrumentsText(s.Instruments), Preview: horizonChart(s.Horizon, c.MinAltDeg), Telescope: telescopeText(s.Telescope),
		Errs: page.Errs{}}
}

// instrumentsText writes a site's instruments for the form: an indented
// JSON list, "" for none.
func instrumentsText(ins []planner.Instrument) string {
	if len(ins) == 0 {
		return ""
	}
	b, err := json.MarshalIndent(ins, "", "  ")
	if err != nil { // plain numbers and strings always marshal
		return ""
	}
	return string(b)
}

// telescopeText is a site's telescope as the form's JSON ("" for none).
func telescopeText(tel *planner.Telescope) string {
	if tel == nil {
		return ""
	}
	b, err := json.MarshalIndent(tel.JSON(), "", "  ")
	if err != nil {
		return ""
	}
	return string(b)
}

// siteSummary describes a site's constraints in one line.
func siteSummary(s store.SiteRecord) (position, constraints, horizon string) {
	c := s.Constraints
	position = fmt.Sprintf("%s, %s", planner.FormatDecDeg(s.Site.LatDeg, 0), fmtLon(s.Site.LonEastDeg))
	parts := []string{string(c.Twilight) + " twilight"}
	if c.MaxAirmass > 0 {
		parts = append(parts, "airmass ≤ "+num(c.MaxAirmass))
	}
	if c.MinMoonSepDeg > 0 {
		parts = append(parts, "Moon ≥ "+num(c.MinMoonSepDeg)+"°")
	}
	if c.SunAvoidDeg > 0 {
		parts = append(parts, "Sun ≥ "+num(c.SunAvoidDeg)+"°")
	}
	horizon = "none"
	if len(s.Horizon) > 0 {
		horizon = strconv.Itoa(len(s.Horizon)) + " points"
	}
	return position, strings.Join(parts, ", "), horizon
}

// fmtLon writes an east-positive longitude with E or W.
func fmtLon(lon float64) string {
	if lon < 0 {
		return strconv.FormatFloat(-lon, 'f', 4, 64) + "° W"
	}
	return strconv.FormatFloat(lon, 'f', 4, 64) + "° E"
}
