//go:build !purego

package lanes

// HasAVX2 is whether Chords and Sums run the AVX2 kernel.
func HasAVX2() bool { return hasAVX2 }

// SetAVX2 sets whether Chords and Sums run the AVX2 kernel (set it only to
// false, or back to what HasAVX2 gave).
func SetAVX2(on bool) { hasAVX2 = on }
