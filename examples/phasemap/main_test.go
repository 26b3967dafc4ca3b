package main

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func noenv(string) string { return "" }

// tiny is a 2×2 map of a bilayer on a coarse grid with few seeds.
func tiny(out string) []string {
	return []string{"-grid", "10", "-nsteps", "2", "-dsteps", "2", "-nmin", "0", "-nmax", "0.5", "-dmax", "0.3", "-o", out, "-png", "", "-quiet"}
}

func TestRunWritesMapAndPlot(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "m.csv")
	png := filepath.Join(dir, "m.png")
	args := append(tiny(out), "-png", png)
	require.NoError(t, run(context.Background(), args, &bytes.Buffer{}, &bytes.Buffer{}, noenv))
	b, err := os.ReadFile(out)
	require.NoError(t, err)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	require.Len(t, lines, 3+4)
	assert.Equal(t, "# lamina phase map v1", lines[0])
	assert.True(t, strings.HasPrefix(lines[1], "# settings {"))
	assert.Contains(t, lines[2], "n_1e12_cm2,D_V_per_nm,state")
	head, err := os.ReadFile(png)
	require.NoError(t, err)
	assert.Equal(t, "\x89PNG", string(head[:4]))
	_, err = os.Stat(out + ".state")
	assert.NoError(t, err, "continuation checkpoint written")
}

// Shards from the flag and from the job-array environment, then a merge that checks that no
// point is missing.
func TestShardsEnvAndMerge(t *testing.T) {
	dir := t.TempDir()
	s0, s1 := filepath.Join(dir, "s0.csv"), filepath.Join(dir, "s1.csv")
	require.NoError(t, run(context.Background(), append(tiny(s0), "-shard", "0/2"), &bytes.Buffer{}, &bytes.Buffer{}, noenv))
	env := map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_COUNT": "2", "SLURM_ARRAY_TASK_MIN": "1"}
	require.NoError(t, run(context.Background(), tiny(s1), &bytes.Buffer{}, &bytes.Buffer{}, func(k string) string { return env[k] }))
	merged := filepath.Join(dir, "all.csv")
	// The merge reads the grid from the shards' settings.
	args := []string{"-o", merged, "-png", "", "-merge", s0, s1}
	require.NoError(t, run(context.Background(), args, &bytes.Buffer{}, &bytes.Buffer{}, noenv))
	b, err := os.ReadFile(merged)
	require.NoError(t, err)
	assert.Equal(t, 3+4, strings.Count(string(b), "\n"))
	err = run(context.Background(), []string{"-o", merged, "-png", "", "-merge", s0}, &bytes.Buffer{}, &bytes.Buffer{}, noenv)
	assert.ErrorContains(t, err, "missing")
}

// An interrupted run resumes in the same file and ends with every point once.
func TestResume(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "m.csv")
	ctx, cancel := context.WithCancel(context.Background())
	sb := &syncBuffer{b: &bytes.Buffer{}}
	args := tiny(out)[:len(tiny(out))-1] // keep progress lines
	go func() {
		for ctx.Err() == nil {
			sb.mu.Lock()
			seen := strings.Contains(sb.b.String(), "2/4 points")
			sb.mu.Unlock()
			if seen {
				cancel()
				return
			}
			time.Sleep(time.Millisecond)
		}
	}()
	err := run(ctx, args, &bytes.Buffer{}, sb, noenv)
	cancel()
	if err != nil {
		assert.True(t, errors.Is(err, context.Canceled), "%v", err)
	}
	require.NoError(t, run(context.Background(), append(tiny(out), "-resume"), &bytes.Buffer{}, &bytes.Buffer{}, noenv))
	b, err := os.ReadFile(out)
	require.NoError(t, err)
	for i := range 4 {
		assert.Equal(t, 1, strings.Count(string(b), "\n"+string(rune('0'+i))+","), "point %d once", i)
	}
}

func TestBadFlags(t *testing.T) {
	for name, args := range map[string][]string{
		"shard":     {"-shard", "2/2"},
		"shard2":    {"-shard", "x"},
		"steps":     {"-nsteps", "0"},
		"format":    {"-format", "xml"},
		"merge":     {"-merge"},
		"arg":       {"stray"},
		"screening": {"-screening", "x"},
		"o":         {"-o", ""},
	} {
		t.Run(name, func(t *testing.T) {
			err := run(context.Background(), append(args, "-quiet", "-png", ""), &bytes.Buffer{}, &bytes.Buffer{}, noenv)
			var ue usageError
			require.Error(t, err)
			assert.True(t, errors.As(err, &ue), "%v", err)
		})
	}
	env := map[string]string{"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_COUNT": "2"}
	err := run(context.Background(), []string{"-quiet", "-png", ""}, &bytes.Buffer{}, &bytes.Buffer{}, func(k string) string { return env[k] })
	var ue usageError
	assert.True(t, errors.As(err, &ue), "%v", err)
}

// syncBuffer lets the test goroutine read what run writes.
type syncBuffer struct {
	mu sync.Mutex
	b  *bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}
