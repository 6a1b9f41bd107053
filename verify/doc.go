// Package verify examines scoring rules for the properties that make them
// safe to pay with: a rule built from a generator (CheckRule) and a payout
// formula someone hands in (Audit).
//
// Both work on a grid of beliefs and reports on the probability simplex,
// every coordinate a multiple of 1/K. Expected effort is computed from the
// per-outcome efforts L(p, k) of every grid report, precomputed once (G×n
// floats), and then streamed against every belief on all cores: G² pairs
// with no G² memory. A failing check names its worst witness, sharpened
// beyond the grid by local optimisation (gonum optimize, Nelder–Mead).
//
// Every result states its resolution, point count and tolerance, and keeps
// the boundary of the simplex (some p_k = 0) apart from the interior. A
// grid check is evidence, not a proof: it can miss trouble between grid
// points, and it says so.
//
// verify does not know the preset library; Audit takes the candidate rules
// to identify a payout against as a parameter.
package verify
