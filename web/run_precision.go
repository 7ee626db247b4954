package web

import (
	"fmt"

	"phasecast/planner"
	"phasecast/planner/export"
	"phasecast/web/chart"
	"phasecast/web/page"
)

// precisionView builds the run page's predicted-precision table and the
// chart of σK/K against the nights from a saved plan's document.
func precisionView(doc *export.Run) ([]page.PrecisionRow, chart.Precision) {
	var rows []page.PrecisionRow
	ch := chart.Precision{Title: "Predicted σK/K over the run"}
	for _, n := range doc.Nights {
		ch.Nights = append(ch.Nights, nightHeading(n))
	}
	for _, p := range doc.Precision {
		if r := p.RV; r != nil {
			rows = append(rows, rvPrecisionRow(p.Target, r))
			sr := chart.PrecisionSeries{Label: p.Target, Values: []float64{100 * r.Now.RelK}, OK: []bool{r.Now.Determined}, Want: 100 * r.WantRelK}
			for _, q := range r.PerNight {
				sr.Values, sr.OK = append(sr.Values, 100*q.RelK), append(sr.OK, q.Determined)
			}
			ch.Series = append(ch.Series, sr)
		}
		if t := p.Timing; t != nil {
			sec := func(q planner.TimingPrecisionDoc) string {
				return fmt.Sprintf("%s s (%d, %s)", num3(q.SigmaPDays*86400), q.N, q.Source)
			}
			measure := "σP (timings of T0's event)"
			if t.Quadratic {
				measure += ", quadratic"
			}
			rows = append(rows, page.PrecisionRow{Target: p.Target, Measure: measure, Now: sec(t.Now), After: sec(t.After),
				Sigma: fmt.Sprintf("σT0 %s s, %d planned timing(s)", num3(t.After.SigmaT0Days*86400), t.Planned), Want: "—", Need: "—"})
		}
		if p.TimingNote != "" {
			rows = append(rows, page.PrecisionRow{Target: p.Target, Measure: "timings", Now: "—", After: "—", Sigma: p.TimingNote, Want: "—", Need: "—"})
		}
	}
	return rows, ch
}

// rvPrecisionRow is an RV target's row of the precision table.
func rvPrecisionRow(target string, r *planner.RVForecastDoc) page.PrecisionRow {
	rel := func(q planner.RVPrecisionDoc) string {
		return fmt.Sprintf("%s (%d)", planner.FormatRelPercent(q.RelK, q.Determined), q.N)
	}
	row := page.PrecisionRow{Target: target, Now: rel(r.Now), After: rel(r.After), Want: "—", Need: "—", Sigma: "—",
		Measure: fmt.Sprintf("σK/K (%s, K %s km/s, σv %s km/s)", r.Model, num(r.KKms), num(r.SigmaVKms))}
	if r.After.Determined {
		row.Sigma = fmt.Sprintf("σK %s, σγ %s km/s", num3(r.After.SigmaK), num3(r.After.SigmaGamma))
	}
	if r.WantRelK > 0 {
		row.Want = "σK/K ≤ " + planner.FormatRelPercent(r.WantRelK, true)
		row.Need = fmt.Sprintf("more than %d exposures", planner.MaxExposuresNeeded)
		if r.NeedAfter != nil {
			row.Need = fmt.Sprintf("%d more exposure(s)", *r.NeedAfter)
		}
	}
	return row
}

// num3 writes x with three significant digits.
func num3(x float64) string { return fmt.Sprintf("%.3g", x) }
