package features

import (
	"fmt"
	"strconv"
	"strings"
	"time"
)

// Date orders for numeric dates such as 03/05/2025.
const (
	DayFirst   = "dmy" // 3 May 2025, as most of the world writes it
	MonthFirst = "mdy" // 5 March 2025
)

var monthNames = map[string]time.Month{}

func init() {
	for m := time.January; m <= time.December; m++ {
		name := strings.ToLower(m.String())
		monthNames[name] = m
		monthNames[name[:3]] = m
	}
	monthNames["sept"] = time.September
}

// ParseDate reads a date as spreadsheets export them and returns it as
// YYYY-MM-DD: ISO dates with or without a time ("2025-04-12 10:30:00",
// "2025-4-12"), day, month and year with "/", "." or "-" (in the order
// given, DayFirst or MonthFirst, unless one of the first two numbers is
// over 12, which settles it), and month names ("12 Apr 2025", "April 12,
// 2025", "12-Apr-2025"). ambiguous is true when the order decided it.
func ParseDate(s, order string) (date string, ambiguous bool, err error) {
	s = strings.TrimSpace(s)
	// A time after the date is dropped: "2025-04-12 10:30:00", "…T10:30".
	if i := strings.IndexAny(s, " T"); i >= 8 && strings.Contains(s[i:], ":") {
		s = strings.TrimSpace(s[:i])
	}
	fields := strings.FieldsFunc(s, func(r rune) bool { return strings.ContainsRune("/.- ,", r) })
	bad := fmt.Errorf("%w: got %q (spade reads 2025-04-12, 12/04/2025, 12 Apr 2025 and the like)", ErrBadDate, s)
	if len(fields) != 3 {
		return "", false, bad
	}
	num := func(f string) int {
		n, err := strconv.Atoi(f)
		if err != nil {
			return -1
		}
		return n
	}
	var y, m, d int
	switch {
	case len(fields[0]) == 4 && num(fields[0]) > 0: // year first
		y, m, d = num(fields[0]), num(fields[1]), num(fields[2])
	case monthNames[strings.ToLower(fields[1])] != 0: // 12 Apr 2025
		y, m, d = num(fields[2]), int(monthNames[strings.ToLower(fields[1])]), num(fields[0])
	case monthNames[strings.ToLower(fields[0])] != 0: // Apr 12 2025
		y, m, d = num(fields[2]), int(monthNames[strings.ToLower(fields[0])]), num(fields[1])
	default:
		a, b := num(fields[0]), num(fields[1])
		y = num(fields[2])
		switch {
		case a > 12:
			d, m = a, b
		case b > 12:
			m, d = a, b
		case order == MonthFirst:
			m, d, ambiguous = a, b, a != b
		default:
			d, m, ambiguous = a, b, a != b
		}
	}
	if y >= 0 && y < 100 {
		y += 2000 // a two-digit year is this century's (our choice)
	}
	t := time.Date(y, time.Month(m), d, 0, 0, 0, 0, time.UTC)
	if y < 1000 || y > 9999 || m < 1 || m > 12 || d < 1 || t.Day() != d || t.Month() != time.Month(m) {
		return "", false, bad
	}
	return t.Format(time.DateOnly), ambiguous, nil
}
