package page

import "strconv"

// i64 formats an id or version for an attribute or a URL.
func i64(n int64) string { return strconv.FormatInt(n, 10) }

// itoa formats a count.
func itoa(n int) string { return strconv.Itoa(n) }

// ftoa formats a fraction for an attribute.
func ftoa(x float64) string { return strconv.FormatFloat(x, 'f', 3, 64) }
