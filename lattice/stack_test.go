package lattice_test

import (
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/lattice"
)

func TestParseStackValid(t *testing.T) {
	cases := []struct {
		in, want     string
		bernal, rhom bool
	}{
		{"A", "A", true, true},
		{"AB", "AB", true, true},
		{"aba", "ABA", true, false},
		{" ABC ", "ABC", false, true},
		{"ACB", "ACB", false, true},
		{"ABCA", "ABCA", false, true},
		{"ABCB", "ABCB", false, false},
		{"BCBC", "BCBC", true, false},
		{strings.Repeat("AB", 16), strings.Repeat("AB", 16), true, false},
	}
	for _, tc := range cases {
		t.Run(tc.in, func(t *testing.T) {
			st, err := lattice.ParseStack(tc.in)
			require.NoError(t, err)
			assert.Equal(t, tc.want, st.String())
			assert.Equal(t, len(tc.want), st.Layers())
			assert.Equal(t, 2*len(tc.want), st.Orbitals())
			assert.Equal(t, tc.bernal, st.IsBernal(), "IsBernal")
			assert.Equal(t, tc.rhom, st.IsRhombohedral(), "IsRhombohedral")
		})
	}
}

func TestParseStackErrors(t *testing.T) {
	cases := []struct {
		in      string
		pos     int
		contain string
	}{
		{"", 0, "empty"},
		{"   ", 0, "empty"},
		{"ABD", 3, `'D'`},
		{"AAB", 2, "repeats"},
		{"ABB", 3, "repeats"},
		{"A B", 2, `' '`},
		{"AÖB", 2, `'Ö'`},
		{"AB1", 3, `'1'`},
		{strings.Repeat("AB", 33), 0, "exceed"},
	}
	for _, tc := range cases {
		t.Run(tc.in, func(t *testing.T) {
			_, err := lattice.ParseStack(tc.in)
			require.Error(t, err)
			assert.True(t, errors.Is(err, lattice.ErrStacking))
			var se *lattice.StackError
			require.True(t, errors.As(err, &se))
			assert.Equal(t, tc.pos, se.Pos)
			assert.Contains(t, err.Error(), tc.contain)
			assert.True(t, strings.HasPrefix(err.Error(), "lattice: "))
		})
	}
}

func TestConstructors(t *testing.T) {
	b, err := lattice.NewBernal(5)
	require.NoError(t, err)
	assert.Equal(t, "ABABA", b.String())
	r, err := lattice.NewRhombohedral(5)
	require.NoError(t, err)
	assert.Equal(t, "ABCAB", r.String())
	big, err := lattice.NewBernal(lattice.MaxLayers)
	require.NoError(t, err)
	assert.Equal(t, lattice.MaxLayers, big.Layers())
	for _, n := range []int{-1, 0, lattice.MaxLayers + 1} {
		_, err := lattice.NewBernal(n)
		assert.ErrorIs(t, err, lattice.ErrStacking, "N=%d", n)
		_, err = lattice.NewRhombohedral(n)
		assert.ErrorIs(t, err, lattice.ErrStacking, "N=%d", n)
	}
}

// The dimer pairs follow from the letters (shared/design.md section 3): if the upper letter
// follows the lower cyclically the pair is (B_l, A_{l+1}), otherwise (A_l, B_{l+1}).
// Examples AB: B1-A2; ABA: B1-A2, A2-B3; ABC: B1-A2, B2-A3 (McCann & Koshino, Rep. Prog. Phys.
// 76, 056503 (2013), figures of Bernal and rhombohedral stacks).
func TestDimerPairs(t *testing.T) {
	A, B := lattice.SubA, lattice.SubB
	cases := []struct {
		stack string
		pairs [][2]int
	}{
		{"AB", [][2]int{{lattice.Site(1, B), lattice.Site(2, A)}}},
		{"BA", [][2]int{{lattice.Site(1, A), lattice.Site(2, B)}}},
		{"ABA", [][2]int{{lattice.Site(1, B), lattice.Site(2, A)}, {lattice.Site(2, A), lattice.Site(3, B)}}},
		{"ABC", [][2]int{{lattice.Site(1, B), lattice.Site(2, A)}, {lattice.Site(2, B), lattice.Site(3, A)}}},
		{"CA", [][2]int{{lattice.Site(1, B), lattice.Site(2, A)}}},
		{"AC", [][2]int{{lattice.Site(1, A), lattice.Site(2, B)}}},
	}
	for _, tc := range cases {
		t.Run(tc.stack, func(t *testing.T) {
			st, err := lattice.ParseStack(tc.stack)
			require.NoError(t, err)
			dp := st.DimerPairs()
			require.Len(t, dp, len(tc.pairs))
			for i, p := range dp {
				assert.Equal(t, tc.pairs[i], [2]int{p.I, p.J}, "pair %d", i)
				assert.Equal(t, i+1, p.L)
			}
		})
	}
}

