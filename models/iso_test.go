package models

import (
	"fmt"
	"image/color"
	"slices"
	"testing"
)

func TestISOSizeList(t *testing.T) {
	// ISO 3630-1 nominal sizes (tip diameter in hundredths of a mm), 06 to 140.
	want := []int{6, 8, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 70, 80, 90, 100, 110, 120, 130, 140}
	if got := ISOSizes(); !slices.Equal(got, want) {
		t.Fatalf("ISOSizes() = %v, want %v (ISO 3630-1)", got, want)
	}
	for _, s := range want {
		if !IsISOSize(s) {
			t.Errorf("IsISOSize(%d) = false; ISO 3630-1 lists it", s)
		}
	}
	// Sizes between the steps of the ISO 3630-1 list are not on it.
	for _, s := range []int{0, -25, 5, 7, 12, 27, 65, 75, 85, 95, 105, 150, 160} {
		if IsISOSize(s) {
			t.Errorf("IsISOSize(%d) = true; ISO 3630-1 does not list it", s)
		}
	}
	// The list handed out is a copy.
	l := ISOSizes()
	l[0] = 999
	if ISOSizes()[0] != 6 {
		t.Error("ISOSizes shares its backing array")
	}
}

func TestISOColor(t *testing.T) {
	// ISO 3630-1 size colour code, from memory (references.md): 06 pink, 08 grey, 10 purple,
	// then white, yellow, red, blue, green, black for 15-40, repeated for 45-80 and 90-140.
	wantName := map[int]string{
		6: "pink", 8: "grey", 10: "purple",
		15: "white", 20: "yellow", 25: "red", 30: "blue", 35: "green", 40: "black",
		45: "white", 50: "yellow", 55: "red", 60: "blue", 70: "green", 80: "black",
		90: "white", 100: "yellow", 110: "red", 120: "blue", 130: "green", 140: "black",
	}
	// sRGB of the colour names: CSS Color Module Level 4, named colours.
	cssHex := map[string]string{
		"pink": "#ffc0cb", "grey": "#808080", "purple": "#800080", "white": "#ffffff", "yellow": "#ffff00",
		"red": "#ff0000", "blue": "#0000ff", "green": "#008000", "black": "#000000",
	}
	for _, size := range ISOSizes() {
		name, rgb, ok := ISOColor(size)
		if !ok || name != wantName[size] {
			t.Errorf("ISOColor(%d) = %q, %v; want %q (ISO 3630-1, from memory)", size, name, ok, wantName[size])
			continue
		}
		var r, g, b uint8
		if _, err := fmt.Sscanf(cssHex[name], "#%02x%02x%02x", &r, &g, &b); err != nil {
			t.Fatal(err)
		}
		if want := (color.RGBA{r, g, b, 0xFF}); rgb != want {
			t.Errorf("ISOColor(%d) rgb = %v, want %v (CSS named colour %q)", size, rgb, want, name)
		}
	}
	for _, size := range []int{0, 7, 27, 150} {
		if _, _, ok := ISOColor(size); ok {
			t.Errorf("ISOColor(%d) ok for a size off the ISO 3630-1 list", size)
		}
	}
}
