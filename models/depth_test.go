package models

import (
	"encoding/json"
	"testing"
)

func TestParseDepth(t *testing.T) {
	// README, "Sequence files": a depth is mm from the orifice or "WL", "WL-1.5", "WL+0.5".
	const wl = 17.5
	cases := []struct {
		in      string
		resolve float64
		str     string
	}{
		{"17", 17, "17"},
		{"12.25", 12.25, "12.25"},
		{"WL", 17.5, "WL"},
		{"WL-1.5", 16, "WL-1.5"},
		{"WL+0.5", 18, "WL+0.5"},
		{" wl - 2 ", 15.5, "WL-2"},
		{"WL-0", 17.5, "WL"},
	}
	for _, c := range cases {
		d, err := ParseDepth(c.in)
		if err != nil {
			t.Errorf("ParseDepth(%q): %v", c.in, err)
			continue
		}
		if got := d.Resolve(wl); got != c.resolve {
			t.Errorf("ParseDepth(%q).Resolve(%g) = %g, want %g", c.in, wl, got, c.resolve)
		}
		if d.String() != c.str {
			t.Errorf("ParseDepth(%q).String() = %q, want %q", c.in, d.String(), c.str)
		}
		if again, err := ParseDepth(d.String()); err != nil || again != d {
			t.Errorf("String/ParseDepth round trip of %q: %v %v", c.in, again, err)
		}
	}
	for _, bad := range []string{"", "WL*2", "WL-", "WL--1", "WL+-1", "WLx", "abc", "NaN", "Inf", "-3", "0",
		"0x10", "1e9", "WL+1e9", "WL-NaN", "17mm"} {
		if d, err := ParseDepth(bad); err == nil {
			t.Errorf("ParseDepth(%q) = %v, want an error", bad, d)
		}
	}
}

func TestDepthJSON(t *testing.T) {
	for _, c := range []struct {
		json string
		want Depth
	}{
		{`16.5`, DepthMM(16.5)},
		{`"WL-1"`, DepthWL(-1)},
		{`"WL"`, DepthWL(0)},
		{`"18"`, DepthMM(18)},
	} {
		var d Depth
		if err := json.Unmarshal([]byte(c.json), &d); err != nil || d != c.want {
			t.Errorf("unmarshal %s = %v, %v; want %v", c.json, d, err, c.want)
			continue
		}
		out, err := json.Marshal(d)
		if err != nil {
			t.Fatal(err)
		}
		var back Depth
		if err := json.Unmarshal(out, &back); err != nil || back != d {
			t.Errorf("round trip of %s via %s = %v, %v", c.json, out, back, err)
		}
	}
	// A number is written as a number, a working-length depth as a string.
	if out, _ := json.Marshal(DepthMM(16.5)); string(out) != `16.5` {
		t.Errorf("marshal 16.5 = %s", out)
	}
	if out, _ := json.Marshal(DepthWL(0.5)); string(out) != `"WL+0.5"` {
		t.Errorf("marshal WL+0.5 = %s", out)
	}
	for _, bad := range []string{`null`, `true`, `[1]`, `{}`, `-2`, `0`, `"WL/2"`, `1e999`} {
		var d Depth
		if err := json.Unmarshal([]byte(bad), &d); err == nil {
			t.Errorf("unmarshal %s = %v, want an error", bad, d)
		}
	}
}
