package hartree_test

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lamina/hartree"
	"lamina/lattice"
)

func smallScan(t testing.TB) hartree.Scan {
	return hartree.Scan{
		Base: hartree.MeanField{Device: hartree.Device{Stack: stack(t, "AB"), Params: lattice.Minimal()}, Grid: 12, Cutoff: 0.5,
			Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}},
		Ns:           []float64{-0.005, 0, 0.005},
		Ds:           []float64{0, 0.3},
		Search:       hartree.SearchOptions{Profiles: []hartree.Profile{hartree.Linear}, Random: -1},
		Continuation: true,
	}
}

type scanSettings struct {
	Name string
}

// runScan runs the points of sc into path, resuming if asked, with the continuation checkpoint
// next to it; stopAfter > 0 cancels the context after that many points of this run.
func runScan(t *testing.T, sc hartree.Scan, pts []hartree.ScanPoint, path string, resume bool, stopAfter int) error {
	t.Helper()
	o, err := hartree.OpenScanOutput(path, "csv", scanSettings{"test"}, resume)
	require.NoError(t, err)
	defer o.Close()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var start *hartree.HFState
	if resume && o.Last >= 0 {
		s, err := hartree.NewHFSolver(sc.Base, sc.Options)
		require.NoError(t, err)
		st, err := s.LoadState(path + ".state")
		require.NoError(t, err)
		require.Equal(t, int64(o.Last), st.Tag)
		start = st
	}
	n := 0
	sink := func(r hartree.ScanRecord) error {
		if err := o.Write(r); err != nil {
			return err
		}
		n++
		if n == stopAfter {
			cancel()
		}
		return nil
	}
	ckpt := func(p hartree.ScanPoint, st *hartree.HFState) error {
		st.Tag = int64(p.Index)
		return hartree.SaveState(path+".state", st)
	}
	return sc.Run(ctx, pts, o.Done, start, sink, ckpt, nil)
}

// A scan interrupted midway and resumed on the same file gives the same file as an
// uninterrupted run, byte for byte: no point lost or duplicated, and the continuation chain
// carried over by the checkpoint.
func TestScanResume(t *testing.T) {
	sc := smallScan(t)
	dir := t.TempDir()
	full := filepath.Join(dir, "full.csv")
	require.NoError(t, runScan(t, sc, sc.Points(), full, false, 0))
	part := filepath.Join(dir, "part.csv")
	err := runScan(t, sc, sc.Points(), part, false, 2)
	require.Error(t, err)
	assert.True(t, errors.Is(err, context.Canceled))
	// Simulate a crash in the middle of a write: a partial last line must be cut off.
	f, err := os.OpenFile(part, os.O_APPEND|os.O_WRONLY, 0)
	require.NoError(t, err)
	_, err = f.WriteString("2,1,1,0,0.3,layer-pol")
	require.NoError(t, err)
	require.NoError(t, f.Close())
	require.NoError(t, runScan(t, sc, sc.Points(), part, true, 0))
	a, err := os.ReadFile(full)
	require.NoError(t, err)
	b, err := os.ReadFile(part)
	require.NoError(t, err)
	assert.Equal(t, string(a), string(b))
	assert.Equal(t, 3+len(sc.Points()), strings.Count(string(a), "\n"), "header lines plus one line per point")
}

// Shards cover the walk without overlap; merging checks the settings and that no point is
// missing or duplicated.
func TestScanShardsAndMerge(t *testing.T) {
	sc := smallScan(t)
	dir := t.TempDir()
	var paths []string
	seen := map[int]bool{}
	for k := range 3 {
		pts, err := sc.Shard(k, 3)
		require.NoError(t, err)
		for _, p := range pts {
			assert.False(t, seen[p.Index])
			seen[p.Index] = true
		}
		p := filepath.Join(dir, "s"+string(rune('0'+k))+".csv")
		require.NoError(t, runScan(t, sc, pts, p, false, 0))
		paths = append(paths, p)
	}
	assert.Len(t, seen, len(sc.Points()))
	var merged bytes.Buffer
	require.NoError(t, hartree.MergeScans(&merged, paths, len(sc.Points())))
	assert.Equal(t, 3+len(sc.Points()), strings.Count(merged.String(), "\n"))
	err := hartree.MergeScans(&bytes.Buffer{}, paths[:2], len(sc.Points()))
	assert.ErrorContains(t, err, "missing")
	err = hartree.MergeScans(&bytes.Buffer{}, append(paths, paths[0]), len(sc.Points()))
	assert.ErrorContains(t, err, "twice")
	_, err = sc.Shard(3, 3)
	assert.Error(t, err)
	// Resuming with other settings is refused.
	_, err = hartree.OpenScanOutput(paths[0], "csv", scanSettings{"other"}, true)
	assert.ErrorContains(t, err, "other settings")
}

