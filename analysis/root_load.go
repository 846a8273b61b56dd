package analysis

import (
	"context"
	"fmt"
	"slices"

	"tapersweep/mesh"
)

// LoadRoot reads the root's outer surface from an STL file (in the canal's coordinates, scaled
// like it). A file of several surfaces gives its largest. Errors name the file.
func LoadRoot(ctx context.Context, path string, scale float64, workers int) (*mesh.Mesh, error) {
	m, rep, err := mesh.LoadFile(ctx, path, mesh.LoadOptions{Scale: scale, Workers: workers})
	if err != nil {
		return nil, err
	}
	if rep.Surface.Shells > 1 {
		m = mesh.LargestShell(m)
	}
	if r := mesh.Validate(m); r.BoundaryEdges > 0 {
		return nil, &RootError{Source: path, Msg: fmt.Sprintf("the surface is not closed (%d edges border holes), so its inside is not known", r.BoundaryEdges)}
	}
	return m, nil
}

// splitNested tells canal from root in a surface of several shells: a shell that encloses
// another is the root (the root's outer surface holds the canal). The canal is the shell picked
// (pick, from 1 in Shells' order; 0 = the largest shell the root encloses). Without a shell that
// encloses the canal it returns the mesh unchanged and a nil root.
func splitNested(m *mesh.Mesh, pick int) (canal, root *mesh.Mesh, notes []string) {
	shells := mesh.Shells(m)
	if len(shells) < 2 || pick > len(shells) {
		return m, nil, nil
	}
	parts := make([]*mesh.Mesh, len(shells))
	for i, s := range shells {
		parts[i] = m.Subset(s)
	}
	// The root is the enclosing shell of largest volume; tests use the first vertex of each
	// other shell, which lies inside the root when the shell does.
	encloses := func(outer, inner *mesh.Mesh, bvh *mesh.BVH) bool {
		return len(inner.Vertices) > 0 && bvh.Inside(inner.Vertices[0])
	}
	best, bestVol := -1, 0.0
	var inside []int
	for i, p := range parts {
		if pick > 0 && i == pick-1 {
			continue
		}
		vol := mesh.Volume(p)
		if vol <= bestVol {
			continue
		}
		bvh := mesh.NewBVH(p)
		var in []int
		for k, q := range parts {
			if k != i && encloses(p, q, bvh) {
				in = append(in, k)
			}
		}
		if len(in) > 0 && (pick == 0 || slices.Contains(in, pick-1)) {
			best, bestVol, inside = i, vol, in
		}
	}
	if best < 0 {
		return m, nil, nil
	}
	c := inside[0] // Shells' order: the largest enclosed shell
	if pick > 0 {
		c = pick - 1
	}
	notes = append(notes, fmt.Sprintf("surface %d of %d encloses the canal and is taken as the root's outer surface", best+1, len(shells)))
	if left := len(shells) - 2; left > 0 {
		notes = append(notes, fmt.Sprintf("surface %d of %d taken as the canal; %d more surface(s) in the file left out", c+1, len(shells), left))
	}
	mesh.OrientConsistently(parts[c])
	return parts[c], parts[best], notes
}
