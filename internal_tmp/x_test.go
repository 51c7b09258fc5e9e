package x

import (
	"context"
	"fmt"
	"math"
	"reflect"
	"testing"

	"renderchain/chains"
	"renderchain/measure"
)

func walk(path string, v reflect.Value) {
	switch v.Kind() {
	case reflect.Float64:
		if math.IsNaN(v.Float()) || math.IsInf(v.Float(), 0) {
			fmt.Println("NONFINITE", path, v.Type())
		}
	case reflect.Ptr, reflect.Interface:
		if !v.IsNil() { walk(path, v.Elem()) }
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ { if v.Type().Field(i).IsExported() { walk(path+"."+v.Type().Field(i).Name, v.Field(i)) } }
	case reflect.Slice:
		for i := 0; i < v.Len() && i < 3; i++ { walk(fmt.Sprintf("%s[%d]", path, i), v.Index(i)) }
	}
}

func TestX(t *testing.T) {
	ch, _ := chains.Load("../chains/demo.toml")
	r, err := measure.Sine(context.Background(), ch, 1000, 0.01, measure.Options{Probe: "v+"})
	if err != nil { t.Fatal(err) }
	walk("r", reflect.ValueOf(r))
}
