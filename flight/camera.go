package flight

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/frameopt"
)

// Camera is the interpolated camera of one frame.
type Camera struct {
	// Orient is the camera orientation in the ship frame (apparent
	// directions, ICRS axes).
	Orient camera.Orientation
	// Roll is the keyed roll interpolated like the orientation, degrees
	// (recorded in sidecars; Orient already includes it).
	Roll float64
	// FOV and Tilt in degrees (FOV 0: the projection's default); Exposure
	// in V magnitudes at full scale.
	FOV, Tilt, Exposure float64
}

// keyedKeys lists the plan keys a [[camera.look]] key takes: "at" and the
// keyed frame options.
func keyedKeys() []string {
	out := []string{"at"}
	for i := range frameopt.Defs {
		if frameopt.Defs[i].Keyed {
			out = append(out, frameopt.Defs[i].PlanKey())
		}
	}
	return out
}

// cameraKey is a parsed [[camera.look]] key.
type cameraKey struct {
	at    float64
	look  frameopt.Direction
	up    *frameopt.Direction // nil: the north celestial pole
	roll  float64
	fov   float64
	tilt  float64
	expo  float64
	index int // into Plan.Camera.Look; -1 for the implicit key
}

// frameOptions reads the frame options of [camera] and [overlays] and the
// camera keys, checking every value with the options' own checks; errors
// name the plan key and line.
func (p *Plan) frameOptions(cam, ov map[string]any, c *checker) {
	var o frameopt.Options
	given := map[string]bool{}
	set := func(table string, m map[string]any, skip ...string) {
		keys := make([]string, 0, len(m))
		for k := range m {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			if slices.Contains(skip, k) {
				continue
			}
			d, ok := frameopt.Lookup(k)
			if !ok || d.Table != table || d.PlanKey() != k {
				c.errs = append(c.errs, &PlanError{File: c.file, Line: c.lines.line(table, k), Key: table + "." + k,
					Msg: "unknown key", Suggest: suggestIn(table, k), Err: ErrUnknownKey})
				continue
			}
			if err := d.Set(&o, m[k]); err != nil {
				c.fail(err.Error(), table, k)
				continue
			}
			given[d.Name] = true
		}
	}
	// camera.look is the look option as a string, or the camera keys as
	// [[camera.look]] tables.
	keysRaw := cam["look"]
	if _, isString := keysRaw.(string); isString {
		keysRaw = nil
		set(frameopt.CameraTable, cam, "width", "height")
	} else {
		set(frameopt.CameraTable, cam, "look", "width", "height")
	}
	set(frameopt.OverlaysTable, ov)
	// width and height: the older spelling of size.
	if cam["width"] != nil || cam["height"] != nil {
		w, okw := cam["width"].(int64)
		h, okh := cam["height"].(int64)
		switch {
		case given["size"]:
			c.fail("give size or width and height, not both", "camera", "width")
		case !okw || !okh:
			c.fail("give both width and height as whole numbers of pixels (or size = \"WxH\")", "camera", "width")
		default:
			o.Size = fmt.Sprintf("%dx%d", w, h)
			given["size"] = true
		}
	}
	for _, e := range frameopt.Check(&o, func(n string) bool { return given[n] }) {
		key := e.Def.PlanKey()
		if e.Def.Name == "size" && cam["size"] == nil {
			key = "width"
		}
		c.fail(e.Msg, e.Def.Table, key)
	}
	p.Frame = o
	p.Given = p.Given[:0]
	for _, d := range frameopt.Defs {
		if given[d.Name] {
			p.Given = append(p.Given, d.Path())
		}
	}

	// Camera keys.
	var raw []map[string]any
	switch v := keysRaw.(type) {
	case nil:
	case []map[string]any:
		raw = v
	case []any:
		for _, e := range v {
			m, ok := e.(map[string]any)
			if !ok {
				c.fail("want [[camera.look]] tables", "camera", "look")
				return
			}
			raw = append(raw, m)
		}
	default:
		c.fail("want [[camera.look]] tables", "camera", "look")
		return
	}
	if len(raw) > MaxLookKeys {
		c.fail(fmt.Sprintf("%d look keys (limit %d)", len(raw), MaxLookKeys), "camera", "look")
		return
	}
	base := p.baseKey(o)
	p.Camera.Look = nil
	p.looks = nil
	for i, m := range raw {
		key := []string{"camera", "look#" + strconv.Itoa(i)}
		sub := func(k string) []string { return append(slices.Clone(key), k) }
		ko := o
		kgiven := map[string]bool{}
		var at float64
		hasAt := false
		names := make([]string, 0, len(m))
		for k := range m {
			names = append(names, k)
		}
		sort.Strings(names)
		for _, k := range names {
			if k == "at" {
				switch v := m[k].(type) {
				case float64:
					at, hasAt = v, true
				case int64:
					at, hasAt = float64(v), true
				default:
					c.fail("want a time in seconds of video", sub("at")...)
				}
				continue
			}
			d, ok := frameopt.Lookup(k)
			if !ok || !d.Keyed || d.PlanKey() != k {
				c.errs = append(c.errs, &PlanError{File: c.file, Line: c.lines.line(sub(k)...), Key: displayKey(sub(k)),
					Msg: "unknown key (a camera key takes " + joinKeys(keyedKeys()) + ")", Suggest: closest(k, keyedKeys()), Err: ErrUnknownKey})
				continue
			}
			if err := d.Set(&ko, m[k]); err != nil {
				c.fail(err.Error(), sub(k)...)
				continue
			}
			kgiven[d.Name] = true
		}
		if _, present := m["at"]; present && !hasAt {
			continue
		}
		if !c.num(at, 0, 1e6, false, sub("at")...) {
			continue
		}
		if n := len(p.Camera.Look); n > 0 && !(at > p.Camera.Look[n-1].At) {
			c.fail(fmt.Sprintf("at = %v does not follow the previous key's %v (keys must be in time order)", at, p.Camera.Look[n-1].At), sub("at")...)
		}
		bad := false
		for _, e := range frameopt.Check(&ko, func(n string) bool { return kgiven[n] }) {
			c.fail(e.Msg, sub(e.Def.PlanKey())...)
			bad = true
		}
		lk := LookKey{At: at, Look: ko.Look, Roll: ko.Roll, Frame: ko}
		if lk.Look == "" {
			lk.Look = "ahead"
		}
		for _, d := range frameopt.Defs {
			if kgiven[d.Name] {
				lk.Given = append(lk.Given, d.PlanKey())
			}
		}
		p.Camera.Look = append(p.Camera.Look, lk)
		if bad {
			continue
		}
		k := p.keyFrom(ko, at, len(p.Camera.Look)-1)
		p.looks = append(p.looks, k)
	}
	if len(raw) == 0 {
		p.looks = []cameraKey{base}
	}
	for _, k := range p.looks {
		if k.look.Kind == frameopt.Star {
			p.needsStars = true
		}
	}
}

