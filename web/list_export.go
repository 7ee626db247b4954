package web

import (
	"bytes"
	"net/http"
	"regexp"
	"strings"

	"phasecast/store"
)

// listExport downloads a list as team CSV or JSON (GET
// /lists/{id}/export.csv and .json). CSV cells that a spreadsheet would
// run as formulas are neutralised by the store's export
// (export.SafeCSVCell), which its import undoes; they are not quoted again
// here, so that the file round-trips.
func (s *Server) listExport(format store.FileFormat) func(http.ResponseWriter, *http.Request, *user) {
	return func(w http.ResponseWriter, r *http.Request, u *user) {
		id, err := pathID(r, "id")
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		l, err := s.store.GetList(r.Context(), u.actor, id)
		if err != nil {
			s.renderError(w, r, err)
			return
		}
		var out bytes.Buffer
		if err := s.store.ExportTargets(r.Context(), u.actor, id, &out, format); err != nil {
			s.renderError(w, r, err)
			return
		}
		ctype, ext := "application/json", "json"
		if format == store.FormatCSV {
			ctype, ext = "text/csv; charset=utf-8", "csv"
		}
		download(w, ctype, fileName(l.Name, "targets", ext), out.Bytes())
	}
}

var unsafeName = regexp.MustCompile(`[^A-Za-z0-9._-]+`)

// dashes is a run of dashes, written as one in file names.
var dashes = regexp.MustCompile(`-{2,}`)

// fileName makes a download name such as "my-list-targets.csv" from
// free text, keeping only safe characters.
func fileName(base, what, ext string) string {
	b := strings.Trim(dashes.ReplaceAllString(unsafeName.ReplaceAllString(strings.ToLower(base), "-"), "-"), "-.")
	if b == "" {
		b = "phasecast"
	}
	if len(b) > 60 {
		b = b[:60]
	}
	return b + "-" + what + "." + ext
}

// download writes body as an attachment named name.
func download(w http.ResponseWriter, ctype, name string, body []byte) {
	w.Header().Set("Content-Type", ctype)
	w.Header().Set("Content-Disposition", `attachment; filename="`+name+`"`)
	w.Header().Set("Cache-Control", "no-store")
	_, _ = w.Write(body) // dropped: the status is sent; a client that has gone cannot be told more
}
