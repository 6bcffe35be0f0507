package present

import "testing"

// TestMapRows checks the tiled layout of a two-axis sweep's values against the
// plain definition Z[iy][ix] = v[ix·n1+iy], on sizes that are not multiples
// of the tile.
func TestMapRows(t *testing.T) {
	for _, d := range [][2]int{{1, 1}, {1, 7}, {7, 1}, {33, 31}, {65, 40}} {
		n0, n1 := d[0], d[1]
		v := make([]float64, n0*n1)
		for i := range v {
			v[i] = float64(i)*0.5 + 1
		}
		z := mapRows(v, n0, n1)
		if len(z) != n1 {
			t.Fatalf("%d × %d: %d rows, want %d", n0, n1, len(z), n1)
		}
		for iy, row := range z {
			if len(row) != n0 || cap(row) != n0 {
				t.Fatalf("%d × %d: row %d has length %d, capacity %d, want %d", n0, n1, iy, len(row), cap(row), n0)
			}
			for ix, got := range row {
				if want := v[ix*n1+iy]; got != want {
					t.Fatalf("%d × %d: z[%d][%d] = %g, want %g", n0, n1, iy, ix, got, want)
				}
			}
		}
	}
}
