package main

import (
	"encoding/json"
	"math"
	"reflect"
	"strings"
)

// jsonSafe returns v as plain maps, slices and scalars in which every NaN
// or infinite float becomes null, so that results with undefined values
// (a sinuosity of a two-point bout, a median of nothing) still encode.
// It follows the json struct tags (name, omitempty, "-") and keeps field
// order by encoding structs as ordered key lists.
func jsonSafe(v any) any {
	return safeValue(reflect.ValueOf(v))
}

// orderedObject encodes its keys in the order given.
type orderedObject struct {
	keys []string
	vals []any
}

func (o orderedObject) MarshalJSON() ([]byte, error) {
	var b strings.Builder
	b.WriteByte('{')
	for i, k := range o.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		kb, _ := json.Marshal(k)
		b.Write(kb)
		b.WriteByte(':')
		vb, err := json.Marshal(o.vals[i])
		if err != nil {
			return nil, err
		}
		b.Write(vb)
	}
	b.WriteByte('}')
	return []byte(b.String()), nil
}

var marshalerType = reflect.TypeOf((*json.Marshaler)(nil)).Elem()

func safeValue(v reflect.Value) any {
	if !v.IsValid() {
		return nil
	}
	if v.Type().Implements(marshalerType) && v.Kind() != reflect.Pointer && v.Kind() != reflect.Interface {
		return v.Interface()
	}
	switch v.Kind() {
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			return nil
		}
		return safeValue(v.Elem())
	case reflect.Float32, reflect.Float64:
		f := v.Float()
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return nil
		}
		return f
	case reflect.Slice, reflect.Array:
		if v.Kind() == reflect.Slice && v.IsNil() {
			return []any{}
		}
		out := make([]any, v.Len())
		for i := range out {
			out[i] = safeValue(v.Index(i))
		}
		return out
	case reflect.Map:
		out := make(map[string]any, v.Len())
		it := v.MapRange()
		for it.Next() {
			out[toKey(it.Key())] = safeValue(it.Value())
		}
		return out
	case reflect.Struct:
		var o orderedObject
		addStruct(&o, v)
		return o
	default:
		return v.Interface()
	}
}

func toKey(k reflect.Value) string {
	if k.Kind() == reflect.String {
		return k.String()
	}
	b, _ := json.Marshal(k.Interface())
	return strings.Trim(string(b), `"`)
}

func addStruct(o *orderedObject, v reflect.Value) {
	t := v.Type()
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		if !f.IsExported() {
			continue
		}
		tag := f.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		fv := v.Field(i)
		if f.Anonymous && name == "" && fv.Kind() == reflect.Struct {
			addStruct(o, fv)
			continue
		}
		if name == "" {
			name = f.Name
		}
		if strings.Contains(opts, "omitempty") && fv.IsZero() {
			continue
		}
		o.keys = append(o.keys, name)
		o.vals = append(o.vals, safeValue(fv))
	}
}
