package chart

import (
	"os"
	"testing"
	"time"
)

func TestDumpForEyes(t *testing.T) {
	if os.Getenv("DUMP") == "" {
		t.Skip()
	}
	n := sampleNight(6, time.Minute)
	n.Blocks[1].State = "done"
	os.WriteFile("/tmp/night.svg", []byte(n.SVG()), 0o644)
	r := Ring{Title: "x", Goals: []Arc{{0.2, 0.3, "Q1", true}, {0.95, 0.05, "conj.", false}, {0.7, 0.8, "Q2", false}}, Planned: []float64{0.21, 0.25, 0.29}, Observed: []float64{0.22, 0.98}, Bins: []Bin{{0, 0.1, 2}, {0.2, 0.3, 5}}}
	h := Horizon{Title: "mask", MinAltDeg: 15, Points: []HorizonPoint{{0, 10}, {90, 25}, {180, 5}, {300, 30}}}
	o := OC{Title: "oc", Points: []OCPoint{{0, 0, 5, "a", false}, {1200, 12, 6, "", false}, {2500, 31, 4, "", true}}, Lines: []OCLine{{"refined", []float64{0, 3000}, []float64{-1, 35}}}}
	os.WriteFile("/tmp/others.html", []byte("<html><body>"+r.SVG()+h.SVG()+o.SVG()+"</body></html>"), 0o644)
}
