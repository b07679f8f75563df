package flowerfind_test

import (
	"fmt"
	"image"
	"image/color"

	"gocv.io/x/gocv"

	"flitlog/track/flowerfind"
)

// Two flowers, a white one of radius 20 px and a yellow one of radius
// 30 px, on green ground, seen at 2 px/mm.
func ExampleFind() {
	bg := gocv.NewMatWithSizeFromScalar(gocv.NewScalar(50, 120, 60, 0), 200, 300, gocv.MatTypeCV8UC3) // B, G, R
	defer bg.Close()
	gocv.Circle(&bg, image.Pt(70, 100), 20, color.RGBA{R: 240, G: 240, B: 235, A: 255}, -1)
	gocv.Circle(&bg, image.Pt(200, 90), 30, color.RGBA{R: 250, G: 205, B: 30, A: 255}, -1)
	fm, err := flowerfind.Find(bg, flowerfind.Options{PXPerMM: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range fm.Flowers {
		fmt.Printf("%s %s at (%.0f, %.0f) r %.0f px\n", f.ID, f.Kind, f.XPX, f.YPX, f.RPX)
	}
	// Output:
	// F01 white at (70, 100) r 20 px
	// F02 yellow at (200, 90) r 30 px
}

func ExampleParseHSV() {
	c, err := flowerfind.ParseHSV("lilac=125-150,40-255,90-255")
	fmt.Println(c.Name, c.HLo, c.HHi, err)
	_, err = flowerfind.ParseHSV("lilac=125-150")
	fmt.Println(err)
	// Output:
	// lilac 125 150 <nil>
	// colour range "lilac=125-150": want three ranges h1-h2,s1-s2,v1-v2 after lilac=
}
