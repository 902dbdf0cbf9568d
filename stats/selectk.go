package stats

// SelectKth returns the k-th smallest value of v (0-based, 0 <= k < len(v)),
// reordering v so that v[k] holds it with no larger value before it and no
// smaller after:
// Hoare's selection algorithm FIND (Comm. ACM 4(7), 1961, Algorithm 65)
// with a median-of-three pivot; expected O(n).
func SelectKth[T ~float32 | ~float64](v []T, k int) T {
	lo, hi := 0, len(v)-1
	for lo < hi {
		mid := lo + (hi-lo)/2
		if v[mid] < v[lo] {
			v[mid], v[lo] = v[lo], v[mid]
		}
		if v[hi] < v[lo] {
			v[hi], v[lo] = v[lo], v[hi]
		}
		if v[hi] < v[mid] {
			v[hi], v[mid] = v[mid], v[hi]
		}
		pivot := v[mid]
		i, j := lo, hi
		for i <= j {
			for v[i] < pivot {
				i++
			}
			for v[j] > pivot {
				j--
			}
			if i <= j {
				v[i], v[j] = v[j], v[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return v[k]
		}
	}
	return v[k]
}
