package plan

import (
	"context"
	"fmt"
	"strconv"
	"strings"
)

// Constraints an InfeasibleError can name.
const (
	ConstraintEngaged    = "engaged-length" // Options.MaxEngagedMM
	ConstraintFatigue    = "fatigue-use"    // Options.MaxFatigue
	ConstraintTaper      = "taper-change"   // consecutive files of different taper
	ConstraintSingleFile = "single-file"    // no file worse than the target file alone
	ConstraintGlidePath  = "glide-path"     // a smaller file before any wider than the canal at working length
	ConstraintStrain     = "recoverable-strain"
	ConstraintAdvice     = "advice" // the least-breaking plan draws advice that rules it out
	ConstraintWall       = "wall"   // Options.KeepWallMM
)

// InfeasibleError says that no plan within the steps allowed keeps the constraints, which
// constraint binds, and what the least-breaking plan found would need.
type InfeasibleError struct {
	Constraint string  // the first constraint that binds (Constraint* above)
	Limit      float64 // the limit it sets (0 for the taper rule)
	Needed     float64 // what the least-breaking plan found needs
	Step       int     // where that plan needs it, from 1 (0 when not one step)
	Msg        string
}

func (e *InfeasibleError) Error() string { return e.Msg }

// infeasible finds which constraint binds: first whether lifting the taper rule alone would
// allow a plan, then which limits the least-breaking plan breaks, at full resolution.
func (p *planner) infeasible(ctx context.Context, rule bool) (*checked, error) {
	n := p.opt.MaxSteps
	within := fmt.Sprintf("no plan within %d steps", n)
	if n == 1 {
		within = "the target file alone"
	}
	if rule && n > 1 {
		plans, err := p.search(ctx, true, false)
		if err != nil {
			return nil, err
		}
		if len(plans) > 0 && plans[0].excess == 0 {
			var names []string
			for _, st := range plans[0].seq.Steps {
				names = append(names, stepText(st))
			}
			return nil, &InfeasibleError{Constraint: ConstraintTaper, Msg: fmt.Sprintf(
				"%s meets the limits while changing taper at every change of file; allowing two files of the same "+
					"taper in a row, this one does: %s", within, strings.Join(names, ", "))}
		}
	}
	plans, err := p.search(ctx, false, rule)
	if err != nil {
		return nil, err
	}
	if len(plans) == 0 {
		return nil, &InfeasibleError{Constraint: ConstraintTaper, Msg: within + " can be formed from the instruments given"}
	}
	best := plans[0]
	if best.excess == 0 {
		return best, nil // ranked low on the coarse canal, yet it keeps every constraint
	}
	m := best.m
	at := func(step int) string {
		if step < 1 || step > len(best.seq.Steps) {
			return ""
		}
		return fmt.Sprintf(" at step %d (%s)", step, stepText(best.seq.Steps[step-1]))
	}
	lim := p.fullLim
	tl := p.opt.Target.Label()
	var first *InfeasibleError
	var clauses []string
	note := func(constraint string, limit, needed float64, step int, text string) {
		if first == nil {
			first = &InfeasibleError{Constraint: constraint, Limit: limit, Needed: needed, Step: step}
		}
		clauses = append(clauses, text)
	}
	over := func(v, l float64) bool { return l > 0 && overCap(v, l) }
	if over(m.engaged, lim.maxEngaged) {
		note(ConstraintEngaged, lim.maxEngaged, m.engaged, m.engagedAt, fmt.Sprintf(
			"%s keeps every file's engaged length under %s mm; the best found needs %s mm%s",
			within, mmText(lim.maxEngaged), mmText(m.engaged), at(m.engagedAt)))
	}
	if over(m.fatigue, lim.maxFatigue) {
		note(ConstraintFatigue, lim.maxFatigue, m.fatigue, m.fatigueAt, fmt.Sprintf(
			"%s keeps every file's fatigue use under %.3g; the best found needs %.3g%s",
			within, lim.maxFatigue, m.fatigue, at(m.fatigueAt)))
	}
	if over(m.prepFatigue, lim.maxPrepFatigue) {
		note(ConstraintFatigue, lim.maxPrepFatigue, m.prepFatigue, m.prepFatigueAt, fmt.Sprintf(
			"%s keeps every file before the %s under the model's fracture point (a fatigue use of 1); the best found needs %.3g%s",
			within, tl, m.prepFatigue, at(m.prepFatigueAt)))
	}
	if over(m.engaged, lim.ref.engaged) {
		note(ConstraintSingleFile, lim.ref.engaged, m.engaged, m.engagedAt, fmt.Sprintf(
			"%s keeps every file's engaged length within the %.2f mm of the %s taken straight to working length; "+
				"the best found needs %.2f mm%s", within, lim.ref.engaged, tl, m.engaged, at(m.engagedAt)))
	}
	if over(m.torque, lim.ref.torque) {
		note(ConstraintSingleFile, lim.ref.torque, m.torque, m.torqueAt, fmt.Sprintf(
			"%s keeps every file's peak torque within the %.3f N*cm of the %s taken straight to working length; "+
				"the best found needs %.3f N*cm%s", within, lim.ref.torque, tl, m.torque, at(m.torqueAt)))
	}
	for _, b := range best.blocked {
		if b.wall != nil {
			note(ConstraintWall, p.opt.KeepWallMM, *b.wall, b.step, fmt.Sprintf("%s keeps %s mm of wall to the root's outer surface; the best found leaves %s mm%s: %s",
				within, mmText(p.opt.KeepWallMM), mmText(*b.wall), at(b.step), b.advice.Text))
			continue
		}
		note(ConstraintAdvice, 0, 0, b.step, fmt.Sprintf("%s passes the tool's own advice; the best found draws%s: %s",
			within, at(b.step), b.advice.Text))
	}
	if first == nil {
		return best, nil
	}
	first.Msg = strings.Join(clauses, "; also, ")
	return nil, first
}

// mmText writes a length with as many digits as it needs, up to four significant ones: a cap
// of 0.001 mm reads "0.001", not "0.0".
func mmText(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }
