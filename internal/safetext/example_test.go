package safetext_test

import (
	"fmt"

	"github.com/trussfleet/trussfleet/internal/safetext"
)

func Example() {
	fmt.Println(safetext.CSVCell(`=HYPERLINK("http://x.invalid")`))
	fmt.Println(safetext.CSVCell("-123.4 is a number: never pass it here"))
	fmt.Printf("%q\n", safetext.Terminal("Tarn\x1b[31mbeck\x07 Viaduct"))
	fmt.Println(safetext.ShowBidi("Mill Lane \u202Eexe.1 FR"))
	// Output:
	// '=HYPERLINK("http://x.invalid")
	// '-123.4 is a number: never pass it here
	// "Tarn[31mbeck Viaduct"
	// Mill Lane ‹U+202E›exe.1 FR
}
