// Package models holds what a user describes, in millimetres and degrees: parametric canals
// (a spec's exact centerline, diameter law and mesh, and scan-like meshes made from it), files
// (ISO sizes and colours, tapers, sections, alloys), sequences of files with their depths and
// how each is used, and the built-in demo scenario (invented).
//
// The files a person writes (sequences, canal specs, instrument lists) are read strictly: each
// format is one schema type whose json tags list its fields (sequenceJSON, canalSpecJSON,
// instrumentsJSON), a key given twice, in the wrong case or with a null is refused with its
// line, and the errors name the file, the step or segment and the field (SequenceError,
// SpecError). Validate methods check values built in code by the same rules and words. The
// formats are documented for users in the README ("Files you write").
package models
