package linelists

// radixSortFloat64 returns the permutation that sorts keys (all ≥ 0 and
// finite, as wavelengths are) ascending; equal keys keep their input order
// (the sort is stable), so the result is deterministic. For non-negative
// IEEE-754 numbers the bit patterns sort as the values do, so an LSD radix
// sort on 16-bit digits does it in at most four passes; a pass whose digit
// is the same for every key is skipped.
func radixSortFloat64(keys []float64) []uint32 {
	n := len(keys)
	perm := make([]uint32, n)
	for i := range perm {
		perm[i] = uint32(i)
	}
	if n < 2 {
		return perm
	}
	bits := make([]uint64, n)
	for i, k := range keys {
		bits[i] = float64bits(k)
	}
	tmpPerm := make([]uint32, n)
	tmpBits := make([]uint64, n)
	var count [1 << 16]int
	for shift := uint(0); shift < 64; shift += 16 {
		clear(count[:])
		for _, b := range bits {
			count[(b>>shift)&0xffff]++
		}
		if count[(bits[0]>>shift)&0xffff] == n {
			continue
		}
		sum := 0
		for d, c := range count {
			count[d] = sum
			sum += c
		}
		for i, b := range bits {
			d := (b >> shift) & 0xffff
			j := count[d]
			count[d]++
			tmpBits[j] = b
			tmpPerm[j] = perm[i]
		}
		bits, tmpBits = tmpBits, bits
		perm, tmpPerm = tmpPerm, perm
	}
	return perm
}
