package profile

import (
	"bytes"
	"errors"
	"math"
	"os"
	"strings"
	"testing"
)

const coupon = `# id: A3
# temperature: 925 C
# time: 4 h
depth_mm,C_wt%
0.05,0.91
0.10,0.86
0.10,0.84
0.20,0.70
0.30,0.55
`

func readCoupon(t *testing.T) []Profile {
	t.Helper()
	ps, err := ReadBytes([]byte(coupon), "lab/A3.csv")
	if err != nil {
		t.Fatal(err)
	}
	return ps
}

func TestExclusionsApply(t *testing.T) {
	x, err := ReadExclusionsCSV(strings.NewReader(`file;profile;depth (mm);line;reason
A3.csv;A3;0,05;;oxide at the surface
A3.csv;A3;0,1;7;indent on a carbide
;B9;0,2;;profile not among the inputs
`), "ex.csv")
	if err != nil {
		t.Fatal(err)
	}
	ps := readCoupon(t)
	orig := ps[0]
	a, err := x.Apply(ps)
	if err != nil {
		t.Fatal(err)
	}
	q := ps[0]
	if q.Len() != 3 || q.Line[0] != 6 || q.Value[0] != 0.86 || q.Depth[1] != 0.2e-3 {
		t.Errorf("after exclusions: depths %v lines %v values %v", q.Depth, q.Line, q.Value)
	}
	if orig.Len() != 5 || orig.Value[0] != 0.91 {
		t.Errorf("the original profile was changed: %v", orig.Value)
	}
	if len(a.Points) != 2 || a.Points[0].Reason != "oxide at the surface" || a.Points[1].Line != 7 || a.Points[1].File != "A3.csv" {
		t.Errorf("applied points %+v", a.Points)
	}
	if len(a.Unused) != 1 || a.Unused[0].Profile != "B9" || a.Unused[0].Row != 4 {
		t.Errorf("unused %+v", a.Unused)
	}
}

func TestExclusionsWithoutLineTakeEveryPointAtTheDepth(t *testing.T) {
	x := &Exclusions{Rows: []Exclusion{{Profile: "A3", Depth: 100e-6}}}
	q, idx, a, err := x.Exclude(readCoupon(t)[0])
	if err != nil {
		t.Fatal(err)
	}
	if q.Len() != 3 || len(idx) != 2 || idx[0] != 1 || idx[1] != 2 || len(a.Points) != 2 {
		t.Errorf("left %d points, removed %v", q.Len(), idx)
	}
}

func TestExclusionsWholeProfile(t *testing.T) {
	x, err := ReadExclusionsCSV(strings.NewReader("profile,depth_um,reason\nA3,,door opened during the hold\n"), "ex.csv")
	if err != nil {
		t.Fatal(err)
	}
	ps := readCoupon(t)
	a, err := x.Apply(ps)
	if err != nil {
		t.Fatal(err)
	}
	if ps[0].Len() != 5 || len(a.Points) != 0 {
		t.Errorf("a whole-profile row removed points")
	}
	if l, ok := a.IsLeftOut("A3"); !ok || l.Reason != "door opened during the hold" {
		t.Errorf("left out: %+v %v", a.LeftOut, ok)
	}
}

// A file written by WriteCSV reads back to the same points (depths in µm
// to ten digits, matched with the line).
func TestExclusionsRoundTrip(t *testing.T) {
	p := readCoupon(t)[0]
	x := &Exclusions{Rows: []Exclusion{
		{File: "A3.csv", Profile: "A3", Depth: p.Depth[2], Line: p.Line[2], Reason: "=SUM(A1) ground twice, \"by hand\""},
		{File: "A3.csv", Profile: "A3", Depth: math.NaN(), Reason: "left out"},
	}}
	var b bytes.Buffer
	if err := x.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "\nA3.csv,A3,100,7,") {
		t.Errorf("written:\n%s", b.String())
	}
	y, err := ReadExclusionsCSV(&b, "ex.csv")
	if err != nil {
		t.Fatal(err)
	}
	q1, i1, _, err := x.Exclude(p)
	if err != nil {
		t.Fatal(err)
	}
	q2, i2, a2, err := y.Exclude(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(i1) != 1 || len(i2) != 1 || i1[0] != i2[0] || q1.Len() != q2.Len() {
		t.Errorf("removed %v and %v after a round trip", i1, i2)
	}
	if a2.Points[0].Reason != "'=SUM(A1) ground twice, \"by hand\"" || len(a2.LeftOut) != 1 {
		t.Errorf("read back %+v %+v", a2.Points, a2.LeftOut)
	}
}

