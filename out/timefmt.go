package out

import (
	"fmt"
	"math"
	"strings"
)

// FormatMinSec formats a duration in seconds as clock time, rounded to the
// nearest whole second: "m:ss" below one hour ("0:59", "3:07", "59:59") and
// "h:mm:ss" from one hour on ("1:00:00", "1:02:03", "26:00:00"). The hour
// form matches Python's str(datetime.timedelta) below one day. A negative
// duration gets a leading minus sign; NaN or an infinite value gives "n/a".
func FormatMinSec(seconds float64) string {
	if math.IsNaN(seconds) || math.IsInf(seconds, 0) {
		return "n/a"
	}
	sign := ""
	if seconds < 0 {
		sign, seconds = "-", -seconds
	}
	if seconds >= 1<<62 {
		return "n/a"
	}
	s := int64(math.Round(seconds))
	if s == 0 {
		sign = ""
	}
	h, m, sec := s/3600, (s/60)%60, s%60
	if h > 0 {
		return fmt.Sprintf("%s%d:%02d:%02d", sign, h, m, sec)
	}
	return fmt.Sprintf("%s%d:%02d", sign, m, sec)
}

// formatHMS is FormatMinSec that always shows hours ("0:20:00").
func formatHMS(seconds float64) string {
	s := FormatMinSec(seconds)
	if strings.Count(s, ":") == 1 {
		if neg, ok := strings.CutPrefix(s, "-"); ok {
			return "-0:" + pad2(neg)
		}
		return "0:" + pad2(s)
	}
	return s
}

// pad2 left-pads "m:ss" to "mm:ss".
func pad2(ms string) string {
	if i := strings.IndexByte(ms, ':'); i == 1 {
		return "0" + ms
	}
	return ms
}
