package main

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var update = flag.Bool("update", false, "rewrite testdata/*.golden")

func TestRunGolden(t *testing.T) {
	var out, errb bytes.Buffer
	args := []string{"-stacking", "AB", "-params", "minimal", "-dU", "100", "-points", "5", "-kmax", "0.2", "-png", ""}
	require.NoError(t, run(context.Background(), args, &out, &errb))
	golden := filepath.Join("testdata", "ab_minimal.golden")
	if *update {
		require.NoError(t, os.WriteFile(golden, out.Bytes(), 0o644))
	}
	want, err := os.ReadFile(golden)
	require.NoError(t, err)
	assert.Equal(t, string(want), out.String())
	// The K-point row of the biased bilayer has the bands ±U/2 = ±50 meV at the two low bands
	// (K-point gap = |U|, McCann PRB 74, 161403 (2006)).
	assert.Contains(t, out.String(), "0.000000,0.000000,0.000000,2,-50.0000")
	assert.Contains(t, out.String(), "0.000000,0.000000,0.000000,3,50.0000")
}

func TestRunDefaultWritesPlotAndTable(t *testing.T) {
	dir := t.TempDir()
	png := filepath.Join(dir, "b.png")
	csv := filepath.Join(dir, "b.csv")
	require.NoError(t, run(context.Background(), []string{"-points", "11", "-o", csv, "-png", png}, &bytes.Buffer{}, &bytes.Buffer{}))
	b, err := os.ReadFile(csv)
	require.NoError(t, err)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	require.Len(t, lines, 2+11*8) // comment, header, 11 k-points x 8 bands (tetralayer)
	assert.True(t, strings.HasPrefix(lines[1], "k_1_per_nm,kx_1_per_nm,ky_1_per_nm,band,E_meV,w_L1"))
	fi, err := os.Stat(png)
	require.NoError(t, err)
	assert.Greater(t, fi.Size(), int64(1000))
	pngHead, err := os.ReadFile(png)
	require.NoError(t, err)
	assert.Equal(t, "\x89PNG", string(pngHead[:4]))
}

func TestRunZonePath(t *testing.T) {
	var out bytes.Buffer
	require.NoError(t, run(context.Background(), []string{"-stacking", "A", "-params", "minimal", "-path", "zone", "-points", "30", "-png", ""}, &out, &bytes.Buffer{}))
	// Nearest-neighbour graphene: E(Γ) = ±3γ0 = ±9480 meV (Castro Neto et al., RMP 81, 109 (2009)).
	assert.Contains(t, out.String(), "0.000000,0.000000,0.000000,1,-9480.0000")
	assert.Contains(t, out.String(), "full zone")
}

func TestRunBadFlags(t *testing.T) {
	cases := map[string][]string{
		"letters":   {"-stacking", "ABX"},
		"repeat":    {"-stacking", "ABBA"},
		"preset":    {"-params", "nosuch"},
		"U count":   {"-U", "1,2"},
		"U parse":   {"-U", "1,x,2,3"},
		"U nan":     {"-U", "1,NaN,2,3"},
		"valley":    {"-valley", "Q"},
		"path":      {"-path", "circle"},
		"kmax":      {"-kmax", "-1"},
		"points":    {"-points", "1"},
		"unknown":   {"-frobnicate"},
		"extra arg": {"ABA"},
		"dU inf":    {"-dU", "Inf"},
	}
	for name, args := range cases {
		t.Run(name, func(t *testing.T) {
			var errb bytes.Buffer
			err := run(context.Background(), append(args, "-png", ""), &bytes.Buffer{}, &errb)
			require.Error(t, err)
			var ue usageError
			assert.True(t, errors.As(err, &ue), "%v should be a usage error (exit 2)", err)
			assert.NotContains(t, err.Error(), "\n")
		})
	}
}

func TestRunCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	err := run(ctx, []string{"-png", ""}, &bytes.Buffer{}, &bytes.Buffer{})
	assert.ErrorIs(t, err, context.Canceled)
}
