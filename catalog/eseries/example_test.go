package eseries_test

import (
	"fmt"

	"plumb/catalog/eseries"
)

func ExampleSeries_Nearest() {
	fmt.Println(eseries.E96.Nearest(5000))
	fmt.Println(eseries.E96.Nearest(9900)) // rounds into the next decade
	fmt.Println(eseries.E24.Nearest(0.5))
	// Output:
	// 4990
	// 10000
	// 0.51
}

func ExampleSeries_Values() {
	fmt.Println(eseries.E12.Values(680, 1500))
	// Output:
	// [680 820 1000 1200 1500]
}

func ExampleSeries_Up() {
	fmt.Println(eseries.E96.Up(9760), eseries.E96.Down(10000))
	// Output:
	// 10000 9760
}

func ExampleByName() {
	s, err := eseries.ByName("e48")
	fmt.Println(s.Name, s.N, err)
	_, err = eseries.ByName("E100")
	fmt.Println(err)
	// Output:
	// E48 48 <nil>
	// eseries: unknown series "E100": use one of E3, E6, E12, E24, E48, E96, E192
}

func ExampleSmallest() {
	for _, v := range []float64{4700, 4990, 4930, 5000} {
		s, ok := eseries.Smallest(v)
		if !ok {
			fmt.Println(v, "in no series")
			continue
		}
		fmt.Println(v, s.Name)
	}
	// Output:
	// 4700 E3
	// 4990 E96
	// 4930 E192
	// 5000 in no series
}
