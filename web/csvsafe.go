package web

import (
	"encoding/csv"
	"fmt"
	"io"
	"regexp"
	"strings"
)

// numberLike matches cells that are numbers or sexagesimal angles (which a
// spreadsheet reads as values, not formulas, even with a leading sign).
var numberLike = regexp.MustCompile(`^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$|^[+-]?\d{1,3}[: ]\d{1,2}([: ]\d{1,2}(\.\d*)?)?$`)

// safeCell neutralises a cell that a spreadsheet would run as a formula
// (one starting with =, +, -, @, a tab or a carriage return; OWASP's "CSV
// injection" advice, common practice) by prefixing an apostrophe. Numbers
// and sexagesimal angles, such as a negative declination, are left alone.
func safeCell(s string) string {
	if s == "" || !strings.ContainsRune("=+-@\t\r", rune(s[0])) || numberLike.MatchString(s) {
		return s
	}
	return "'" + s
}

// neutralizeCSV copies CSV from src to dst with safeCell applied to every
// cell.
func neutralizeCSV(dst io.Writer, src io.Reader) error {
	cr := csv.NewReader(src)
	cr.FieldsPerRecord = -1
	cw := csv.NewWriter(dst)
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return fmt.Errorf("neutralize CSV: %w", err)
		}
		for i := range rec {
			rec[i] = safeCell(rec[i])
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
