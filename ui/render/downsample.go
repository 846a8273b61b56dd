package render

// downsampleRows box-filters internal rows y0..y1-1 (a multiple of ss rows) into the
// output image: each output pixel is the rounded mean of its ss x ss samples.
func (r *Renderer) downsampleRows(y0, y1 int) {
	ss := r.ss
	n := uint32(ss * ss)
	dst := r.dst
	ow := dst.Rect.Dx()
	for oy := y0 / ss; oy < y1/ss; oy++ {
		out := dst.Pix[dst.PixOffset(dst.Rect.Min.X, dst.Rect.Min.Y+oy):]
		for ox := 0; ox < ow; ox++ {
			var sr, sg, sb, sa uint32
			for dy := 0; dy < ss; dy++ {
				o := (oy*ss+dy)*r.stride + ox*ss*4
				row := r.own[o : o+ss*4]
				for dx := 0; dx < ss*4; dx += 4 {
					sr += uint32(row[dx])
					sg += uint32(row[dx+1])
					sb += uint32(row[dx+2])
					sa += uint32(row[dx+3])
				}
			}
			p := out[ox*4 : ox*4+4 : ox*4+4]
			p[0] = byte((sr + n/2) / n)
			p[1] = byte((sg + n/2) / n)
			p[2] = byte((sb + n/2) / n)
			p[3] = byte((sa + n/2) / n)
		}
	}
}