// The walk is serpentine: consecutive points are neighbours on the grid.
func TestScanWalk(t *testing.T) {
	sc := smallScan(t)
	pts := sc.Points()
	require.Len(t, pts, 6)
	for i := 1; i < len(pts); i++ {
		di, dj := pts[i].I-pts[i-1].I, pts[i].J-pts[i-1].J
		assert.Equal(t, 1, abs(di)+abs(dj), "step %d", i)
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// A state written to a checkpoint reads back identically and restarts the iteration at once.
func TestStateCheckpoint(t *testing.T) {
	mf := hartree.MeanField{Device: hartree.Device{Stack: stack(t, "AB"), Params: lattice.Minimal()}, Grid: 16, Cutoff: 0.5,
		Interaction: hartree.Interaction{Eps: 6, Screening: hartree.Unscreened}}
	s := hfSolver(t, mf)
	path := filepath.Join(t.TempDir(), "ck.state")
	sk := s.WithOptions(hartree.HFOptions{})
	r := hfSolve(t, sk, hartree.PatternSeed(laf, hartree.Linear, 0))
	r.State.Tag = 42
	require.NoError(t, hartree.SaveState(path, r.State))
	st, err := s.LoadState(path)
	require.NoError(t, err)
	assert.Equal(t, r.State.U, st.U)
	assert.Equal(t, r.State.Sigma, st.Sigma)
	assert.Equal(t, int64(42), st.Tag)
	again := hfSolve(t, s, hartree.Seed{Name: "restart", From: st})
	assert.LessOrEqual(t, again.Iterations, 3, "a converged state restarts converged")
	assert.InDelta(t, r.Energy, again.Energy, 1e-12)
	// A state of another problem is refused.
	other := hfSolver(t, hartree.MeanField{Device: hartree.Device{Stack: stack(t, "ABC"), Params: lattice.Minimal()}, Grid: 16, Cutoff: 0.5,
		Interaction: hartree.Interaction{Screening: hartree.Unscreened}})
	_, err = other.LoadState(path)
	assert.Error(t, err)
	require.NoError(t, os.WriteFile(path, []byte("garbage"), 0o644))
	_, err = s.LoadState(path)
	assert.Error(t, err)
}

// With fresh seeds only every few points (and wherever the continued state changes class) the
// map of ground-state classes equals the full search, with fewer iterations, on a stretch of the
// map inside one phase (layer polarized by the field). (Across a phase boundary it can follow the
// old state for up to FreshEvery points: at n = 2e11 cm^-2 on this grid the full search finds a
// flavour-polarized ground state that the continuation reaches only at the next fresh point.)
func TestScanFreshEvery(t *testing.T) {
	sc := smallScan(t)
	sc.Ns = []float64{0}
	sc.Ds = []float64{0.3, 0.32, 0.34, 0.36, 0.38, 0.4}
	collect := func(sc hartree.Scan) ([]string, int) {
		var classes []string
		iters := 0
		err := sc.Run(context.Background(), sc.Points(), nil, nil, func(r hartree.ScanRecord) error {
			require.NotNil(t, r.Ground)
			classes = append(classes, r.Ground.Class)
			iters += r.Iterations
			return nil
		}, nil, nil)
		require.NoError(t, err)
		return classes, iters
	}
	full, itFull := collect(sc)
	sc.FreshEvery = 3
	light, itLight := collect(sc)
	assert.Equal(t, full, light)
	assert.Less(t, itLight, itFull)
}
