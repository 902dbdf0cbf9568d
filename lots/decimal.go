package lots

// pow10 holds the powers of ten that are exact in float64 (10^0 to 10^22).
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// quickDecimal reads a plain decimal number, [+-]digits[.digits], of at
// most 15 significant digits with at most 22 after the point, as
// m / 10^e with m and 10^e exact in float64, so the one division is
// correctly rounded and the result is the nearest float64, the value
// strconv.ParseFloat returns (Clinger 1990, "How to read floating point
// numbers accurately", PLDI; the "fast path"). ok is false for anything
// else (exponents, more digits, no digits), which the caller passes to
// strconv.ParseFloat. TestQuickDecimalMatchesParseFloat compares the two.
func quickDecimal(s string) (v float64, ok bool) {
	i, neg := 0, false
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		neg = s[i] == '-'
		i++
	}
	// The digits before and after the point, in two tight loops (a byte
	// below '0' wraps around above 9).
	var m uint64
	from := i
	for i < len(s) && s[i]-'0' < 10 {
		m = 10*m + uint64(s[i]-'0')
		i++
	}
	digits, frac := i-from, 0
	if i < len(s) && s[i] == '.' {
		i++
		from = i
		for i < len(s) && s[i]-'0' < 10 {
			m = 10*m + uint64(s[i]-'0')
			i++
		}
		frac = i - from
		digits += frac
	}
	// Up to 19 digits m is exact in a uint64; the fast path needs it
	// below 10^15 (exact in a float64) and at most 22 decimals.
	if i != len(s) || digits == 0 || digits > 19 || m >= 1e15 || frac > 22 {
		return 0, false
	}
	v = float64(m) / pow10[frac]
	if neg {
		v = -v
	}
	return v, true
}
