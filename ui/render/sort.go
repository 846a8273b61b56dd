package render

import "math"

// sortItem orders one see-through triangle: key is its mean 1/w as float bits
// (positive floats sort like their bits), smaller is farther and drawn first.
type sortItem struct {
	key        uint32
	chunk, idx uint32
}

// sortSeeThrough returns the see-through triangles that touch band, far to near, in one of
// worker's buffers: by a stable LSD radix sort on their depth keys, of the triangles listed
// in chunk order, so triangles at the same depth keep the order of their chunks and lists.
// Each band is sorted on its own, in parallel with the others, and gets the order a sort of
// all the triangles at once would give it.
func (r *Renderer) sortSeeThrough(band, worker int) []sortItem {
	buf := &r.sortBufs[worker]
	items := buf[0][:0]
	for c := 0; c < r.nChunks; c++ {
		ch := &r.chunks[c]
		if !r.objs[ch.obj].seeThrough {
			continue
		}
		for _, idx := range r.bins[c*r.nBands+band] {
			t := &ch.clear[idx]
			// Mean 1/w over the triangle's box is close enough to the mean over its corners.
			key := math.Float32bits(t.z + (t.zdx*float32(t.maxX-t.minX)+t.zdy*float32(t.maxY-t.minY))*0.5)
			items = append(items, sortItem{key: key, chunk: uint32(c), idx: uint32(idx)})
		}
	}
	if len(items) == 0 {
		buf[0] = items
		return nil
	}
	tmp := grow(buf[1], len(items))
	items, tmp = radixSort(items, tmp)
	buf[0], buf[1] = items, tmp
	return items
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
