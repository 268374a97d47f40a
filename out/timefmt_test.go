package out

import (
	"math"
	"strings"
	"testing"
)

func TestFormatMinSecTable(t *testing.T) {
	// Clock notation m:ss / h:mm:ss is common practice (ISO 8601 extended
	// time format for the hour form); rounding to the nearest second, halves
	// away from zero, is this package's documented choice.
	tests := []struct {
		in   float64
		want string
	}{
		{0, "0:00"},
		{0.4, "0:00"},
		{59.4, "0:59"},
		{59.5, "1:00"},
		{60, "1:00"},
		{187, "3:07"},
		{599.6, "10:00"},
		{3599.4, "59:59"},
		{3599.5, "1:00:00"},
		{3600, "1:00:00"},
		{3600 + 2*60 + 3, "1:02:03"},
		{26 * 3600, "26:00:00"},
		{-5, "-0:05"},
		{-0.3, "0:00"},
		{-3723, "-1:02:03"},
		{math.NaN(), "n/a"},
		{math.Inf(1), "n/a"},
		{math.Inf(-1), "n/a"},
		{1e300, "n/a"},
	}
	for _, tc := range tests {
		if got := FormatMinSec(tc.in); got != tc.want {
			t.Errorf("FormatMinSec(%v) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

func TestFormatMinSecMatchesPythonTimedelta(t *testing.T) {
	// Reference: str(datetime.timedelta(seconds=s)) of the Python 3.11
	// standard library, fixture testdata/minsec_timedelta.csv made by
	// testdata/gen_minsec.py. Below one hour FormatMinSec drops the leading
	// "0:" and the hour form's leading zero of the minutes.
	recs := readCSVFile(t, "testdata/minsec_timedelta.csv")
	if len(recs) < 10 {
		t.Fatalf("fixture has only %d rows", len(recs))
	}
	for _, r := range recs[1:] {
		s := atoi(t, r[0])
		want := r[1]
		if s < 3600 {
			want = strings.TrimPrefix(want, "0:")
			want = strings.TrimPrefix(want, "0") // "03:07" -> "3:07", "00:59" -> "0:59"
		}
		if got := FormatMinSec(float64(s)); got != want {
			t.Errorf("FormatMinSec(%d) = %q, want %q (timedelta %q)", s, got, want, r[1])
		}
		if got := formatHMS(float64(s)); got != r[1] {
			t.Errorf("formatHMS(%d) = %q, want timedelta's %q", s, got, r[1])
		}
	}
}

// The report's large scan times: milliseconds below a second and seconds
// below ten seconds (an optical tomography scan must not read 0:00), clock
// time from there on.
func TestReportTime(t *testing.T) {
	for _, c := range []struct {
		s    float64
		want string
	}{
		{0.004, "4.0 ms"}, {0.015, "15.0 ms"}, {0.36, "360.0 ms"}, {2.5, "2.50 s"}, {9.994, "9.99 s"},
		{10, "0:10"}, {59.6, "1:00"}, {125, "2:05"}, {3725, "1:02:05"},
	} {
		if got := reportTime(c.s); got != c.want {
			t.Errorf("reportTime(%g) = %q, want %q", c.s, got, c.want)
		}
	}
}

// The seconds beside a clock time appear only where the clock time does not
// already show them.
func TestTimeAndSeconds(t *testing.T) {
	for _, c := range []struct {
		s    float64
		want string
	}{{0.275, "275.0 ms"}, {4, "4.00 s"}, {108, "1:48 (108.0 s)"}, {54, "0:54 (54.0 s)"}} {
		if got := timeAndSeconds(c.s); got != c.want {
			t.Errorf("timeAndSeconds(%g) = %q, want %q", c.s, got, c.want)
		}
	}
}
