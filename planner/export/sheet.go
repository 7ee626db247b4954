package export

import (
	"math"
	"strconv"

	"phasecast/planner"
)

// The telescope sheet's file: `plan --sheet csv|json`, the Night page's
// /night/telescope.csv and .json.

// SheetCSVHeader is the header of the sheet's CSV, one row per block; the
// point columns repeat for start, mid and end (documented in
// docs/sheet.md). Angles are degrees, LST and hour angle hours, times RFC
// 3339 UTC.
var SheetCSVHeader = func() []string {
	h := []string{"target", "goal_phase", "cycle", "n_exposures", "exposure_s", "overhead_s", "mag",
		"ra_icrs_deg", "dec_icrs_deg", "ra_date_deg", "dec_date_deg"}
	for _, p := range []string{"start", "mid", "end"} {
		h = append(h, p+"_utc", p+"_lst_h", p+"_ha_h", p+"_alt_deg", p+"_az_deg", p+"_parallactic_deg")
	}
	return append(h, "airmass_min", "airmass_max", "phase_start", "phase_end", "moon_sep_min_deg")
}()

// SheetPointDoc is one point of a sheet row.
type SheetPointDoc struct {
	Label          string  `json:"label"`
	UTC            DocTime `json:"utc"`
	LSTHours       float64 `json:"lst_hours"`
	HourAngleHours float64 `json:"hour_angle_hours"`
	AltDeg         float64 `json:"alt_deg"`
	AltAirlessDeg  float64 `json:"alt_airless_deg"`
	AzDeg          float64 `json:"az_deg"`
	ParallacticDeg float64 `json:"parallactic_deg"`
}

// SheetRowDoc is one block of the sheet (see SheetRow); goal_phase is null
// for a filler, mag for an unknown magnitude.
type SheetRowDoc struct {
	Target        string          `json:"target"`
	GoalPhase     *float64        `json:"goal_phase"`
	Cycle         int64           `json:"cycle"`
	NExposures    int             `json:"n_exposures"`
	ExposureS     float64         `json:"exposure_s"`
	OverheadS     float64         `json:"overhead_s"`
	Mag           *float64        `json:"mag"`
	RAICRSDeg     float64         `json:"ra_icrs_deg"`
	DecICRSDeg    float64         `json:"dec_icrs_deg"`
	RADateDeg     float64         `json:"ra_date_deg"`
	DecDateDeg    float64         `json:"dec_date_deg"`
	Points        []SheetPointDoc `json:"points"`
	AirmassMin    float64         `json:"airmass_min"`
	AirmassMax    float64         `json:"airmass_max"`
	PhaseStart    float64         `json:"phase_start"`
	PhaseEnd      float64         `json:"phase_end"`
	MoonSepMinDeg float64         `json:"moon_sep_min_deg"`
}

// SheetDoc is the sheet's JSON document.
type SheetDoc struct {
	Rows    []SheetRowDoc `json:"rows"`
	Caution string        `json:"caution"`
}

// round is x to d decimals.
func round(x float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(x*p) / p
}

// NewSheetDoc is the document of the sheet's rows: angles to 1e-5°
// (0.036″), hours to 1e-6 h (3.6 ms), airmass to 1e-4, phases to 1e-5.
func NewSheetDoc(rows []planner.SheetRow) SheetDoc {
	d := SheetDoc{Rows: []SheetRowDoc{}, Caution: Caution}
	for _, r := range rows {
		b := r.Block
		rd := SheetRowDoc{Target: b.Target, Cycle: b.Cycle, NExposures: b.N, ExposureS: b.ExposureS, OverheadS: b.OverheadS,
			RAICRSDeg: round(r.RAICRSDeg, 5), DecICRSDeg: round(r.DecICRSDeg, 5), RADateDeg: round(r.RADateDeg, 5), DecDateDeg: round(r.DecDateDeg, 5),
			AirmassMin: round(b.AirmassMin, 4), AirmassMax: round(b.AirmassMax, 4), PhaseStart: round(b.PhaseStart, 5), PhaseEnd: round(b.PhaseEnd, 5),
			MoonSepMinDeg: round(b.MoonSepDeg, 3)}
		if !b.Filler {
			c := b.Goal.Center
			rd.GoalPhase = &c
		}
		if r.Mag != 0 {
			m := r.Mag
			rd.Mag = &m
		}
		for _, p := range r.Points {
			rd.Points = append(rd.Points, SheetPointDoc{Label: p.Label, UTC: DocTime(p.At), LSTHours: round(p.LSTHours, 6),
				HourAngleHours: round(p.HourAngleHours, 6), AltDeg: round(p.AltDeg, 5), AltAirlessDeg: round(p.AltAirlessDeg, 5),
				AzDeg: round(p.AzDeg, 5), ParallacticDeg: round(p.ParallacticDeg, 5)})
		}
		d.Rows = append(d.Rows, rd)
	}
	return d
}

// SheetCSV is the sheet's CSV (SheetCSVHeader) from its document.
func SheetCSV(d SheetDoc) ([]byte, error) {
	var rows [][]string
	g := func(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }
	for _, r := range d.Rows {
		goal, mag := "", ""
		if r.GoalPhase != nil {
			goal = g(*r.GoalPhase)
		}
		if r.Mag != nil {
			mag = g(*r.Mag)
		}
		rec := []string{SafeCSVCell(r.Target), goal, strconv.FormatInt(r.Cycle, 10), strconv.Itoa(r.NExposures), g(r.ExposureS), g(r.OverheadS), mag,
			g(r.RAICRSDeg), g(r.DecICRSDeg), g(r.RADateDeg), g(r.DecDateDeg)}
		for _, p := range r.Points {
			rec = append(rec, p.UTC.String(), g(p.LSTHours), g(p.HourAngleHours), g(p.AltDeg), g(p.AzDeg), g(p.ParallacticDeg))
		}
		rows = append(rows, append(rec, g(r.AirmassMin), g(r.AirmassMax), g(r.PhaseStart), g(r.PhaseEnd), g(r.MoonSepMinDeg)))
	}
	return writeCSV(SheetCSVHeader, rows)
}
