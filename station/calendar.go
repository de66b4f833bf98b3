package station

import "fmt"

// Day is a day of the proleptic Gregorian calendar, counted from 1970-01-01
// (day 0). Differences of Days are numbers of days.
type Day int32

// IsLeapYear reports whether year is a leap year of the Gregorian calendar:
// divisible by 4, except centuries not divisible by 400 (2000 is one, 1900
// and 2100 are not).
func IsLeapYear(year int) bool {
	return year%4 == 0 && (year%100 != 0 || year%400 == 0)
}

// DaysInMonth returns the number of days of month (1-12) in year; 0 for a
// month out of range.
func DaysInMonth(year, month int) int {
	switch month {
	case 1, 3, 5, 7, 8, 10, 12:
		return 31
	case 4, 6, 9, 11:
		return 30
	case 2:
		if IsLeapYear(year) {
			return 29
		}
		return 28
	}
	return 0
}

// DayOf returns the Day of year-month-day; ok is false when there is no
// such day (month 13, 2023-02-30) or the year is outside 1 to 9999.
func DayOf(year, month, day int) (d Day, ok bool) {
	if year < 1 || year > 9999 || day < 1 || day > DaysInMonth(year, month) {
		return 0, false
	}
	return civilDay(year, month, day), true
}

// civilDay counts the days from 1970-01-01 to a valid date (years from 1),
// after H. Hinnant's days_from_civil: the year is taken to start on 1 March
// so that the leap day comes last, and 400-year eras have 146,097 days.
func civilDay(y, m, d int) Day {
	if m <= 2 {
		y--
	}
	era := y / 400 // y >= 0 here
	yoe := y - era*400
	mp := (m + 9) % 12 // March = 0
	doy := (153*mp+2)/5 + d - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return Day(era*146097 + doe - 719468)
}

// Date returns the year, month and day of d (days from year 1 on).
func (d Day) Date() (year, month, day int) {
	z := int(d) + 719468
	era := z / 146097
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	mp := (5*doy + 2) / 153
	day = doy - (153*mp+2)/5 + 1
	month = mp + 3
	if month > 12 {
		month -= 12
	}
	year = yoe + era*400
	if month <= 2 {
		year++
	}
	return year, month, day
}

// Year returns the year of d.
func (d Day) Year() int {
	y, _, _ := d.Date()
	return y
}

// String formats d as YYYY-MM-DD.
func (d Day) String() string {
	y, m, dd := d.Date()
	return fmt.Sprintf("%04d-%02d-%02d", y, m, dd)
}

// ParseDate parses an ISO 8601 calendar date, exactly YYYY-MM-DD (years 0001
// to 9999). An impossible date such as 2023-02-30 is an error.
func ParseDate(s string) (Day, error) {
	d, _, err := parseDateBytes([]byte(s))
	return d, err
}

// parseDateBytes is ParseDate on bytes, returning the year too.
func parseDateBytes(b []byte) (Day, int, error) {
	if len(b) != 10 || b[4] != '-' || b[7] != '-' {
		return 0, 0, fmt.Errorf("%q is not a date of the form YYYY-MM-DD", clip(b))
	}
	y, ok1 := digits(b[0:4])
	m, ok2 := digits(b[5:7])
	d, ok3 := digits(b[8:10])
	if !ok1 || !ok2 || !ok3 {
		return 0, 0, fmt.Errorf("%q is not a date of the form YYYY-MM-DD", clip(b))
	}
	if m < 1 || m > 12 {
		return 0, 0, fmt.Errorf("%s has no month %d", b, m)
	}
	day, ok := DayOf(y, m, d)
	if !ok {
		return 0, 0, fmt.Errorf("%s does not exist (%04d-%02d has %d days)", b, y, m, DaysInMonth(y, m))
	}
	return day, y, nil
}

// digits parses ASCII digits only.
func digits(b []byte) (int, bool) {
	v := 0
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		v = v*10 + int(c-'0')
	}
	return v, true
}

// clip shortens a cell for an error message to at most 40 bytes, so that a
// long field of junk is never echoed whole.
func clip(b []byte) string {
	if len(b) > 40 {
		return string(b[:40]) + "..."
	}
	return string(b)
}

// WindowEnd returns the last day of year's window for the target day: the
// target's month and day in that year, except that a 29 February target
// ends on 28 February in a common year.
func WindowEnd(target Day, year int) Day {
	_, m, d := target.Date()
	if m == 2 && d == 29 && !IsLeapYear(year) {
		d = 28
	}
	return civilDay(year, m, d)
}

// WindowStart returns the first day of year's window of n days for the
// target day: the window covers the n calendar days ending on WindowEnd,
// so it starts in the year before when n reaches back past 1 January (it
// still belongs to year).
func WindowStart(target Day, year, n int) Day {
	return WindowEnd(target, year) - Day(n) + 1
}
