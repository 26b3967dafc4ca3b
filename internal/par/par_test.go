package par

import (
	"context"
	"errors"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestForCoversEveryIndexOnce(t *testing.T) {
	for _, w := range []int{0, 1, 2, 3, 8, 100} {
		t.Run(fmt.Sprint("workers=", w), func(t *testing.T) {
			n := 1000
			hits := make([]int, n)
			require.NoError(t, For(context.Background(), w, n, func(worker, i int) error {
				hits[i]++
				return nil
			}))
			for i, h := range hits {
				require.Equal(t, 1, h, "index %d", i)
			}
		})
	}
}

func TestForErrorIsLowestIndex(t *testing.T) {
	for _, w := range []int{1, 2, 8} {
		err := For(context.Background(), w, 100, func(worker, i int) error {
			if i == 3 || i == 50 {
				return fmt.Errorf("bad %d", i)
			}
			return nil
		})
		// Index 3 is always handed out before index 50 stops the loop, or with it: the lowest
		// failing index started is reported.
		require.Error(t, err)
		assert.Equal(t, "bad 3", err.Error(), "workers=%d", w)
	}
}

func TestForCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	err := For(ctx, 2, 10, func(worker, i int) error { return nil })
	assert.True(t, errors.Is(err, context.Canceled))
}

func TestWorkers(t *testing.T) {
	assert.Equal(t, 1, Workers(4, 0))
	assert.Equal(t, 3, Workers(4, 3))
	assert.Equal(t, 2, Workers(2, 100))
	assert.GreaterOrEqual(t, Workers(0, 100), 1)
}
