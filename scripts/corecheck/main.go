// Command corecheck prints how much longer two busy threads take than one
// on this machine, right now: 1.0 when a second core is free, 2.0 when
// the two share one. A virtual machine on a shared host reports both of
// its cores busy either way (no steal time), so its load average cannot
// tell; this can. scripts/speed.sh prints it beside every timing.
package main

import (
	"fmt"
	"runtime"
	"sync"
	"time"
)

// spin does n rounds of floating-point work and returns its sum so that
// the compiler keeps it.
func spin(n int) float64 {
	x := 0.0
	for i := 0; i < n; i++ {
		x += float64(i%7) * 1.0000001
	}
	return x
}

var sink float64

func main() {
	const n = 200_000_000
	runtime.GOMAXPROCS(2)
	t := time.Now()
	sink = spin(n)
	one := time.Since(t)
	var wg sync.WaitGroup
	var mu sync.Mutex
	t = time.Now()
	for range 2 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			v := spin(n)
			mu.Lock()
			sink += v
			mu.Unlock()
		}()
	}
	wg.Wait()
	two := time.Since(t)
	fmt.Printf("%.2f\n", two.Seconds()/one.Seconds())
}
