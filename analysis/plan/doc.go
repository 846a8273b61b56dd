// Package plan proposes a file sequence for one canal: the files, their order and their depths
// that reach a target size and taper at working length while keeping the largest engaged length,
// the peak torque and the fatigue use of any file low.
//
// What "reach the target" means here: the last file of every plan is the target file (e.g. the
// 30/.04) taken to working length. The canal it leaves is therefore at least as wide as the
// target file wherever that file reaches, and exactly the target's size at working length.
//
// The objective, in plain words: the lowest weighted sum of the largest engaged length, the
// highest peak torque and the highest fatigue use over the plan's files, each divided by its
// value for the target file taken straight to working length (weights 1, 1, 1 by default;
// Options.Weights changes them). A plan's measures are the largest over its files, so adding a
// file never lowers them: a partial plan already as costly as the best full plans is dropped.
//
// Constraints: at most MaxSteps files (6 by default), each file on the list used at most once,
// each file before the target engaged over at least 1 mm (one that touches less does no real
// work), except one taken to working length to open the glide path the target needs; every
// change of file changes the taper (common practice of the trade; can be lifted); no file
// engaged over more than MaxEngagedMM (if set); no file using more of its fatigue life than
// MaxFatigue (by default the use of the target file taken to working length, which every plan
// has to accept anyway); every file leaving at least KeepWallMM of wall to the root's outer
// surface (if set; where the canal as scanned has less, not thinning it: the run's thin-wall
// advice at that limit), kept by the coarse search through a cautious bound (the wall as
// scanned less each file's cut) and checked on the plans re-checked at full resolution, which
// have the final word; and no file engaged over a longer stretch or needing more torque than
// the target file taken straight to working length, so a plan never does worse than that single
// file on any measure.
//
// A proposal also passes the tool's own advice (analysis.Blocking): tip sizes never go down; a
// file whose tip is wider than the canal at working length follows a smaller file taken there (a
// glide path, analysis.GlidePath); no file is bent past its alloy's recoverable strain or reaches
// the model's fracture point (a fatigue use of 1), whatever MaxFatigue says. Where the target
// itself breaks one of these (it fractures or is bent past its recoverable strain in this canal,
// or no file on the shelf can open a glide path for it), or no plan within the steps allowed
// passes, the answer is an *InfeasibleError saying why. Each change to a smaller taper is
// explained (the next file goes deeper or carries a larger tip; or the earlier file only opened
// the glide path).
//
// Depths: each preparing file may go to working length or 1 to 5 mm short of it, or to three
// crown-down depths: where the canal leaves its straight coronal part (Schneider's departure
// point, rounded down to 0.5 mm) and 2 and 4 mm short of that (from half the working length in
// a straight canal); none shallower than 3 mm. A few depths keep the search small; the apical ones matter
// because that is where curves and the narrowest canal sit, the crown-down ones because
// widening the coronal part first shortens the engaged length of every file after it.
//
// The search is a beam search over the prepared canal on a coarse copy of the canal (0.2 mm
// between stations, 32 directions). Each partial plan is ranked by the plan it would make if
// the target file came next; the best few (BeamWidth) of each length are kept, and a partial
// plan that leaves the same canal as a kept one with no better figures is dropped. Every
// candidate's figures come from the same sums analysis.Run uses, computed in parallel and
// collected in a fixed order, so the result does not depend on the number of cores; ties
// break by the order of the instrument list and of the depths above. The best plans found are
// run again through the full-resolution canal with analysis.Run, and the best of those that
// keeps every constraint there is proposed.
package plan
