package analysis

import "math"

// move is one stroke of the insertion schedule: the tip travels from one depth to another at a
// steady speed while the file turns.
type move struct {
	from, to float64 // tip depth, mm from the orifice
	speed    float64 // mm/s
}

// insertionSchedule lays out how a file reaches its target depth (DEVELOPERS.md, "The model
// in code"): it enters from the orifice; each cycle advances peck past the deepest point
// reached so far, withdraws retract and re-enters; after the target it withdraws to the
// orifice. The same speed serves both ways.
func insertionSchedule(target, peck, retract, speed float64) []move {
	var moves []move
	if target <= 0 || peck <= 0 || speed <= 0 {
		return moves
	}
	tip, deepest := 0.0, 0.0
	for deepest < target-1e-9 {
		next := math.Min(deepest+peck, target)
		moves = append(moves, move{tip, next, speed})
		tip, deepest = next, next
		if deepest >= target-1e-9 {
			break
		}
		back := math.Max(0, tip-retract)
		moves = append(moves, move{tip, back, speed})
		tip = back
	}
	moves = append(moves, move{tip, 0, speed})
	return moves
}

// scheduleTime is the time the schedule takes, s.
func scheduleTime(moves []move) float64 {
	t := 0.0
	for _, m := range moves {
		t += math.Abs(m.to-m.from) / m.speed
	}
	return t
}
