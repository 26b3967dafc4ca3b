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

// tiny is a bilayer with the bare interaction on a coarse grid: it orders strongly and solves
// in about a second.
var tiny = []string{"-stacking", "AB", "-eps", "6", "-screening", "bare", "-grid", "16", "-cutoff", "500", "-random", "1", "-quiet"}

// The JSON keys are a contract with scripts (issue: examples/ordering).
var keys = []string{"state", "seed", "energy_meV_per_nm2", "gap_meV", "layer_density_1e12_cm2", "chern", "sigma_xy_e2_h", "converged", "iterations", "ground"}

func TestJSONContract(t *testing.T) {
	var out bytes.Buffer
	require.NoError(t, run(context.Background(), append(tiny, "-format", "json"), &out, &bytes.Buffer{}))
	var rows []map[string]any
	require.NoError(t, json.Unmarshal(out.Bytes(), &rows))
	require.NotEmpty(t, rows)
	grounds := 0
	for _, r := range rows {
		for _, k := range keys {
			assert.Contains(t, r, k)
		}
		if r["ground"] == true {
			grounds++
		}
		assert.Len(t, r["layer_density_1e12_cm2"], 4, "four flavours")
		assert.Len(t, r["chern"], 4)
	}
	assert.Equal(t, 1, grounds)
	first := rows[0]
	assert.Equal(t, true, first["ground"])
	assert.Less(t, first["energy_meV_per_nm2"].(float64), 0.0, "the ground state lies below the symmetric state")
	// Bilayer states, Zhang et al., PRL 106, 156801 (2011): anomalous Hall σ_xy = 2N = 4,
	// 3:1 = N = 2, layer polarized 0 (grid Berry flux: within 0.05).
	for _, r := range rows {
		sxy, ok := r["sigma_xy_e2_h"].(float64)
		if !ok {
			continue
		}
		switch r["state"] {
		case "anomalous-Hall":
			assert.InDelta(t, 4, math.Abs(sxy), 0.1)
		case "ALL (3:1)":
			assert.InDelta(t, 2, math.Abs(sxy), 0.1)
		case "layer-polarized":
			assert.InDelta(t, 0, sxy, 1e-6)
		}
	}
}

func TestCSVGolden(t *testing.T) {
	var out bytes.Buffer
	require.NoError(t, run(context.Background(), tiny, &out, &bytes.Buffer{}))
	golden := filepath.Join("testdata", "ab_bare.golden")
	if *update {
		require.NoError(t, os.WriteFile(golden, out.Bytes(), 0o644))
	}
	want, err := os.ReadFile(golden)
	require.NoError(t, err)
	assert.Equal(t, string(want), out.String())
}

func TestProgressLines(t *testing.T) {
	var errb bytes.Buffer
	args := []string{"-stacking", "A", "-eps", "10", "-screening", "bare", "-grid", "12", "-cutoff", "300", "-random", "0"}
	require.NoError(t, run(context.Background(), args, &bytes.Buffer{}, &errb))
	assert.Contains(t, errb.String(), "ordering: seed 1/")
}

func TestBadFlags(t *testing.T) {
	cases := map[string][]string{
		"stacking":  {"-stacking", "AA"},
		"params":    {"-params", "nope"},
		"eps":       {"-eps", "-1"},
		"gates":     {"-gates", "three"},
		"gate dist": {"-gates", "one", "-gate-distance", "0"},
		"screening": {"-screening", "magic"},
		"tf":        {"-screening", "thomas-fermi"},
		"grid":      {"-grid", "2"},
		"cutoff":    {"-cutoff", "NaN"},
		"T":         {"-T", "-1"},
		"format":    {"-format", "yaml"},
		"arg":       {"extra"},
		"flag":      {"-nope"},
	}
	for name, args := range cases {
		t.Run(name, func(t *testing.T) {
			err := run(context.Background(), append(args, "-quiet"), &bytes.Buffer{}, &bytes.Buffer{})
			require.Error(t, err)
			var ue usageError
			assert.True(t, errors.As(err, &ue), "%v", err)
			assert.False(t, strings.Contains(err.Error(), "\n"))
		})
	}
}

func TestCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	err := run(ctx, tiny, &bytes.Buffer{}, &bytes.Buffer{})
	assert.ErrorIs(t, err, context.Canceled)
}
