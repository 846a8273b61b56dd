package render

import "math"

// sortItem orders one see-through triangle: key is its mean 1/w as float bits
// (positive floats sort like their bits), smaller is farther and drawn first.
type sortItem struct {
	key        uint32
	chunk, idx uint32
	b0, b1     uint32 // first and last band it touches
}

// sortSeeThrough orders the see-through triangles far to near with a stable LSD radix sort
// on the depth keys and bins them by band, keeping that order within each band.
func (r *Renderer) sortSeeThrough() {
	for b := 0; b < r.nBands; b++ {
		r.clearBins[b] = r.clearBins[b][:0]
	}
	n := 0
	for c := 0; c < r.nChunks; c++ {
		n += len(r.chunks[c].clear)
	}
	if n == 0 {
		return
	}
	items := grow(r.sortItems, n)[:0]
	for c := 0; c < r.nChunks; c++ {
		for i := range r.chunks[c].clear {
			t := &r.chunks[c].clear[i]
			// Mean 1/w over the triangle's box is close enough to the mean over its corners.
			key := math.Float32bits(t.z + (t.zdx*float32(t.maxX-t.minX)+t.zdy*float32(t.maxY-t.minY))*0.5)
			items = append(items, sortItem{
				key: key, chunk: uint32(c), idx: uint32(i),
				b0: uint32(r.rowBand[t.minY]), b1: uint32(r.rowBand[t.maxY]),
			})
		}
	}
	tmp := grow(r.sortTmp, n)
	items, tmp = radixSort(items, tmp)
	r.sortItems, r.sortTmp = items[:0], tmp[:0]
	for _, it := range items {
		ref := clearRef{chunk: it.chunk, idx: it.idx}
		for b := it.b0; b <= it.b1; b++ {
			r.clearBins[b] = append(r.clearBins[b], ref)
		}
	}
}

// radixSort sorts items by key (stable, 4 passes of 8 bits) using tmp of the same length;
// it returns the sorted slice and the other one.
func radixSort(items, tmp []sortItem) (sorted, spare []sortItem) {
	var count [256]int
	for shift := uint(0); shift < 32; shift += 8 {
		count = [256]int{}
		for i := range items {
			count[(items[i].key>>shift)&0xff]++
		}
		if count[(items[0].key>>shift)&0xff] == len(items) {
			continue // all share this digit
		}
		sum := 0
		for d := range count {
			count[d], sum = sum, sum+count[d]
		}
		for i := range items {
			d := (items[i].key >> shift) & 0xff
			tmp[count[d]] = items[i]
			count[d]++
		}
		items, tmp = tmp, items
	}
	return items, tmp
}
