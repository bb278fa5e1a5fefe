package frameopt

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
)

// Options are the options of one frame. The zero value means every
// default. Fields whose zero value is not a valid setting (FWHM, Depth,
// GridStep, LatticeStep) take their default when zero; an explicit value
// is checked by Def.Check.
type Options struct {
	// Camera: where it looks and how it records light ([camera]).
	Look       string   // direction (Look dirs); "" is ahead
	Up         string   // direction (Up dirs); "" is the north celestial pole
	Roll       float64  // degrees about the view direction, positive banks right
	Projection string   // pinhole (""), equirect, fisheye, cube
	FOV        float64  // degrees; 0: the projection's default
	Tilt       float64  // degrees, fisheye dome tilt
	Size       string   // "WxH"; "": the projection's default
	Exposure   *float64 // V magnitude at full scale; nil: Preset
	Preset     string   // exposure preset when Exposure is nil: naked-eye ("")
	Limit      float64  // faintest observed V drawn; 0: Exposure + 10
	Tone       string   // shoulder (""), linear
	White      string   // d65 (""), e, d50, sun
	FWHM       float64  // pixels; 0: render.DefaultFWHM
	Depth      int      // PNG bits per channel, 8 (0) or 16
	Beaming    string   // exact (""), d3, d4
	Shutter    *float64 // degrees of the frame interval; nil: DefaultShutter

	// OpenEXR output (when a file is asked for: still --exr, plan output.exr).
	EXRType        string // half (""), float
	EXRCompression string // zip (""), none
	EXRLayers      string // all (""), none, or a comma-separated list

	// Overlays ([overlays]).
	CMB             bool
	Unresolved      string   // auto (""), on, off
	UnresolvedDepth *float64 // V; nil: the built-in sky's depth
	Grid            string   // none (""), radec, galactic
	GridStep        float64
	UnityCircle     bool
	MarkMotion      bool
	MarkDestination string // direction (Mark dirs)
	Lattice         int
	LatticeStep     float64
	LatticeConfirm  bool
	Labels          int
	Label           []string
	HUD             string
	HUDTitle        string
	TextSize        float64 // label and HUD text, overlay points; 0: overlay.DefaultTextSize
}

// Type is the kind of value an option holds.
type Type int

// Option value types.
const (
	Number    Type = iota // float64
	Integer               // int
	Text                  // string
	Switch                // bool
	List                  // []string (repeatable flag, TOML array of strings)
	Magnitude             // *float64, nil meaning "not set" (any optional number)
)

var typeNames = [...]string{"number", "integer", "text", "true/false", "list of text", "number"}

// String names the type as the documentation does.
func (t Type) String() string { return typeNames[t] }

// Def defines one option.
type Def struct {
	Name    string // flag name; the plan key is PlanKey()
	Table   string // plan table: "camera" or "overlays"
	Type    Type
	Default string // the default as documented
	Help    string
	// Arg is the value placeholder shown in the documentation ("DEG").
	Arg string
	// Dirs, for direction options, the spellings accepted.
	Dirs DirSet
	// Keyed options may also be set in a plan's [[camera.look]] keys and are
	// interpolated between keys.
	Keyed bool
	// Check validates an explicitly given value (nil: any value of the
	// type). Its message does not name the option.
	Check func(o *Options) error

	ptr func(o *Options) any
}

// PlanKey is the option's key in its plan table: the flag name with '-'
// replaced by '_'.
func (d *Def) PlanKey() string { return strings.ReplaceAll(d.Name, "-", "_") }

// Path is the dotted plan path, such as "camera.fwhm".
func (d *Def) Path() string { return d.Table + "." + d.PlanKey() }

// Lookup returns the definition of the option with flag name or plan key
// name.
func Lookup(name string) (*Def, bool) {
	for i := range Defs {
		if Defs[i].Name == name || Defs[i].PlanKey() == name {
			return &Defs[i], true
		}
	}
	return nil, false
}

// InTable returns the plan keys of table ("camera" or "overlays").
func InTable(table string) []string {
	var out []string
	for i := range Defs {
		if Defs[i].Table == table {
			out = append(out, Defs[i].PlanKey())
		}
	}
	return out
}

// Error is a bad option value; Name is the flag name.
type Error struct {
	Def *Def
	Msg string
}

func (e *Error) Error() string { return e.Def.Name + ": " + e.Msg }

// ErrType is wrapped by errors for TOML values of the wrong type.
var ErrType = errors.New("frameopt: wrong type")

// typeError is a value of the wrong type; its message names the types.
type typeError struct{ msg string }

func (e *typeError) Error() string        { return e.msg }
func (e *typeError) Is(target error) bool { return target == ErrType }

func typeErr(format string, a ...any) error { return &typeError{fmt.Sprintf(format, a...)} }

