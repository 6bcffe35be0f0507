package dsl

import (
	"context"
	"math/rand"
	"strings"
	"testing"
)

// levenshtein is the textbook full-table distance, the reference for
// boundedDistance.
func levenshtein(a, b []rune) int {
	d := make([][]int, len(a)+1)
	for i := range d {
		d[i] = make([]int, len(b)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(a); i++ {
		for j := 1; j <= len(b); j++ {
			c := d[i-1][j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			d[i][j] = min(c, d[i-1][j]+1, d[i][j-1]+1)
		}
	}
	return d[len(a)][len(b)]
}

func TestBoundedDistanceMatchesFullTable(t *testing.T) {
	rng := rand.New(rand.NewSource(1))
	word := func() []rune {
		r := make([]rune, rng.Intn(12))
		for i := range r {
			r[i] = rune('a' + rng.Intn(3))
		}
		return r
	}
	for n := 0; n < 20000; n++ {
		a, b, k := word(), word(), rng.Intn(6)
		want := levenshtein(a, b)
		got, _ := boundedDistance(a, b, k)
		if want <= k && got != want || want > k && got <= k {
			t.Fatalf("boundedDistance(%q, %q, %d) = %d, full table %d", string(a), string(b), k, got, want)
		}
	}
}

func TestSuggestBounded(t *testing.T) {
	long := strings.Repeat("a", 300_000)
	cands := []string{long + "b", "amp", "deg", strings.Repeat("a", 64)}
	// A 300,000-character word is compared with nothing.
	if s, work := suggestWork(context.Background(), long, cands); s != "" || work != 0 {
		t.Errorf("300,000-character word: got %q after %d cells, want no suggestion and no work", s, work)
	}
	// A short word is compared in a band: at most len × (2·limit+1) cells per
	// candidate, and the long candidate is skipped.
	word := strings.Repeat("a", 60) + "b"
	s, work := suggestWork(context.Background(), word, cands)
	if s != "; did you mean "+strings.Repeat("a", 64)+"?" {
		t.Errorf("got %q", s)
	}
	limit := (len(word) + 1) / 3
	if bound := len(cands) * len(word) * (2*limit + 1); work > bound {
		t.Errorf("work %d cells, over the band's bound %d", work, bound)
	}
	// Typos still find their names.
	for _, c := range []struct{ word, want string }{{"dg", "deg"}, {"offst", "offset"}, {"mxx", "mx"}} {
		if got := suggest(c.word, []string{"deg", "G", "offset", "mx", "my"}); got != "; did you mean "+c.want+"?" {
			t.Errorf("suggest(%q) = %q, want %s", c.word, got, c.want)
		}
	}
}

func TestSuggestStopsWhenCancelled(t *testing.T) {
	cands := make([]string, 100_000)
	for i := range cands {
		cands[i] = "name" + strings.Repeat("x", i%20)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if s, work := suggestWork(ctx, "nmae", cands); s != "" || work != 0 {
		t.Errorf("cancelled: got %q after %d cells, want nothing done", s, work)
	}
	if _, work := suggestWork(context.Background(), "nmae", cands); work == 0 {
		t.Errorf("not cancelled: no work done, so the test above shows nothing")
	}
}

// A misspelt 300,000-character name in a session that holds one: the error
// comes back without a suggestion (before the cap, this compared 300,000² cells).
func TestSuggestLongNameInSession(t *testing.T) {
	s := NewSession(t.TempDir())
	name := strings.Repeat("a", 300_000)
	if err := s.Exec(context.Background(), "let "+name+" = 1", Sink{}); err != nil {
		t.Fatal(err)
	}
	err := s.Exec(context.Background(), "print "+name+"b", Sink{})
	if err == nil || !strings.Contains(err.Error(), "unknown name") || strings.Contains(err.Error(), "did you mean") {
		t.Fatalf("got %v, want an unknown name without suggestion", err)
	}
}
