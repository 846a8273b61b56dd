package plan

import (
	"fmt"
	"math"

	"tapersweep/analysis"
	"tapersweep/models"
)

// Options are the constraints the user sets and the objective's weights. The zero value of
// every field but Target means its default.
type Options struct {
	// Target is the file that must finish the preparation at working length: size and
	// constant taper, e.g. 30/.04.
	Target Target
	// Instruments are the files on the shelf; nil means DefaultShelf(Target): the generic
	// catalogue's files no wider at the tip than the target. Each may be used at most once.
	Instruments []models.Instrument
	// MaxSteps counts every file, the target included. 0 = DefaultMaxSteps.
	MaxSteps int
	// MaxEngagedMM caps every file's engaged length, mm. 0 = no cap.
	MaxEngagedMM float64
	// MaxFatigue caps every file's fatigue use (Miner's sum at its most used point; 1 means
	// the model expects a fracture). 0 = the fatigue use of the target file taken straight to
	// working length: every plan has to accept that one, no other file needs to use more.
	// A negative value lifts the cap.
	MaxFatigue float64
	// KeepWallMM is the least wall to the root's outer surface every file must leave, mm (0 =
	// none; the canal's root must be known). Where the canal as scanned already has less, a
	// file keeps it by not thinning the wall there.
	KeepWallMM float64
	// AllowSameTaper lets two consecutive files share a taper. By default (false) every change
	// of file changes the taper (common practice of the trade).
	AllowSameTaper bool
	// Weights of the objective; all zero = DefaultWeights.
	Weights Weights
	// Run holds the model's settings (contact threshold, cutting coefficient). The search
	// sums engagement as the centred path model does; plans are written and checked centred.
	Run analysis.RunOptions
	// Search tuning; zero = defaults.
	CoarseDS     float64 // station spacing of the search's canal, mm (DefaultCoarseDS)
	CoarseAngles int     // directions around each station (DefaultCoarseAngles)
	BeamWidth    int     // partial plans kept per number of steps (DefaultBeamWidth)
	Recheck      int     // best plans re-checked at full resolution (DefaultRecheck)
	// Workers is the number of goroutines the search keeps busy; 0 uses every core. The plan
	// does not depend on it.
	Workers int
}

// Target is the size and taper the preparation must end with at working length.
type Target struct {
	Size  int
	Taper float64
}

// Label writes the target as the trade does: "30/.04".
func (t Target) Label() string { return fmt.Sprintf("%02d/%s", t.Size, models.TaperLabel(t.Taper)) }

// Weights weigh the three measures of the objective. Each measure is divided by its value for
// the target file taken straight to working length, so a weight of 1 on each counts a halved
// engaged length as much as a halved torque.
type Weights struct {
	Engaged float64 // largest engaged length of any file
	Torque  float64 // highest peak torque of any file
	Fatigue float64 // highest fatigue use of any file
}

// Defaults.
const (
	DefaultMaxSteps     = 6
	DefaultCoarseDS     = 0.2
	DefaultCoarseAngles = 32
	DefaultBeamWidth    = 24
	DefaultRecheck      = 8
	maxStepsLimit       = 12
)

// DefaultWeights count the three measures alike.
var DefaultWeights = Weights{Engaged: 1, Torque: 1, Fatigue: 1}

// ObjectiveText states the objective in plain words.
func (w Weights) ObjectiveText(target string) string {
	return fmt.Sprintf("the lowest %g x largest engaged length + %g x highest peak torque + %g x highest fatigue use "+
		"over the files of the plan, each measure divided by its value for the %s taken straight to working length",
		w.Engaged, w.Torque, w.Fatigue, target)
}

func (o Options) withDefaults() (Options, error) {
	if o.Target.Size <= 0 || !(o.Target.Taper > 0) || o.Target.Taper > 1 {
		return o, fmt.Errorf("plan: a target size and taper is required (e.g. 30/.04), not %d/%g", o.Target.Size, o.Target.Taper)
	}
	if o.Instruments == nil {
		o.Instruments = DefaultShelf(o.Target)
	}
	if len(o.Instruments) == 0 {
		return o, fmt.Errorf("plan: the instrument list is empty")
	}
	switch {
	case o.MaxSteps == 0:
		o.MaxSteps = DefaultMaxSteps
	case o.MaxSteps < 1 || o.MaxSteps > maxStepsLimit:
		return o, fmt.Errorf("plan: the number of steps must be from 1 to %d (got %d)", maxStepsLimit, o.MaxSteps)
	}
	if o.MaxEngagedMM < 0 || math.IsNaN(o.MaxEngagedMM) {
		return o, fmt.Errorf("plan: the engaged length cap must not be negative (got %g)", o.MaxEngagedMM)
	}
	if o.KeepWallMM < 0 || math.IsNaN(o.KeepWallMM) || math.IsInf(o.KeepWallMM, 0) {
		return o, fmt.Errorf("plan: the wall to keep must be a number of mm, not %g", o.KeepWallMM)
	}
	if math.IsNaN(o.MaxFatigue) {
		return o, fmt.Errorf("plan: the fatigue cap must be a number")
	}
	if o.Weights == (Weights{}) {
		o.Weights = DefaultWeights
	}
	for _, w := range []float64{o.Weights.Engaged, o.Weights.Torque, o.Weights.Fatigue} {
		if w < 0 || math.IsNaN(w) || math.IsInf(w, 0) {
			return o, fmt.Errorf("plan: weights must be finite and not negative (got %g, %g, %g)",
				o.Weights.Engaged, o.Weights.Torque, o.Weights.Fatigue)
		}
	}
	if o.CoarseDS <= 0 {
		o.CoarseDS = DefaultCoarseDS
	}
	if o.CoarseAngles <= 0 {
		o.CoarseAngles = DefaultCoarseAngles
	}
	if o.BeamWidth <= 0 {
		o.BeamWidth = DefaultBeamWidth
	}
	if o.Recheck <= 0 {
		o.Recheck = DefaultRecheck
	}
	if o.KeepWallMM > 0 {
		// The run's thin-wall advice is the constraint's final test; more plans are re-checked,
		// since the coarse search sees the wall only through a bound, sampled coarsely.
		o.Run.MinWallMM = o.KeepWallMM
		o.Recheck *= 3
	}
	o.Run = runDefaults(o.Run)
	return o, nil
}

// runDefaults fills the model's settings the way analysis.Run does, so the search's own sums use
// the same threshold and coefficient.
func runDefaults(o analysis.RunOptions) analysis.RunOptions {
	o = o.WithDefaults()
	o.PathModel = models.PathCentred // the search's own sums follow the centred file
	return o
}

// DefaultShelf is what a plan draws on when the user names no instruments: the generic
// catalogue's files from size 10 up to the target's tip size, tapers .02 to .08, and the .10
// taper from size 20 up for opening the coronal part. Files wider at the tip than the target
// would enlarge the canal past the planned apical size, and the smallest sizes cut nothing in a
// scanned canal wide enough to be segmented.
func DefaultShelf(t Target) []models.Instrument {
	var out []models.Instrument
	for _, in := range models.Catalogue() {
		if in.Size < 10 || in.Size > t.Size {
			continue
		}
		if tp := in.TaperAt(0); tp > 0.08+models.TaperTolerance && (in.Size < 20 || tp > 0.10+models.TaperTolerance) {
			continue
		}
		out = append(out, in)
	}
	return out
}