// baseKey is the camera of a plan without keys: its [camera] values.
func (p *Plan) baseKey(o frameopt.Options) cameraKey {
	return p.keyFrom(o, 0, -1)
}

// keyFrom builds a key from checked options.
func (p *Plan) keyFrom(o frameopt.Options, at float64, index int) cameraKey {
	fr := o.Frame()
	k := cameraKey{at: at, roll: fr.Roll, fov: fr.FOV, tilt: fr.Tilt, expo: fr.Exposure, index: index}
	look := o.Look
	if look == "" {
		look = "ahead"
	}
	k.look, _ = frameopt.ParseDirection(look, frameopt.AnyDir)
	if o.Up != "" {
		u, err := frameopt.ParseDirection(o.Up, frameopt.SkyDir)
		if err == nil {
			k.up = &u
		}
	}
	return k
}

func joinKeys(ks []string) string {
	s := ""
	for i, k := range ks {
		if i > 0 {
			s += ", "
		}
		s += k
	}
	return s
}

func suggestIn(table, k string) string {
	sug := closest(k, knownKeys[table])
	if sug == "" {
		return ""
	}
	return table + "." + sug
}

// bindStars resolves the stars the camera keys look at.
func (p *Plan) bindStars(resolve Resolver) error {
	p.starPos = map[string]r3.Vec{}
	for _, k := range p.looks {
		if k.look.Kind != frameopt.Star {
			continue
		}
		var pos r3.Vec
		ok := false
		if resolve != nil {
			pos, ok = resolve(k.look.Star)
		}
		if !ok || !finiteVec(pos) || r3.Norm(pos) == 0 {
			key := []string{"camera", "look#" + strconv.Itoa(k.index), "look"}
			if k.index < 0 {
				key = []string{"camera", "look"}
			}
			return &PlanError{File: p.Name, Line: p.lines.line(key...), Key: displayKey(key),
				Msg: fmt.Sprintf("unknown star %q (or one without a known distance)", k.look.Star), Err: ErrUnknownDestination}
		}
		p.starPos[k.look.Star] = pos
	}
	return nil
}

