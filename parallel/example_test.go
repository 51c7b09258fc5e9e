package parallel_test

import (
	"context"
	"fmt"

	"renderchain/parallel"
)

func ExampleFor() {
	squares := make([]int, 5)
	err := parallel.For(context.Background(), len(squares), 2, func(_ context.Context, i int) error {
		squares[i] = i * i
		return nil
	})
	fmt.Println(squares, err)
	// Output: [0 1 4 9 16] <nil>
}
