package expr

import (
	"fmt"
	"os"
	"strings"
	"testing"
)

func TestZZProbe(t *testing.T) {
	data, _ := os.ReadFile("/tmp/probe/in.txt")
	for _, blk := range strings.Split(string(data), "\n----\n") {
		var errs ErrorList
		src := NewSource(blk, Pos{Line: 1, Col: 1})
		stmts := ParseBlock(src, CalcMode, &errs)
		env := NewEnv()
		fmt.Printf("=== %q\n", blk)
		for _, e := range errs {
			fmt.Printf("  parse err %v\n", e)
		}
		for _, s := range stmts {
			r := env.Exec(s)
			fmt.Printf("  %T %v-%v desc=%q: ", s, s.Pos(), s.End(), s.Desc())
			if a, ok := s.(*Assign); ok && r.Err == nil && r.Value != nil {
				fmt.Printf("%s ", FormatValue(r.Value, a.Display, 4))
			}
			if r.Err != nil {
				fmt.Printf("ERR %v", r.Err)
			} else if r.Check != nil {
				fmt.Printf("check %v %v", r.Check.Pass, r.Check.Holds)
			} else if r.Value != nil {
				if sc, ok := r.Value.(*Scalar); ok {
					fmt.Printf("%v %v ang=%v | %s", sc.Z, sc.Dim, sc.Angle, FormatValue(r.Value, nil, 4))
				} else {
					fmt.Printf("%s", FormatValue(r.Value, nil, 4))
				}
			}
			fmt.Println()
		}
	}
}
