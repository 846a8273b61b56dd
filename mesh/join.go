package mesh

// Join puts meshes together as one, each keeping its own vertices (so each stays a separate
// surface), in the order given.
func Join(meshes ...*Mesh) *Mesh {
	all := &Mesh{}
	for _, m := range meshes {
		if m == nil {
			continue
		}
		base := int32(len(all.Vertices))
		all.Vertices = append(all.Vertices, m.Vertices...)
		for _, t := range m.Triangles {
			all.Triangles = append(all.Triangles, [3]int32{t[0] + base, t[1] + base, t[2] + base})
		}
	}
	return all
}
