package web

import (
	"encoding/json"
	"net/http"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"phasecast/planner/export"
)

// byTestID returns the element of the page with data-testid=id, or nil.
func byTestID(tb testing.TB, body, id string) *html.Node {
	tb.Helper()
	root, err := html.Parse(strings.NewReader(body))
	if err != nil {
		tb.Fatal(err)
	}
	var found *html.Node
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		for _, a := range n.Attr {
			if a.Key == "data-testid" && a.Val == id && found == nil {
				found = n
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(root)
	return found
}

// nodeText is the text under n.
func nodeText(n *html.Node) string {
	if n == nil {
		return ""
	}
	if n.Type == html.TextNode {
		return n.Data
	}
	var b strings.Builder
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		b.WriteString(nodeText(c))
	}
	return b.String()
}

// countUnder counts the elements under n named tag whose class attribute
// holds class ("" for any).
func countUnder(n *html.Node, tag, class string) int {
	if n == nil {
		return 0
	}
	k := 0
	if n.Type == html.ElementNode && n.Data == tag {
		ok := class == ""
		for _, a := range n.Attr {
			if a.Key == "class" && strings.Contains(" "+a.Val+" ", " "+class+" ") {
				ok = true
			}
		}
		if ok {
			k++
		}
	}
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		k += countUnder(c, tag, class)
	}
	return k
}

// TestProposePage sizes a proposal on the page and through its JSON
// export: the export is export.NewProposalDoc of the same request (the
// document `phasecast propose --json` writes), and the page shows its counts,
// dates and the year chart.
func TestProposePage(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 2)
	c := h.client("viewer")
	q := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID) + "&from=2026-03-14&to=2026-03-20&n=3&loss=0.3"

	resp, js := h.get(c, "/propose.json"+q)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("propose.json = %d: %.300s", resp.StatusCode, js)
	}
	var d export.ProposalDoc
	if err := json.Unmarshal([]byte(js), &d); err != nil {
		t.Fatalf("propose.json: %v", err)
	}
	if d.Nights != 7 || d.From != "2026-03-14" || d.To != "2026-03-20" || d.Loss != 0.3 || len(d.Goals) != 4 {
		t.Fatalf("doc: %d nights %s..%s loss %g, %d goals", d.Nights, d.From, d.To, d.Loss, len(d.Goals))
	}
	if d.ClearNights < 1 || len(d.ClearDates) != d.ClearNights || len(d.Hours) != 2 || len(d.Hours[0].Hours) != 365 {
		t.Fatalf("clear %d %v, hours %d", d.ClearNights, d.ClearDates, len(d.Hours))
	}
	for _, g := range d.Goals {
		if g.Need != 3 {
			t.Errorf("%s: need %d, want 3 (?n=3)", g.Target, g.Need)
		}
	}

	resp, body := h.get(c, "/propose"+q)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("propose = %d", resp.StatusCode)
	}
	if got := nodeText(byTestID(t, body, "propose-clear")); !strings.Contains(got, strings.Join(d.ClearDates, ", ")) {
		t.Errorf("clear-sky line %q lacks the dates %v", got, d.ClearDates)
	}
	if n := countUnder(byTestID(t, body, "propose-goals"), "tr", ""); n != 5 {
		t.Errorf("%d goal table rows, want 5 (header and 4 goals)", n)
	}
	if n := countUnder(byTestID(t, body, "propose-picks"), "tr", ""); n != len(d.Picks)+1 {
		t.Errorf("%d pick table rows, want %d", n, len(d.Picks)+1)
	}
	if n := countUnder(byTestID(t, body, "propose-year"), "path", "series"); n != 2 {
		t.Errorf("year chart has %d target lines, want 2", n)
	}
}

func TestProposeBadInput(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	c := h.client("viewer")
	base := "?site=" + i64s(f.siteID) + "&list=" + i64s(f.listID)
	for _, tc := range []struct {
		name, query, field, want string
	}{
		{"ErrN", "&from=2026-03-14&to=2026-03-15&n=0", "n", "“0” is not accepted; accepted: a whole number of exposures 1..10000"},
		{"ErrLoss", "&from=2026-03-14&to=2026-03-15&n=2&loss=1.2", "loss", "“1.2” is not accepted; accepted: a fraction of nights lost 0..0.95"},
		{"ErrSemester", "&semester=2026C&n=2", "semester", "accepted: a year"},
		{"ErrBoth", "&semester=2026A&from=2026-03-14&n=2", "semester", "not both"},
		{"ErrTo", "&from=2026-03-14&to=2026-03-01&n=2", "to", "accepted: a date from 2026-03-14"},
		{"ErrNoRange", "&n=2", "from", "give a semester"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			resp, body := h.get(c, "/propose"+base+tc.query)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Fatalf("status %d, want 422", resp.StatusCode)
			}
			got := nodeText(byTestID(t, body, "err-"+tc.field))
			if !strings.Contains(got, tc.want) {
				t.Errorf("field %s says %q; want %q", tc.field, got, tc.want)
			}
			resp, _ = h.get(c, "/propose.json"+base+tc.query)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Errorf("propose.json: status %d, want 422", resp.StatusCode)
			}
		})
	}
}
