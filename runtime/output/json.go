package output

import (
	"bytes"
	"encoding"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"slices"
	"strings"
)

// JSON is json.MarshalIndent(v, "", "  ") that cannot fail on a number: a float that JSON has
// no form for (±Inf, NaN: an interval open at one end, a curve with no value there) is written
// as null, so a finished run is never lost at the very end for one value. For every other
// value the bytes are exactly encoding/json's: the same field names, order and omissions
// (struct tags with omitempty and "-", embedded structs flattened with the outer field
// winning), and json.Marshaler, encoding.TextMarshaler, maps and leaves are handed to
// encoding/json itself.
func JSON(v any) ([]byte, error) {
	var b bytes.Buffer
	if err := encodeValue(&b, reflect.ValueOf(v)); err != nil {
		return nil, err
	}
	var out bytes.Buffer
	if err := json.Indent(&out, b.Bytes(), "", "  "); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

var (
	marshalerType     = reflect.TypeFor[json.Marshaler]()
	textMarshalerType = reflect.TypeFor[encoding.TextMarshaler]()
)

func encodeValue(b *bytes.Buffer, v reflect.Value) error {
	if !v.IsValid() {
		b.WriteString("null")
		return nil
	}
	t := v.Type()
	if t.Implements(marshalerType) || t.Implements(textMarshalerType) ||
		v.CanAddr() && (reflect.PointerTo(t).Implements(marshalerType) || reflect.PointerTo(t).Implements(textMarshalerType)) {
		return leaf(b, v)
	}
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if f := v.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
			b.WriteString("null")
			return nil
		}
		return leaf(b, v)
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			b.WriteString("null")
			return nil
		}
		return encodeValue(b, v.Elem())
	case reflect.Slice:
		if v.IsNil() {
			b.WriteString("null")
			return nil
		}
		if t.Elem().Kind() == reflect.Uint8 {
			return leaf(b, v)
		}
		fallthrough
	case reflect.Array:
		b.WriteByte('[')
		for i := range v.Len() {
			if i > 0 {
				b.WriteByte(',')
			}
			if err := encodeValue(b, v.Index(i)); err != nil {
				return err
			}
		}
		b.WriteByte(']')
		return nil
	case reflect.Map:
		if v.IsNil() {
			b.WriteString("null")
			return nil
		}
		if t.Key().Kind() != reflect.String {
			return leaf(b, v)
		}
		keys := v.MapKeys()
		slices.SortFunc(keys, func(a, c reflect.Value) int { return strings.Compare(a.String(), c.String()) })
		b.WriteByte('{')
		for i, k := range keys {
			if i > 0 {
				b.WriteByte(',')
			}
			if err := leaf(b, k); err != nil {
				return err
			}
			b.WriteByte(':')
			if err := encodeValue(b, v.MapIndex(k)); err != nil {
				return err
			}
		}
		b.WriteByte('}')
		return nil
	case reflect.Struct:
		b.WriteByte('{')
		n := 0
		for _, f := range jsonFields(t) {
			fv, ok := fieldByIndex(v, f.index)
			if !ok || f.omitEmpty && isEmpty(fv) {
				continue
			}
			if n > 0 {
				b.WriteByte(',')
			}
			n++
			if err := leaf(b, reflect.ValueOf(f.name)); err != nil {
				return err
			}
			b.WriteByte(':')
			if err := encodeValue(b, fv); err != nil {
				return err
			}
		}
		b.WriteByte('}')
		return nil
	}
	return leaf(b, v)
}

// leaf is encoding/json's encoding of one value.
func leaf(b *bytes.Buffer, v reflect.Value) error {
	var x any
	if v.CanAddr() {
		x = v.Addr().Interface() // so methods on the pointer are found, as encoding/json does
	} else if v.CanInterface() {
		x = v.Interface()
	} else {
		return fmt.Errorf("output: cannot encode a value of type %s", v.Type())
	}
	data, err := json.Marshal(x)
	if err != nil {
		return err
	}
	b.Write(data)
	return nil
}

type jsonField struct {
	name      string
	index     []int
	tagged    bool
	omitEmpty bool
}

// jsonFields are the fields encoding/json writes for a struct type, in its order: exported
// fields by their tag names, embedded structs flattened, and of fields with one name the
// shallowest (then the tagged) one, none when that is ambiguous.
func jsonFields(t reflect.Type) []jsonField {
	var all []jsonField
	var walk func(t reflect.Type, index []int, seen map[reflect.Type]bool)
	walk = func(t reflect.Type, index []int, seen map[reflect.Type]bool) {
		if seen[t] {
			return
		}
		seen[t] = true
		for i := range t.NumField() {
			sf := t.Field(i)
			idx := append(slices.Clone(index), i)
			tag := sf.Tag.Get("json")
			if tag == "-" {
				continue
			}
			name, opts, _ := strings.Cut(tag, ",")
			ft := sf.Type
			if sf.Anonymous {
				if ft.Kind() == reflect.Pointer {
					ft = ft.Elem()
				}
				if !sf.IsExported() && ft.Kind() != reflect.Struct {
					continue
				}
				if name == "" && ft.Kind() == reflect.Struct {
					walk(ft, idx, seen)
					continue
				}
			} else if !sf.IsExported() {
				continue
			}
			f := jsonField{name: name, index: idx, tagged: name != "", omitEmpty: strings.Contains(","+opts+",", ",omitempty,")}
			if f.name == "" {
				f.name = sf.Name
			}
			all = append(all, f)
		}
		delete(seen, t)
	}
	walk(t, nil, map[reflect.Type]bool{})
	byName := map[string][]jsonField{}
	for _, f := range all {
		byName[f.name] = append(byName[f.name], f)
	}
	var out []jsonField
	for _, fs := range byName {
		slices.SortStableFunc(fs, func(a, b jsonField) int { return len(a.index) - len(b.index) })
		top := fs[0]
		if len(fs) > 1 && len(fs[1].index) == len(top.index) {
			var tagged []jsonField
			for _, f := range fs {
				if len(f.index) == len(top.index) && f.tagged {
					tagged = append(tagged, f)
				}
			}
			if len(tagged) != 1 {
				continue // ambiguous: encoding/json writes none
			}
			top = tagged[0]
		}
		out = append(out, top)
	}
	slices.SortFunc(out, func(a, b jsonField) int { return slices.Compare(a.index, b.index) })
	return out
}

// fieldByIndex is v.FieldByIndex that reports a nil embedded pointer on the way as absent.
func fieldByIndex(v reflect.Value, index []int) (reflect.Value, bool) {
	for i, x := range index {
		if i > 0 && v.Kind() == reflect.Pointer {
			if v.IsNil() {
				return reflect.Value{}, false
			}
			v = v.Elem()
		}
		v = v.Field(x)
	}
	return v, true
}

func isEmpty(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr,
		reflect.Float32, reflect.Float64, reflect.Interface, reflect.Pointer:
		return v.IsZero()
	}
	return false
}
