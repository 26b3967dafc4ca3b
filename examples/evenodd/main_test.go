package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var tiny = []string{"-screening", "bare", "-eps", "6", "-grid", "16", "-cutoff", "500", "-png", "", "-png-tc", "", "-quiet"}

// The JSON keys are a contract with scripts (issues: examples/evenodd and its -tc flag).
func TestJSONContract(t *testing.T) {
	var out bytes.Buffer
	require.NoError(t, run(context.Background(), append(tiny, "-layers", "1-3", "-format", "json"), &out, &bytes.Buffer{}))
	var rows []map[string]any
	require.NoError(t, json.Unmarshal(out.Bytes(), &rows))
	require.Len(t, rows, 3)
	for i, r := range rows {
		for _, k := range []string{"layers", "stacking", "state", "gap_meV", "sector_gaps_meV", "sigma_xy_e2_h", "converged"} {
			assert.Contains(t, r, k)
		}
		assert.NotContains(t, r, "Tc_K", "Tc only with -tc")
		assert.Equal(t, float64(i+1), r["layers"])
	}
	// Sectors of the Bernal decomposition (Koshino & Ando, PRB 76, 085425 (2007)): N = 1 one
	// monolayer-like, N = 2 one bilayer-like, N = 3 one of each.
	assert.Len(t, rows[0]["sector_gaps_meV"], 1)
	assert.Len(t, rows[1]["sector_gaps_meV"], 1)
	assert.Len(t, rows[2]["sector_gaps_meV"], 2)
	assert.Equal(t, "ABA", rows[2]["stacking"])
}

// With -tc the table gains Tc_K; below the monolayer's critical coupling (ε = 6, bare) the
// monolayer stays symmetric (Tc 0) and the bilayer orders with a finite Tc, and the gap-to-Tc
// ratio is of the mean-field order 3.5 (common practice: 2Δ/k_BTc = 3.53 in weak coupling).
func TestTcColumn(t *testing.T) {
	var out bytes.Buffer
	dir := t.TempDir()
	args := append(append([]string(nil), tiny...), "-layers", "1,2", "-tc", "-format", "json", "-png-tc", filepath.Join(dir, "tc.png"))
	require.NoError(t, run(context.Background(), args, &out, &bytes.Buffer{}))
	var rows []map[string]any
	require.NoError(t, json.Unmarshal(out.Bytes(), &rows))
	require.Len(t, rows, 2)
	assert.Equal(t, 0.0, rows[0]["Tc_K"])
	assert.Greater(t, rows[1]["Tc_K"].(float64), 10.0)
	assert.InDelta(t, 3.53, rows[1]["gap_over_kTc"].(float64), 1.0)
	head, err := os.ReadFile(filepath.Join(dir, "tc.png"))
	require.NoError(t, err)
	assert.Equal(t, "\x89PNG", string(head[:4]))
}

func TestCSVHeader(t *testing.T) {
	var out bytes.Buffer
	require.NoError(t, run(context.Background(), append(tiny, "-layers", "2", "-tc"), &out, &bytes.Buffer{}))
	lines := strings.Split(out.String(), "\n")
	require.GreaterOrEqual(t, len(lines), 3)
	assert.True(t, strings.HasPrefix(lines[0], "# params minimal"))
	for _, col := range []string{"layers", "stacking", "state", "gap_meV", "sector_gaps_meV", "sigma_xy_e2_h", "converged", "Tc_K"} {
		assert.Contains(t, strings.Split(lines[1], ","), col)
	}
}

func TestBadFlags(t *testing.T) {
	for name, args := range map[string][]string{
		"layers":    {"-layers", "0-3"},
		"layers2":   {"-layers", "4-2"},
		"layers3":   {"-layers", "x"},
		"big":       {"-layers", "1-40"},
		"screening": {"-screening", "gw"},
		"eps":       {"-eps", "0"},
		"format":    {"-format", "xml"},
		"params":    {"-params", "none"},
	} {
		t.Run(name, func(t *testing.T) {
			err := run(context.Background(), append(args, "-quiet", "-png", ""), &bytes.Buffer{}, &bytes.Buffer{})
			var ue usageError
			require.Error(t, err)
			assert.True(t, errors.As(err, &ue), "%v", err)
		})
	}
}
