package jsonx

import (
	"bytes"
	"math"
	"testing"
)

// Common practice, no source: the contract of the machine outputs.
func TestNumVal(t *testing.T) {
	for _, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		if Num(v) != nil {
			t.Errorf("Num(%v) is not nil", v)
		}
	}
	if p := Num(2.5); p == nil || *p != 2.5 {
		t.Errorf("Num(2.5) = %v", p)
	}
	if !math.IsNaN(Val(nil)) || Val(Num(-1)) != -1 {
		t.Error("Val does not invert Num")
	}
}

type inner struct{ P string }

func (i inner) MarshalJSON() ([]byte, error) { return Marshal(map[string]string{"p": i.P}) }

func TestNoHTMLEscape(t *testing.T) {
	var b bytes.Buffer
	v := struct {
		A string `json:"a"`
		B inner  `json:"b"`
		C []int  `json:"c"`
	}{"p < 0.001 & x > 1", inner{"<&>"}, []int{}}
	if err := Encode(&b, v); err != nil {
		t.Fatal(err)
	}
	want := "{\n  \"a\": \"p < 0.001 & x > 1\",\n  \"b\": {\n    \"p\": \"<&>\"\n  },\n  \"c\": []\n}\n"
	if b.String() != want {
		t.Errorf("got\n%s\nwant\n%s", b.String(), want)
	}
}

// TestEncodeWithArray: the document written with its array element by
// element has the bytes of Encode on the whole document, for empty, one
// and several elements, nested values, HTML characters and nulls (common
// practice, no source).
func TestEncodeWithArray(t *testing.T) {
	type item struct {
		ID    string              `json:"id"`
		V     *float64            `json:"v"`
		Inner map[string][]int    `json:"inner"`
		List  []map[string]any    `json:"list"`
		Empty []int               `json:"empty"`
		Ptr   *struct{ A, B int } `json:"ptr"`
	}
	type doc struct {
		Version string  `json:"fickfit_version"`
		Before  []int   `json:"before"`
		Fits    []*item `json:"fits"`
		After   any     `json:"after"`
		Tail    string  `json:"tail,omitempty"`
	}
	one := 1.5
	items := []*item{
		{ID: "a<b>&c", V: &one, Inner: map[string][]int{"z": {1, 2}, "a": {}}, List: []map[string]any{{"k": "v"}}, Empty: []int{}},
		nil,
		{ID: "\"quoted\"\n", Ptr: &struct{ A, B int }{1, 2}},
	}
	for n := 0; n <= len(items); n++ {
		full := doc{Version: "v", Before: []int{1, 2}, Fits: items[:n], After: map[string]any{"fits": []int{}}, Tail: "x"}
		var want, got bytes.Buffer
		if err := Encode(&want, full); err != nil {
			t.Fatal(err)
		}
		empty := full
		empty.Fits = []*item{}
		if err := EncodeWithArray(&got, empty, "fits", n, func(i int) any { return items[i] }); err != nil {
			t.Fatal(err)
		}
		if got.String() != want.String() {
			t.Fatalf("%d elements:\ngot  %s\nwant %s", n, got.String(), want.String())
		}
	}
}

// Common practice, no source: ZeroAsNull changes only the named top-level
// keys whose value is 0, and keeps every other byte and the key order.
func TestZeroAsNull(t *testing.T) {
	in := `{"id":"a","time_s":0,"temperature_K":1198.15,"nested":{"time_s":0},"n":0,"s":"\"time_s\":0"}`
	got, err := ZeroAsNull([]byte(in), "time_s", "temperature_K")
	if err != nil {
		t.Fatal(err)
	}
	want := `{"id":"a","time_s":null,"temperature_K":1198.15,"nested":{"time_s":0},"n":0,"s":"\"time_s\":0"}`
	if string(got) != want {
		t.Errorf("got  %s\nwant %s", got, want)
	}
	if _, err := ZeroAsNull([]byte(`[0]`), "x"); err == nil {
		t.Error("an array was accepted")
	}
}
