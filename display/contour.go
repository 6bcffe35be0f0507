package display

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// contour traces the level line of z (z[iy][ix] at x[ix], y[iy]) by marching
// squares, joining cell segments into polylines in data coordinates. A corner at
// or above the level counts as inside; a saddle cell is resolved by the mean of
// its corners. Cells with a non-finite corner are skipped. Chains are traced in
// grid order, so the output is the same on every run.
func contour(x, y []float64, z [][]float64, level float64) [][][2]float64 {
	nx, ny := len(x), len(y)
	if nx < 2 || ny < 2 {
		return nil
	}
	// Edge ids: horizontal edge (ix,iy)–(ix+1,iy) is iy*(nx-1)+ix; vertical edge
	// (ix,iy)–(ix,iy+1) follows all horizontal ones.
	nh := ny * (nx - 1)
	hID := func(ix, iy int) int { return iy*(nx-1) + ix }
	vID := func(ix, iy int) int { return nh + iy*nx + ix }
	point := func(id int) [2]float64 {
		if id < nh {
			iy, ix := id/(nx-1), id%(nx-1)
			f := (level - z[iy][ix]) / (z[iy][ix+1] - z[iy][ix])
			return [2]float64{x[ix] + f*(x[ix+1]-x[ix]), y[iy]}
		}
		id -= nh
		iy, ix := id/nx, id%nx
		f := (level - z[iy][ix]) / (z[iy+1][ix] - z[iy][ix])
		return [2]float64{x[ix], y[iy] + f*(y[iy+1]-y[iy])}
	}

	type seg struct{ a, b int }
	var segs []seg
	for iy := range ny - 1 {
		for ix := range nx - 1 {
			c := [4]float64{z[iy][ix], z[iy][ix+1], z[iy+1][ix+1], z[iy+1][ix]}
			if !finite(c[0]) || !finite(c[1]) || !finite(c[2]) || !finite(c[3]) {
				continue
			}
			var in [4]bool
			for k := range c {
				in[k] = c[k] >= level
			}
			// Edges k joins corners k and k+1: bottom, right, top, left.
			e := [4]int{hID(ix, iy), vID(ix+1, iy), hID(ix, iy+1), vID(ix, iy)}
			var cross []int
			for k := range 4 {
				if in[k] != in[(k+1)%4] {
					cross = append(cross, k)
				}
			}
			switch len(cross) {
			case 2:
				segs = append(segs, seg{e[cross[0]], e[cross[1]]})
			case 4:
				centre := (c[0]+c[1]+c[2]+c[3])/4 >= level
				if centre == in[0] {
					// Corners 1 and 3 are cut off.
					segs = append(segs, seg{e[0], e[1]}, seg{e[2], e[3]})
				} else {
					segs = append(segs, seg{e[3], e[0]}, seg{e[1], e[2]})
				}
			}
		}
	}

	at := map[int][]int{} // edge id → segments touching it (at most two)
	for i, s := range segs {
		at[s.a] = append(at[s.a], i)
		at[s.b] = append(at[s.b], i)
	}
	used := make([]bool, len(segs))
	trace := func(start, from int) [][2]float64 {
		pts := [][2]float64{point(from)}
		cur, e := start, from
		for {
			used[cur] = true
			s := segs[cur]
			next := s.a
			if next == e {
				next = s.b
			}
			pts = append(pts, point(next))
			e = next
			cur = -1
			for _, k := range at[e] {
				if !used[k] {
					cur = k
					break
				}
			}
			if cur < 0 {
				return pts
			}
		}
	}
	var lines [][][2]float64
	// Open chains first, from their ends, then closed loops.
	for i, s := range segs {
		if used[i] {
			continue
		}
		if len(at[s.a]) == 1 {
			lines = append(lines, trace(i, s.a))
		} else if len(at[s.b]) == 1 {
			lines = append(lines, trace(i, s.b))
		}
	}
	for i, s := range segs {
		if !used[i] {
			lines = append(lines, trace(i, s.a))
		}
	}
	return lines
}

// contourLines draws traced contour polylines black on a white halo, dropping
// points closer than 0.4 pt to the last one kept (detail no viewer can see on a
// fine grid).
type contourLines [][][2]float64

func (cl contourLines) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	for _, l := range cl {
		var last vg.Point
		for i, q := range l {
			pt := vg.Point{X: trX(q[0]), Y: trY(q[1])}
			switch {
			case i == 0:
				path.Move(pt)
			case i == len(l)-1 || math.Hypot(float64(pt.X-last.X), float64(pt.Y-last.Y)) >= 0.4:
				path.Line(pt)
			default:
				continue
			}
			last = pt
		}
	}
	if len(path) == 0 {
		return
	}
	for _, st := range []draw.LineStyle{contourHalo, contourStyle} {
		c.SetLineStyle(st)
		c.Stroke(path)
	}
}