// Observer returns the ship's observer (position and boost) in state st.
func Observer(st State) (camera.Observer, error) {
	b, err := camera.NewBoostRapidity(st.Dir, st.Rapidity)
	if err != nil {
		return camera.Observer{}, err
	}
	return camera.Observer{Position: st.Pos, Boost: b}, nil
}

// heading is the state's direction of motion, or +x when undefined.
func heading(st State) r3.Vec {
	if r3.Norm(st.Dir) == 0 {
		return r3.Vec{X: 1}
	}
	return r3.Unit(st.Dir)
}

// keyCamera evaluates key k for the ship in state st: the orientation its
// look, up and roll give as seen from the ship.
func (p *Plan) keyCamera(k cameraKey, obs camera.Observer, hd r3.Vec) (Camera, error) {
	find := func(name string) (r3.Vec, float64, bool) {
		pos, ok := p.starPos[name]
		if !ok {
			return r3.Vec{}, 0, false
		}
		n := r3.Norm(pos)
		return r3.Scale(1/n, pos), n, true
	}
	fwd, err := k.look.Resolve(obs, hd, find)
	if err != nil {
		// At the star itself: look ahead.
		fwd = hd
	}
	up := r3.Vec{Z: 1}
	if k.up != nil {
		if up, err = k.up.Resolve(obs, hd, nil); err != nil {
			return Camera{}, err
		}
	}
	or, err := camera.LookAt(fwd, up, k.roll)
	if err != nil {
		return Camera{}, err
	}
	return Camera{Orient: or, Roll: k.roll, FOV: k.fov, Tilt: k.tilt, Exposure: k.expo}, nil
}

// camera interpolates the camera keys at video time s for the ship in
// state st. Every key is evaluated as the audience sees it from the ship at
// this moment (so a key on a star keeps the star where the key puts it),
// and between two keys the orientation turns along the shortest rotation
// (quaternion slerp) while field of view, tilt, roll and exposure (in
// magnitudes) follow the same curve; the curve is the smoothstep
// 3w² − 2w³, so the camera eases in and out of every key: its angular
// velocity is continuous and zero at each key, never a step.
func (p *Plan) camera(s float64, st State) (Camera, LookKey, error) {
	obs, err := Observer(st)
	if err != nil {
		return Camera{}, LookKey{}, err
	}
	hd := heading(st)
	ks := p.looks
	j := 0
	for j+1 < len(ks) && ks[j+1].at <= s {
		j++
	}
	cur := ks[j]
	var lk LookKey
	if cur.index >= 0 && cur.index < len(p.Camera.Look) {
		lk = p.Camera.Look[cur.index]
	} else {
		lk = LookKey{Look: "ahead"}
		if p.Frame.Look != "" {
			lk.Look = p.Frame.Look
		}
		lk.Roll = p.Frame.Roll
	}
	c0, err := p.keyCamera(cur, obs, hd)
	if err != nil || j+1 == len(ks) || s <= cur.at {
		return c0, lk, err
	}
	nx := ks[j+1]
	c1, err := p.keyCamera(nx, obs, hd)
	if err != nil {
		return Camera{}, LookKey{}, err
	}
	w := Ease((s - cur.at) / (nx.at - cur.at))
	lerp := func(a, b float64) float64 { return a + w*(b-a) }
	q := slerpQuat(quatOf(c0.Orient), quatOf(c1.Orient), w)
	return Camera{Orient: q.orientation(), Roll: lerp(c0.Roll, c1.Roll),
		FOV: lerp(c0.FOV, c1.FOV), Tilt: lerp(c0.Tilt, c1.Tilt), Exposure: lerp(c0.Exposure, c1.Exposure)}, lk, nil
}

// Ease is the smoothstep 3w² − 2w³ on w clamped to [0, 1]: zero slope at
// both ends (ease-in and ease-out), 1.5 at the middle.
func Ease(w float64) float64 {
	w = math.Max(0, math.Min(1, w))
	return w * w * (3 - 2*w)
}

// quat is a unit quaternion w + xi + yj + zk.
type quat struct{ w, x, y, z float64 }

