// Package flight computes where a ship is and how fast it moves, in closed
// form, and reads the TOML plan files that describe a flight and its video.
//
// # Units and frames
//
// Positions are in parsecs on ICRS axes in the catalogue frame S (Sun at the
// origin, stars at rest). Times are Julian years: τ (Tau) is ship proper time,
// t (T) catalogue time, both counted from the start of the trajectory.
// Accelerations are proper accelerations in m/s² (plans may give them in
// units of standard gravity g₀). Speeds are β = v/c. Angles are degrees
// (RA, Dec, roll, field of view). The constants are the SI speed of light,
// g₀ = 9.80665 m/s², the Julian year, the IAU light-year and astronomical
// unit and the parsec 648000/π au; CPcPerYr is c in parsecs per year.
//
// # Kinematics
//
// Every leg is rectilinear and made of closed-form segments. With rapidity
// φ (β = tanh φ, γ = cosh φ, γβ = sinh φ) and proper acceleration a along a
// fixed axis, φ = φ₀ + aτ/c, t = (c/a)(sinh φ − sinh φ₀) and
// x = (c²/a)(cosh φ − cosh φ₀); at constant velocity t = τ cosh φ₀ and
// x = cτ sinh φ₀. Differences of sinh and cosh are evaluated as products,
// so nothing cancels, and the state carries φ rather than β, so γ stays
// accurate up to 1e8 and beyond while β rounds to 1. The inverse t → τ is
// closed-form: φ = asinh(sinh φ₀ + a t/c).
//
// A voyage of length d from rapidity φ₀ (zero: from rest) at acceleration a
// turns over at cosh φ_m = (a d/c² + cosh φ₀ + 1)/2, which from rest gives
// τ = (2c/a) acosh(1 + a d/(2c²)); with a speed cap below φ_m it coasts at
// the cap between the two burns. It always ends at rest exactly at the
// destination.
//
// Legs chain: each starts exactly where the previous ended (position,
// velocity, τ, t). Optional fields in a leg (a start position, a cruise
// speed or heading) are checks, and a mismatch is ErrDisconnected. A boost
// or voyage must thrust along the line of the current velocity; general
// non-collinear thrust is not modelled. States outside a trajectory are
// clamped to its start or end. State.Dir is the velocity direction, or, at
// rest, the leg's thrust or heading direction (borrowed from the nearest
// leg that has one), so "ahead" is always defined.
//
// Doppler factors follow the physics contract: D = γ(1 + β cos θ) for the
// unit direction toward a source at rest in S, evaluated as
// e^(−φ) + γβ·|n + b̂|²/2. Once-per-second signals from a source are received
// at D per second, so home behind the ship ticks slowly (D < 1).
//
// # Plans
//
// ParsePlan reads a strict TOML plan: unknown keys, values out of range,
// NaN or infinity, and nesting deeper than MaxPlanDepth are errors that name
// the key, its line and, for unknown keys, the closest known key. Array
// elements are numbered from 0 in messages (leg[0] is the first [[leg]]);
// LegError numbers legs from 1. Plans naming stars need Bind with a
// Resolver (to stay independent of the catalogue, destinations are looked
// up through a function). Hash is a SHA-256 of a canonical encoding of the
// decoded plan. Frames and FrameState give a deterministic schedule: hold
// frames on the start state, flight frames evenly spaced in ship or
// catalogue time (the first at the start, the last at arrival), hold frames
// on the end state; frame i is at video time i/fps.
//
// A minimal plan:
//
//	[[leg]]
//	kind = "voyage"          # or "cruise", "boost"
//	accel_g = 1.0
//	to_position = [1.3, 0, 0]  # pc; or to_star = "..."
//	speed_cap = 0.9            # optional
//
//	[show]
//	seconds = 20               # fps = 30, spacing = "ship" by default
//
// # Shards and checks
//
// Range and Shard split a render between workers (Shard K is 0-based);
// ShardFromEnv reads Kubernetes Indexed Job and Slurm array variables.
// FlashCheck applies the general flash threshold of WCAG 2.1 SC 2.3.1
// (after ITU-R BT.1702) to a sequence of mean frame luminances.
package flight