// Set stores a plan (TOML-decoded) value of option d into o, checking
// only its type: numbers accept TOML integers and floats; integers only
// integers; lists an array of strings. The value itself is checked by
// Check once every option is set, as for flags, because some checks
// depend on other options (fov's range on projection) and a table's keys
// come in no useful order. The error's message does not name the key.
func (d *Def) Set(o *Options, v any) error {
	p := d.ptr(o)
	switch d.Type {
	case Number, Magnitude:
		var f float64
		switch x := v.(type) {
		case float64:
			f = x
		case int64:
			f = float64(x)
		default:
			return typeErr("want a number, have %s", tomlType(v))
		}
		if math.IsNaN(f) {
			return fmt.Errorf("is NaN (want a finite number)")
		}
		if math.IsInf(f, 0) {
			return fmt.Errorf("%v is infinite (want a finite number)", f)
		}
		if d.Type == Magnitude {
			*p.(**float64) = &f
		} else {
			*p.(*float64) = f
		}
	case Integer:
		x, ok := v.(int64)
		if !ok {
			if f, isF := v.(float64); isF && f == math.Trunc(f) && math.Abs(f) < 1<<31 {
				x, ok = int64(f), true
			}
		}
		if !ok || x < math.MinInt32 || x > math.MaxInt32 {
			return typeErr("want a whole number, have %s", tomlType(v))
		}
		*p.(*int) = int(x)
	case Text:
		s, ok := v.(string)
		if !ok {
			return typeErr("want a string, have %s", tomlType(v))
		}
		*p.(*string) = s
	case Switch:
		b, ok := v.(bool)
		if !ok {
			return typeErr("want true or false, have %s", tomlType(v))
		}
		*p.(*bool) = b
	case List:
		var out []string
		switch x := v.(type) {
		case []any:
			for _, e := range x {
				s, ok := e.(string)
				if !ok {
					return typeErr("want an array of strings, have an element of type %s", tomlType(e))
				}
				out = append(out, s)
			}
		case []string:
			out = slices.Clone(x)
		default:
			return typeErr("want an array of strings, have %s", tomlType(v))
		}
		*p.(*[]string) = out
	}
	return nil
}

func (d *Def) check(o *Options) error {
	if d.Check == nil {
		return nil
	}
	return d.Check(o)
}

func tomlType(v any) string {
	switch x := v.(type) {
	case nil:
		return "nothing"
	case string:
		return fmt.Sprintf("the string %q", x)
	case bool:
		return fmt.Sprintf("the boolean %v", x)
	case int64:
		return fmt.Sprintf("the integer %d", x)
	case float64:
		return "the number " + strconv.FormatFloat(x, 'g', -1, 64)
	case []any:
		return "an array"
	case map[string]any:
		return "a table"
	}
	return fmt.Sprintf("a %T", v)
}

// Value returns the option's current value in o, for tests and printing.
func (d *Def) Value(o *Options) any {
	switch p := d.ptr(o).(type) {
	case *float64:
		return *p
	case **float64:
		if *p == nil {
			return nil
		}
		return **p
	case *int:
		return *p
	case *string:
		return *p
	case *bool:
		return *p
	case *[]string:
		return *p
	}
	return nil
}

// Register adds a flag for every option to fs, storing into o. The flags'
// defaults are o's current values (the zero Options: every default).
func Register(fs *pflag.FlagSet, o *Options) {
	for i := range Defs {
		d := &Defs[i]
		help := d.Help
		if d.Default != "" {
			help += " (default " + d.Default + ")"
		}
		switch p := d.ptr(o).(type) {
		case *float64:
			fs.Var(&floatValue{p}, d.Name, help)
		case **float64:
			fs.Var(&magValue{p}, d.Name, help)
		case *int:
			fs.Var(&intValue{p}, d.Name, help)
		case *string:
			fs.Var(&stringValue{p}, d.Name, help)
		case *bool:
			fs.BoolVar(p, d.Name, *p, help)
		case *[]string:
			fs.StringArrayVar(p, d.Name, *p, help)
		}
	}
}

// CheckFlags runs each option's check on the flags the user gave (changed
// reports whether flag name was given); the first problem is returned.
func CheckFlags(o *Options, changed func(name string) bool) error {
	for i := range Defs {
		d := &Defs[i]
		if !changed(d.Name) {
			continue
		}
		if err := d.check(o); err != nil {
			return &Error{Def: d, Msg: err.Error()}
		}
	}
	return nil
}

// Flag values that print no default when zero (the help text carries the
// documented default) and refuse NaN and infinities.
type floatValue struct{ p *float64 }

func (v *floatValue) String() string {
	if v.p == nil || *v.p == 0 {
		return ""
	}
	return strconv.FormatFloat(*v.p, 'g', -1, 64)
}
func (v *floatValue) Set(s string) error {
	f, err := parseFinite(s)
	if err != nil {
		return err
	}
	*v.p = f
	return nil
}
func (v *floatValue) Type() string { return "float" }

type magValue struct{ p **float64 }

func (v *magValue) String() string {
	if v.p == nil || *v.p == nil {
		return ""
	}
	return strconv.FormatFloat(**v.p, 'g', -1, 64)
}
func (v *magValue) Set(s string) error {
	f, err := parseFinite(s)
	if err != nil {
		return err
	}
	*v.p = &f
	return nil
}
func (v *magValue) Type() string { return "mag" }

type intValue struct{ p *int }

func (v *intValue) String() string {
	if v.p == nil || *v.p == 0 {
		return ""
	}
	return strconv.Itoa(*v.p)
}
func (v *intValue) Set(s string) error {
	n, err := strconv.ParseInt(strings.TrimSpace(s), 10, 32)
	if err != nil {
		return fmt.Errorf("want a whole number")
	}
	*v.p = int(n)
	return nil
}
func (v *intValue) Type() string { return "int" }

type stringValue struct{ p *string }

func (v *stringValue) String() string {
	if v.p == nil {
		return ""
	}
	return *v.p
}
func (v *stringValue) Set(s string) error { *v.p = s; return nil }
func (v *stringValue) Type() string       { return "string" }

func parseFinite(s string) (float64, error) {
	f, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, fmt.Errorf("want a finite number")
	}
	return f, nil
}
