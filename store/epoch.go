package store

import (
	"phasecast/ephem"
)

// Epoch is an instant as it was given: the text typed (full precision), its
// form (JD, MJD, RJD) and time standard, and the full Julian date it denotes
// on that standard. The store converts it to BJD_TDB for use and keeps it
// as given for the record, so nothing typed is lost and nothing is guessed.
type Epoch struct {
	Text     string
	Form     ephem.EpochForm
	Standard ephem.TimeStandard
	JD       ephem.JD2 // full Julian date on Standard
}

// epochDecimals is how many decimals of a day an epoch is written with when
// it has no typed text (10: about 9 µs).
const epochDecimals = 10

// ParseEpoch reads an epoch as typed: text in form (JD if empty) on
// standard std, with every digit kept (ephem.ParseEpoch). Errors are
// *ephem.InputError naming the field.
func ParseEpoch(text string, std ephem.TimeStandard, form ephem.EpochForm) (Epoch, error) {
	if form == "" {
		form = ephem.FormJD
	}
	jd, err := ephem.ParseEpoch(text, std, form)
	if err != nil {
		return Epoch{}, err
	}
	return Epoch{Text: text, Form: form, Standard: std, JD: jd}, nil
}

// EpochBJD returns the epoch of a computed BJD_TDB Julian date (a fit's
// T0, say), written as a full JD with 10 decimals.
func EpochBJD(jd ephem.JD2) Epoch {
	return Epoch{Text: ephem.FormatEpoch(jd, ephem.FormJD, epochDecimals), Form: ephem.FormJD, Standard: ephem.StdBJDTDB, JD: jd}
}

// resolve re-reads the typed text (when there is one) so that Text and JD
// agree, and returns the epoch with its BJD_TDB value for a target at st.
// Conversion is geocentric (ephem.ConvertEpochGeocentric): published epochs
// seldom name the observatory, and the site changes a heliocentric or
// barycentric epoch by at most 21.3 ms.
func (e Epoch) resolve(st ephem.Star) (Epoch, ephem.JD2, error) {
	if e.Form == "" {
		e.Form = ephem.FormJD
	}
	if err := e.Standard.Validate(); err != nil {
		return Epoch{}, ephem.JD2{}, err
	}
	if e.Text != "" {
		jd, err := ephem.ParseEpoch(e.Text, e.Standard, e.Form)
		if err != nil {
			return Epoch{}, ephem.JD2{}, err
		}
		e.JD = jd
	} else {
		e.Text = ephem.FormatEpoch(e.JD, e.Form, epochDecimals)
	}
	if e.Standard == ephem.StdBJDTDB {
		return e, e.JD, nil
	}
	bjd, err := ephem.ConvertEpochGeocentric(e.JD, e.Standard, ephem.StdBJDTDB, st)
	if err != nil {
		return Epoch{}, ephem.JD2{}, err
	}
	return e, bjd, nil
}