type hop struct {
	class lattice.Class
	i, j  string
}

func siteName(i int) string {
	return lattice.SiteSublattice(i).String() + string(rune('0'+lattice.SiteLayer(i)))
}

func hops(st lattice.Stack, skip0 bool) []hop {
	var out []hop
	for _, c := range st.Couplings() {
		if skip0 && c.Class == lattice.Gamma0 {
			continue
		}
		out = append(out, hop{c.Class, siteName(c.I), siteName(c.J)})
	}
	return out
}

// SWMcC classes of the ABA and ABC trilayers as written out in Koshino & McCann, PRB 79, 125443
// (2009) (ABA: gamma3 A1-B2 and B2-A3, gamma4 A1-A2, B1-B2, A2-A3, B2-B3, gamma2/2 A1-A3,
// gamma5/2 B1-B3) and Koshino & McCann, PRB 80, 165409 (2009) (ABC: gamma2/2 between the outer
// low-energy sites A1 and B3). Both from memory of the papers' Hamiltonians.
func TestCouplingClasses(t *testing.T) {
	g1, g2, g3, g4, g5 := lattice.Gamma1, lattice.Gamma2, lattice.Gamma3, lattice.Gamma4, lattice.Gamma5
	cases := []struct {
		stack string
		want  []hop
	}{
		{"AB", []hop{{g4, "A1", "A2"}, {g3, "A1", "B2"}, {g1, "B1", "A2"}, {g4, "B1", "B2"}}},
		{"ABA", []hop{
			{g4, "A1", "A2"}, {g3, "A1", "B2"}, {g2, "A1", "A3"},
			{g1, "B1", "A2"}, {g4, "B1", "B2"}, {g5, "B1", "B3"},
			{g4, "A2", "A3"}, {g1, "A2", "B3"},
			{g3, "B2", "A3"}, {g4, "B2", "B3"},
		}},
		{"ABC", []hop{
			{g4, "A1", "A2"}, {g3, "A1", "B2"}, {g2, "A1", "B3"},
			{g1, "B1", "A2"}, {g4, "B1", "B2"},
			{g4, "A2", "A3"}, {g3, "A2", "B3"},
			{g1, "B2", "A3"}, {g4, "B2", "B3"},
		}},
		// Mixed stacking, derived by hand from the positions A:0, B:1, C:2 (units of δ).
		{"ABCB", []hop{
			{g4, "A1", "A2"}, {g3, "A1", "B2"}, {g2, "A1", "B3"},
			{g1, "B1", "A2"}, {g4, "B1", "B2"},
			{g4, "A2", "A3"}, {g3, "A2", "B3"}, {g2, "A2", "A4"},
			{g1, "B2", "A3"}, {g4, "B2", "B3"}, {g5, "B2", "B4"},
			{g4, "A3", "A4"}, {g1, "A3", "B4"},
			{g3, "B3", "A4"}, {g4, "B3", "B4"},
		}},
	}
	for _, tc := range cases {
		t.Run(tc.stack, func(t *testing.T) {
			st, err := lattice.ParseStack(tc.stack)
			require.NoError(t, err)
			assert.ElementsMatch(t, tc.want, hops(st, true))
		})
	}
}

// Every adjacent pair of layers has exactly one gamma1, one gamma3 and two gamma4 couplings,
// and every layer one gamma0 bond, for any sequence.
func TestCouplingCounts(t *testing.T) {
	for _, s := range []string{"ABCBACAB", "ACBCABAC", "ABABCACB"} {
		st, err := lattice.ParseStack(s)
		require.NoError(t, err)
		count := map[lattice.Class]int{}
		for _, c := range st.Couplings() {
			count[c.Class]++
			assert.Less(t, c.I, c.J)
		}
		n := st.Layers()
		assert.Equal(t, n, count[lattice.Gamma0], s)
		assert.Equal(t, n-1, count[lattice.Gamma1], s)
		assert.Equal(t, n-1, count[lattice.Gamma3], s)
		assert.Equal(t, 2*(n-1), count[lattice.Gamma4], s)
	}
}

func TestDimerSites(t *testing.T) {
	st, err := lattice.ParseStack("ABA")
	require.NoError(t, err)
	// B1, A2, B3 are dimer sites of the ABA trilayer (Koshino & McCann 2009, Delta' on them).
	assert.Equal(t, []bool{false, true, true, false, false, true}, st.DimerSites())
}
