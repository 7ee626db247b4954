package page

// Errs holds a form's rejected fields: field name → message naming the value
// and what is accepted. The empty key holds a message for the whole form.
type Errs map[string]string

// Has reports whether field was rejected.
func (e Errs) Has(field string) bool {
	_, ok := e[field]
	return ok
}

// Invalid returns "true" for a rejected field, for aria-invalid.
func (e Errs) Invalid(field string) string {
	if e.Has(field) {
		return "true"
	}
	return "false"
}

// Any reports whether any field was rejected.
func (e Errs) Any() bool { return len(e) > 0 }

// Option is one entry of a <select>.
type Option struct {
	Value    string
	Label    string
	Selected bool
}