func TestExclusionsErrors(t *testing.T) {
	cases := []struct {
		name, text, want string
		kind             error
	}{
		{"no depth column", "profile,reason\nA3,x\n", "ex.csv:1: an exclusions file needs a profile column and a depth column", ErrColumn},
		{"depth without unit", "profile,depth\nA3,5\n", `ex.csv:1: column "depth": the depth column has no unit`, ErrUnit},
		{"unknown column", "profile,depth_um,weight\nA3,5,1\n", `ex.csv:1: column "weight": is not a column of an exclusions file`, ErrColumn},
		{"bad depth", "profile,depth_um\nA3,5x\n", `ex.csv:2: column "depth_um": "5x" is not a number`, ErrNumber},
		{"deep", "profile,depth_m\nA3,2\n", `ex.csv:2: column "depth_m": depth 2 is beyond 1 m`, ErrValue},
		{"blank id", "profile,depth_um\n,5\n", `ex.csv:2: column "profile": the profile id is blank`, ErrValue},
		{"line without depth", "profile,depth_um,line\nA3,,4\n", `ex.csv:2: column "line": a line is given without a depth`, ErrValue},
		{"bad line", "profile,depth_um,line\nA3,50,x4\n", `ex.csv:2: column "line": "x4" is not a line number`, ErrNumber},
		{"no such point", "profile,depth_um\nA3,60\n", `ex.csv:2: profile "A3" has no point at depth 60 µm`, ErrValue},
		{"point on another line", "profile,depth_um,line\nA3,50,6\n", `ex.csv:2: profile "A3" has no point at depth 50 µm on line 6`, ErrValue},
		{"other file", "file,profile,depth_um\nB.csv,A3,50\n", `ex.csv:2: profile "A3" comes from "A3.csv", not from "B.csv"`, ErrValue},
		{"two depth columns", "profile,depth_um,depth_mm\nA3,50,0.05\n", `ex.csv:1: column "depth_mm": the column appears twice`, ErrColumn},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x, err := ReadExclusionsCSV(strings.NewReader(c.text), "ex.csv")
			if err == nil {
				_, err = x.Apply(readCoupon(t))
			}
			if err == nil {
				t.Fatal("no error")
			}
			var pe *Error
			if !errors.As(err, &pe) || !errors.Is(err, c.kind) {
				t.Errorf("%v: not an *Error of kind %v", err, c.kind)
			}
			if !strings.HasPrefix(err.Error(), c.want) || !strings.Contains(err.Error(), " — ") {
				t.Errorf("got  %s\nwant %s… — hint", err, c.want)
			}
		})
	}
}

func TestReadBytesMatchesRead(t *testing.T) {
	for _, f := range []string{"../testdata/demo/lims-export-BAR-2307.csv", "../testdata/demo/coupons/F7-2291-880-1.csv"} {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		p1, err1 := Read(f)
		p2, err2 := ReadBytes(b, f)
		if err1 != nil || err2 != nil || len(p1) != len(p2) {
			t.Fatalf("%s: %v %v %d %d", f, err1, err2, len(p1), len(p2))
		}
		for i := range p1 {
			if p1[i].ID != p2[i].ID || p1[i].Len() != p2[i].Len() || p1[i].Depth[0] != p2[i].Depth[0] {
				t.Errorf("%s: profile %d differs", f, i)
			}
		}
	}
	if _, err := ReadBytes([]byte("x"), "a.ods"); err == nil || !strings.Contains(err.Error(), "a.ods: .ods workbooks are not read") {
		t.Errorf("ods: %v", err)
	}
}
