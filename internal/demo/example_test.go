package demo_test

import (
	"bufio"
	"bytes"
	"fmt"
	"strings"

	"github.com/bowline/bowline/internal/demo"
)

// The first three lines of the default corpus: the header and two records,
// with the tabs between fields shown as " | ".
func ExampleWriteTSV() {
	var buf bytes.Buffer
	if err := demo.WriteTSV(&buf, demo.DefaultOptions()); err != nil {
		panic(err)
	}
	sc := bufio.NewScanner(&buf)
	for i := 0; i < 3 && sc.Scan(); i++ {
		fmt.Println(strings.ReplaceAll(sc.Text(), "\t", " | "))
	}
	// Output:
	// id | channel | team | sentiment | text | zone | plan | age | created
	// pw-00001 | review | app | neutral | Which phones does the app support? Where do I find the ride history in the app? Thanks in advance. | Riverside | annual | 30 | 2024-02-13T00:40:00Z
	// pw-00002 | review | billing | negative | Been a member since 2020. The receipt was not correct. | Harbour | single | 20 | 2024-08-03T16:48:00Z
}

func ExampleSplit() {
	train, test := demo.Split(demo.DefaultOptions().Docs)
	fmt.Println(train, test)
	// Output: 4000 1000
}
