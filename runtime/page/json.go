package page

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"
)

// JSON is encoding/json's encoding of v (field names and omitempty from the json tags, maps
// with sorted string keys), except that a float that is not finite, which encoding/json
// refuses, is written as the string "NaN", "Infinity" or "-Infinity": what JavaScript's
// Number() reads back. A run holds such values (a theory curve that does not reach a point,
// an interval bound of a zero count, a rate of nothing).
func JSON(v any) ([]byte, error) {
	var b bytes.Buffer
	b.Grow(4096)
	if err := encode(&b, reflect.ValueOf(v)); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

var marshaler = reflect.TypeFor[json.Marshaler]()

func encode(b *bytes.Buffer, v reflect.Value) error {
	if !v.IsValid() {
		b.WriteString("null")
		return nil
	}
	k := v.Kind()
	if (k == reflect.Pointer || k == reflect.Interface || k == reflect.Map || k == reflect.Slice) && v.IsNil() {
		b.WriteString("null")
		return nil
	}
	if v.Type().Implements(marshaler) && k != reflect.Float32 && k != reflect.Float64 {
		return plain(b, v.Interface())
	}
	switch k {
	case reflect.Float32, reflect.Float64:
		f := v.Float()
		switch {
		case math.IsNaN(f):
			b.WriteString(`"NaN"`)
		case math.IsInf(f, 1):
			b.WriteString(`"Infinity"`)
		case math.IsInf(f, -1):
			b.WriteString(`"-Infinity"`)
		default:
			bits := 64
			if k == reflect.Float32 {
				bits = 32
			}
			b.Write(strconv.AppendFloat(b.AvailableBuffer(), f, 'g', -1, bits))
		}
	case reflect.String:
		str(b, v.String())
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		b.Write(strconv.AppendInt(b.AvailableBuffer(), v.Int(), 10))
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		b.Write(strconv.AppendUint(b.AvailableBuffer(), v.Uint(), 10))
	case reflect.Bool:
		b.WriteString(strconv.FormatBool(v.Bool()))
	case reflect.Pointer, reflect.Interface:
		return encode(b, v.Elem())
	case reflect.Slice, reflect.Array:
		if k == reflect.Slice && v.Type().Elem().Kind() == reflect.Uint8 {
			return plain(b, v.Interface())
		}
		b.WriteByte('[')
		for i := range v.Len() {
			if i > 0 {
				b.WriteByte(',')
			}
			if err := encode(b, v.Index(i)); err != nil {
				return err
			}
		}
		b.WriteByte(']')
	case reflect.Map:
		if v.Type().Key().Kind() != reflect.String {
			return fmt.Errorf("page: cannot encode a map keyed by %s", v.Type().Key())
		}
		keys := v.MapKeys()
		sort.Slice(keys, func(i, j int) bool { return keys[i].String() < keys[j].String() })
		b.WriteByte('{')
		for i, key := range keys {
			if i > 0 {
				b.WriteByte(',')
			}
			str(b, key.String())
			b.WriteByte(':')
			if err := encode(b, v.MapIndex(key)); err != nil {
				return err
			}
		}
		b.WriteByte('}')
	case reflect.Struct:
		b.WriteByte('{')
		first := true
		if err := fields(b, v, &first); err != nil {
			return err
		}
		b.WriteByte('}')
	default:
		return fmt.Errorf("page: cannot encode a %s", v.Type())
	}
	return nil
}

// fields writes the exported fields of a struct, flattening untagged embedded structs.
func fields(b *bytes.Buffer, v reflect.Value, first *bool) error {
	t := v.Type()
	for i := range t.NumField() {
		sf := t.Field(i)
		tag := sf.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		fv := v.Field(i)
		if sf.Anonymous && name == "" {
			ft := sf.Type
			if ft.Kind() == reflect.Pointer {
				if fv.IsNil() {
					continue
				}
				fv, ft = fv.Elem(), ft.Elem()
			}
			if ft.Kind() == reflect.Struct {
				if err := fields(b, fv, first); err != nil {
					return err
				}
				continue
			}
		}
		if !sf.IsExported() {
			continue
		}
		if name == "" {
			name = sf.Name
		}
		if strings.Contains(","+opts+",", ",omitempty,") && empty(fv) {
			continue
		}
		if !*first {
			b.WriteByte(',')
		}
		*first = false
		str(b, name)
		b.WriteByte(':')
		if err := encode(b, fv); err != nil {
			return fmt.Errorf("%s: %w", sf.Name, err)
		}
	}
	return nil
}

// empty is encoding/json's idea of an empty value, for omitempty.
func empty(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool:
		return !v.Bool()
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return v.Int() == 0
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		return v.Uint() == 0
	case reflect.Float32, reflect.Float64:
		return v.Float() == 0
	case reflect.Interface, reflect.Pointer:
		return v.IsNil()
	}
	return false
}

// str writes a string as encoding/json does: plain ASCII as it is, anything else through
// encoding/json (which escapes <, > and & too, so the text can sit in a script element).
func str(b *bytes.Buffer, s string) {
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c < 0x20 || c >= 0x80 || c == '"' || c == '\\' || c == '<' || c == '>' || c == '&' {
			out, _ := json.Marshal(s)
			b.Write(out)
			return
		}
	}
	b.WriteByte('"')
	b.WriteString(s)
	b.WriteByte('"')
}

// plain writes what encoding/json writes for a value it can encode.
func plain(b *bytes.Buffer, x any) error {
	out, err := json.Marshal(x)
	if err != nil {
		return err
	}
	b.Write(out)
	return nil
}
