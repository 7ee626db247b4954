package web

import (
	"errors"
	"fmt"
	"io"
	"net/http"
	"strings"

	"phasecast/planner"
	"phasecast/store"
	"phasecast/web/page"
)

// maxImportForm bounds an import request (the file plus the form).
const maxImportForm = 16 << 20

// importFormats are the formats offered on the import page.
func importFormats(sel string) []page.Option {
	out := []page.Option{{Value: "", Label: "detect"}, {Value: string(store.FormatCSV), Label: "team CSV"},
		{Value: string(store.FormatPlanCSV), Label: "plan command CSV"}, {Value: string(store.FormatJSON), Label: "JSON"}}
	for i := range out {
		out[i].Selected = out[i].Value == sel
	}
	return out
}

// readImport reads the file of an import form: an uploaded file, or the
// pasted text.
func readImport(w http.ResponseWriter, r *http.Request) (content, format string, err error) {
	r.Body = http.MaxBytesReader(w, r.Body, maxImportForm)
	if strings.HasPrefix(r.Header.Get("Content-Type"), "multipart/form-data") {
		err = r.ParseMultipartForm(maxImportForm)
	} else {
		err = r.ParseForm()
	}
	if tl := bodyLimitError(err, "the import (file and form)"); tl != nil {
		return "", "", tl
	}
	if err != nil {
		return "", "", fmt.Errorf("%w: %v", errMalformed, err)
	}
	format = r.PostFormValue("format")
	if f, _, ferr := r.FormFile("file"); ferr == nil {
		defer f.Close()
		b, err := io.ReadAll(f)
		if err != nil {
			return "", "", fmt.Errorf("%w: read upload: %v", errMalformed, err)
		}
		if len(b) > 0 {
			return string(b), format, nil
		}
	}
	return r.PostFormValue("content"), format, nil
}

// importProblems turns a rejected file into its line-numbered problems,
// or a message for the whole form; ok is false for errors the user cannot
// fix by changing the file.
func importProblems(err error) (cells []string, errs page.Errs, status int, ok bool) {
	var te *planner.TableError
	if errors.As(err, &te) {
		for _, c := range te.Cells {
			cells = append(cells, c.String())
		}
		return cells, page.Errs{}, http.StatusUnprocessableEntity, true
	}
	errs, status, ok = formErrs(err)
	return nil, errs, status, ok
}

// importRows converts an import result for the page.
func importRows(res store.ImportResult) []page.ImportRowView {
	out := make([]page.ImportRowView, len(res.Rows))
	for i, row := range res.Rows {
		out[i] = page.ImportRowView{Line: row.Line, Name: row.Name, Action: string(row.Action), Changed: strings.Join(row.Changed, ", ")}
	}
	return out
}
