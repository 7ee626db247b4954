package export

import (
	"regexp"
	"strings"
)

// csvFormulaStart are the first characters that make a spreadsheet read a
// cell as a formula: = + - @, a tab or a carriage return (OWASP "CSV
// Injection", common practice).
const csvFormulaStart = "=+-@\t\r"

// csvNumber matches cells a spreadsheet reads as values even with a leading
// sign: decimal numbers with an optional exponent, and sexagesimal angles
// or times such as -12:48:07.5 or +05 30 (common practice).
var csvNumber = regexp.MustCompile(`^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$|^[+-]?\d{1,3}[: ]\d{1,2}([: ]\d{1,2}(\.\d*)?)?$`)

// csvNeedsQuote reports whether SafeCSVCell quotes cell: text starting with
// = + - @, a tab or a carriage return that is not a number or sexagesimal
// angle, or text starting with a single quote whose rest needs quoting (so
// that the quote the user typed survives UnquoteCSVCell).
func csvNeedsQuote(cell string) bool {
	for cell != "" && cell[0] == '\'' {
		cell = cell[1:]
	}
	return cell != "" && strings.IndexByte(csvFormulaStart, cell[0]) >= 0 && !csvNumber.MatchString(cell)
}

// SafeCSVCell returns s so that a spreadsheet reads it as text: a cell
// starting with = + - @, a tab or a carriage return that is not a number
// gets a leading single quote (OWASP "CSV Injection", common practice).
// Numbers and sexagesimal angles, such as a negative declination
// -12:48:07, stay unquoted. UnquoteCSVCell undoes it.
func SafeCSVCell(s string) string {
	if csvNeedsQuote(s) {
		return "'" + s
	}
	return s
}

// UnquoteCSVCell undoes SafeCSVCell when reading a CSV file back:
// UnquoteCSVCell(SafeCSVCell(x)) == x for every x. A cell SafeCSVCell
// would not have quoted, such as a plain number or 'plain, is returned
// unchanged.
func UnquoteCSVCell(s string) string {
	if len(s) >= 2 && s[0] == '\'' && csvNeedsQuote(s[1:]) {
		return s[1:]
	}
	return s
}
