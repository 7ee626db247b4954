package web

import (
	"encoding/json"
	"io"
	"net/http"
	"net/url"
	"strings"
	"testing"
)

const uploadCSV = "time,std,err_s,form,observer,note\n" +
	"2460319.7894313,HJD_UTC,6,JD,A. Lund,older photometry\n" +
	"60401.8956957,BJD_TDB,3.2,MJD,B. Okoro,\n"

// TestTimingsUpload previews a timings file on the target page (nothing
// written), adds it, refuses a bad file whole with every bad cell by line,
// and refuses a viewer.
func TestTimingsUpload(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	id := i64s(f.targetIDs[0])
	c := h.client("editor")
	count := func() int {
		tms, err := h.store.ListTimings(t.Context(), h.actor("viewer"), f.targetIDs[0])
		if err != nil {
			t.Fatal(err)
		}
		return len(tms)
	}
	_, page := h.get(c, "/targets/"+id)
	if !hasTestID(page, "timings-upload-form") {
		t.Fatal("the target page has no upload form")
	}
	resp, body := h.postBody(c, "/targets/"+id+"/timings/preview", url.Values{"content": {uploadCSV}})
	if resp.StatusCode != http.StatusOK || !hasTestID(body, "timings-upload-preview") || !strings.Contains(body, "Add these 2 timings") {
		t.Fatalf("preview = %d", resp.StatusCode)
	}
	if !strings.Contains(body, "2460402.3956957") || !strings.Contains(body, "A. Lund") {
		t.Error("the preview lacks the converted MJD row or the observer")
	}
	if n := count(); n != 0 {
		t.Fatalf("%d timings after the preview, want none", n)
	}
	if resp := h.post(c, "/targets/"+id+"/timings/upload", url.Values{"content": {uploadCSV}}); resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("upload = %d", resp.StatusCode)
	}
	if n := count(); n != 2 {
		t.Fatalf("%d timings after the upload, want 2", n)
	}
	bad := "time,std,err_s\n2460319.7894313,HJD_UTC,6\n2460320.1,BJD,6\n2460321.1,BJD_TDB,x\n"
	resp, body = h.postBody(c, "/targets/"+id+"/timings/upload", url.Values{"content": {bad}})
	if resp.StatusCode != http.StatusUnprocessableEntity || !hasTestID(body, "timings-upload-errors") {
		t.Fatalf("bad file = %d", resp.StatusCode)
	}
	for _, want := range []string{"line 3, column 2 (std): &#34;BJD&#34;: accepted: BJD_TDB", "line 4, column 3 (err_s): &#34;x&#34;: accepted:"} {
		if !strings.Contains(body, want) {
			t.Errorf("the page lacks %q", want)
		}
	}
	if n := count(); n != 2 {
		t.Fatalf("%d timings after a bad file, want still 2", n)
	}
	if resp := h.post(h.client("viewer"), "/targets/"+id+"/timings/preview", url.Values{"content": {uploadCSV}}); resp.StatusCode != http.StatusForbidden {
		t.Errorf("viewer preview = %d, want 403", resp.StatusCode)
	}
}

func TestTimingsUploadAPI(t *testing.T) {
	h := newHarness(t)
	f := h.addFixtures(t, 1)
	tok := h.token("editor")
	call := func(path, ctype, body string) (int, map[string]any) {
		req, _ := http.NewRequest("POST", h.ts.URL+path, strings.NewReader(body))
		req.Header.Set("Authorization", "Bearer "+tok)
		req.Header.Set("Content-Type", ctype)
		resp, err := http.DefaultClient.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		defer resp.Body.Close()
		b, _ := io.ReadAll(resp.Body)
		var out map[string]any
		if err := json.Unmarshal(b, &out); err != nil {
			t.Fatalf("not JSON: %s", b)
		}
		return resp.StatusCode, out
	}
	path := "/api/v1/targets/" + i64s(f.targetIDs[0]) + "/timings"
	st, out := call(path+"?dry_run=1", "text/csv", uploadCSV)
	if st != http.StatusOK || out["dry_run"] != true || len(out["timings"].([]any)) != 2 {
		t.Fatalf("dry run = %d %v", st, out)
	}
	st, out = call(path, "text/csv; charset=utf-8", uploadCSV)
	if st != http.StatusCreated || len(out["timings"].([]any)) != 2 {
		t.Fatalf("upload = %d %v", st, out)
	}
	first := out["timings"].([]any)[0].(map[string]any)
	if first["std"] != "HJD_UTC" || first["id"].(float64) == 0 || !strings.HasPrefix(first["bjd_tdb"].(string), "2460319.79") {
		t.Errorf("first timing %v", first)
	}
	st, out = call(path, "text/csv", "time,std,err_s\n2460320.1,BJD,6\n")
	cells, _ := out["error"].(map[string]any)["cells"].([]any)
	if st != http.StatusUnprocessableEntity || len(cells) != 1 {
		t.Fatalf("bad file = %d %v", st, out)
	}
	if c := cells[0].(map[string]any); c["line"].(float64) != 2 || c["column"] != "std" || c["value"] != "BJD" || !strings.Contains(c["reason"].(string), "accepted: BJD_TDB") {
		t.Errorf("cell %v", c)
	}
	if st, _ := call(path, "application/json", `{}`); st != http.StatusUnprocessableEntity {
		t.Errorf("JSON body = %d, want 422", st)
	}
	tms, _ := h.store.ListTimings(t.Context(), h.actor("viewer"), f.targetIDs[0])
	if len(tms) != 2 {
		t.Errorf("%d timings stored, want 2 (the dry run and the bad file write nothing)", len(tms))
	}
}