// quatOf returns the rotation taking the reference axes (X forward, Y left,
// Z up) to the orientation's Forward, −Right and Up (Right = Forward × Up,
// as camera.LookAt builds it).
func quatOf(o camera.Orientation) quat {
	// Rotation matrix with columns Forward, Left = −Right, Up.
	m00, m01, m02 := o.Forward.X, -o.Right.X, o.Up.X
	m10, m11, m12 := o.Forward.Y, -o.Right.Y, o.Up.Y
	m20, m21, m22 := o.Forward.Z, -o.Right.Z, o.Up.Z
	var q quat
	// Shepperd's method: pick the largest diagonal term for stability.
	tr := m00 + m11 + m22
	switch {
	case tr > 0:
		s := math.Sqrt(tr+1) * 2
		q = quat{0.25 * s, (m21 - m12) / s, (m02 - m20) / s, (m10 - m01) / s}
	case m00 > m11 && m00 > m22:
		s := math.Sqrt(1+m00-m11-m22) * 2
		q = quat{(m21 - m12) / s, 0.25 * s, (m01 + m10) / s, (m02 + m20) / s}
	case m11 > m22:
		s := math.Sqrt(1+m11-m00-m22) * 2
		q = quat{(m02 - m20) / s, (m01 + m10) / s, 0.25 * s, (m12 + m21) / s}
	default:
		s := math.Sqrt(1+m22-m00-m11) * 2
		q = quat{(m10 - m01) / s, (m02 + m20) / s, (m12 + m21) / s, 0.25 * s}
	}
	return q.unit()
}

func (q quat) unit() quat {
	n := math.Sqrt(q.w*q.w + q.x*q.x + q.y*q.y + q.z*q.z)
	return quat{q.w / n, q.x / n, q.y / n, q.z / n}
}

// rotate applies q to v.
func (q quat) rotate(v r3.Vec) r3.Vec {
	u := r3.Vec{X: q.x, Y: q.y, Z: q.z}
	t := r3.Scale(2, r3.Cross(u, v))
	return r3.Add(r3.Add(v, r3.Scale(q.w, t)), r3.Cross(u, t))
}

func (q quat) orientation() camera.Orientation {
	f := r3.Unit(q.rotate(r3.Vec{X: 1}))
	u := q.rotate(r3.Vec{Z: 1})
	u = r3.Unit(r3.Sub(u, r3.Scale(r3.Dot(u, f), f)))
	return camera.Orientation{Forward: f, Right: r3.Unit(r3.Cross(f, u)), Up: u}
}

// slerpQuat interpolates a → b along the shorter arc.
func slerpQuat(a, b quat, w float64) quat {
	d := a.w*b.w + a.x*b.x + a.y*b.y + a.z*b.z
	if d < 0 {
		b, d = quat{-b.w, -b.x, -b.y, -b.z}, -d
	}
	if d > 1-1e-12 {
		return quat{a.w + w*(b.w-a.w), a.x + w*(b.x-a.x), a.y + w*(b.y-a.y), a.z + w*(b.z-a.z)}.unit()
	}
	th := math.Acos(math.Min(1, d))
	sa, sb := math.Sin((1-w)*th)/math.Sin(th), math.Sin(w*th)/math.Sin(th)
	return quat{sa*a.w + sb*b.w, sa*a.x + sb*b.x, sa*a.y + sb*b.y, sa*a.z + sb*b.z}.unit()
}

// AngleBetween returns the rotation angle in degrees between two
// orientations: 2·atan2(|v|, |w|) of the relative rotation qa⁻¹qb = (w, v),
// accurate at small angles too (2·acos w bottoms out at 1.7·10⁻⁶°).
func AngleBetween(a, b camera.Orientation) float64 {
	qa, qb := quatOf(a), quatOf(b)
	w := qa.w*qb.w + qa.x*qb.x + qa.y*qb.y + qa.z*qb.z
	// v = wa·vb − wb·va − va × vb.
	vx := qa.w*qb.x - qb.w*qa.x - (qa.y*qb.z - qa.z*qb.y)
	vy := qa.w*qb.y - qb.w*qa.y - (qa.z*qb.x - qa.x*qb.z)
	vz := qa.w*qb.z - qb.w*qa.z - (qa.x*qb.y - qa.y*qb.x)
	return 2 * math.Atan2(math.Sqrt(vx*vx+vy*vy+vz*vz), math.Abs(w)) * 180 / math.Pi
}
