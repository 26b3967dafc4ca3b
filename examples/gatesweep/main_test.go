package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var update = flag.Bool("update", false, "rewrite testdata/*.golden")

// The JSON keys are a contract with scripts (issue: examples/gatesweep).
var jsonKeys = []string{"stacking", "D_V_per_nm", "n_1e12_cm2", "eps_z", "T_K", "dU_meV", "U_meV",
	"dn_1e12_cm2", "gap_meV", "mu_meV", "converged", "iterations"}

func TestJSONContract(t *testing.T) {
	var out, errb bytes.Buffer
	args := []string{"-stacking", "AB", "-params", "minimal", "-D", "0.1,0.5", "-format", "json", "-png", ""}
	require.NoError(t, run(context.Background(), args, &out, &errb))
	var rows []map[string]any
	require.NoError(t, json.Unmarshal(out.Bytes(), &rows))
	require.Len(t, rows, 2)
	for _, r := range rows {
		for _, k := range jsonKeys {
			assert.Contains(t, r, k)
		}
		assert.Equal(t, true, r["converged"])
		assert.Len(t, r["U_meV"], 2)
		assert.Len(t, r["dn_1e12_cm2"], 2)
	}
	// Minimal-model bilayer: the gap is |U|γ1/sqrt(γ1²+U²) of the self-consistent U (McCann,
	// PRB 74, 161403(R) (2006)); in meV with 4-decimal output.
	du := rows[1]["dU_meV"].(float64)
	gap := rows[1]["gap_meV"].(float64)
	assert.InDelta(t, du*390/math.Hypot(390, du), gap, 2e-3)
	assert.Equal(t, 2, strings.Count(errb.String(), "converged in"), "one progress line per point")
}

func TestCSVGolden(t *testing.T) {
	var out bytes.Buffer
	args := []string{"-stacking", "ABC", "-params", "minimal", "-D", "0,0.3", "-n", "0.5", "-epsz", "2", "-png", "", "-quiet"}
	require.NoError(t, run(context.Background(), args, &out, &bytes.Buffer{}))
	golden := filepath.Join("testdata", "abc_minimal.golden")
	if *update {
		require.NoError(t, os.WriteFile(golden, out.Bytes(), 0o644))
	}
	want, err := os.ReadFile(golden)
	require.NoError(t, err)
	assert.Equal(t, string(want), out.String())
	header := strings.SplitN(out.String(), "\n", 2)[0]
	for _, k := range jsonKeys {
		assert.Contains(t, strings.Split(header, ","), k)
	}
}

func TestDefaultRunWritesPlot(t *testing.T) {
	if testing.Short() {
		t.Skip("the default sweep takes a few seconds; TestJSONContract covers the pipeline")
	}
	dir := t.TempDir()
	png := filepath.Join(dir, "g.png")
	csv := filepath.Join(dir, "g.csv")
	require.NoError(t, run(context.Background(), []string{"-o", csv, "-png", png, "-quiet"}, &bytes.Buffer{}, &bytes.Buffer{}))
	b, err := os.ReadFile(csv)
	require.NoError(t, err)
	assert.Len(t, strings.Split(strings.TrimSpace(string(b)), "\n"), 12)
	head, err := os.ReadFile(png)
	require.NoError(t, err)
	assert.Equal(t, "\x89PNG", string(head[:4]))
}

func TestBadFlags(t *testing.T) {
	cases := map[string][]string{
		"stacking":  {"-stacking", "ABBA"},
		"params":    {"-params", "nope"},
		"epsz":      {"-epsz", "0"},
		"epsz nan":  {"-epsz", "NaN"},
		"D list":    {"-D", "0.1,x"},
		"D inf":     {"-D", "Inf"},
		"step":      {"-dstep", "0"},
		"range":     {"-dmin", "1", "-dmax", "0"},
		"T":         {"-T", "-3"},
		"format":    {"-format", "xml"},
		"model":     {"-model", "lattice"},
		"gate":      {"-bottom-nm", "-1"},
		"gate eps":  {"-eps-gate", "0"},
		"cutoff":    {"-cutoff", "-1"},
		"extra arg": {"oops"},
		"unknown":   {"-frob"},
		"continuum": {"-model", "continuum"}, // bilayer-ir has γ3: needs a cutoff
	}
	for name, args := range cases {
		t.Run(name, func(t *testing.T) {
			err := run(context.Background(), append(args, "-png", "", "-quiet"), &bytes.Buffer{}, &bytes.Buffer{})
			require.Error(t, err)
			var ue usageError
			assert.True(t, errors.As(err, &ue), "%v", err)
		})
	}
}

func TestCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out bytes.Buffer
	err := run(ctx, []string{"-params", "minimal", "-D", "0.1,0.2", "-png", "", "-quiet"}, &out, &bytes.Buffer{})
	assert.ErrorIs(t, err, context.Canceled)
	assert.True(t, strings.HasPrefix(out.String(), "stacking,"), "the header is written before the first point")
}
