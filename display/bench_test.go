package display

import (
	"fmt"
	"math"
	"testing"
)

func profileSized(n int) Profile {
	p := sampleProfile()
	p.X.Values = linspace(-3000, 3000, n)
	for i := range p.Curves {
		y := make([]float64, n)
		for k, x := range p.X.Values {
			y[k] = math.Exp(-x*x/(2*450*450)) * math.Cos(float64(i)*x/700)
		}
		p.Curves[i].Y = y
	}
	return p
}

func BenchmarkProfileBundle(b *testing.B) {
	for _, n := range []int{61, 601, 6001} {
		p := profileSized(n)
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			for b.Loop() {
				p.Bundle()
			}
		})
	}
}

func BenchmarkMapBundle(b *testing.B) {
	for _, d := range [][2]int{{41, 21}, {161, 101}, {641, 401}} {
		m := sampleMapSized(d[0], d[1])
		b.Run(fmt.Sprintf("%dx%d", d[0], d[1]), func(b *testing.B) {
			for b.Loop() {
				m.Bundle()
			}
		})
	}
}

func BenchmarkWaveformBundle(b *testing.B) {
	w, t := sampleWaveform(true)
	for b.Loop() {
		w.Bundle(t)
	}
}

func BenchmarkTableBundle(b *testing.B) {
	t := sampleTable()
	for b.Loop() {
		t.Bundle()
	}
}
