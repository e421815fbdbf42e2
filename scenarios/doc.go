// Package scenarios is Pulsewright's scenario model: the JSON format of
// docs/scenario-format.md (version 1), its strict decoder and
// validator, the canonical encoding and share links, the built-in demo
// scenes, and (in later files) the evaluation that turns a scenario into a
// report through package dsp.
//
// # Decoding
//
// Decode reads a scenario document, rejects unknown fields (except inside
// view), fills defaults and validates every field, reporting all problems
// of a document at once as a *ValidationError whose entries name the JSON
// path, the offending value and the valid range. Size limits (document
// bytes, array lengths) are checked while reading, before the memory they
// would cost is allocated.
//
// # Canonical form and links
//
// Canonical encodes a scenario with fields in the order of the format
// document and default values omitted; Link wraps the canonical JSON as
// base64url(raw DEFLATE(json)) behind "/#s=". ParseLink reverses it with
// a cap on the inflated size, so a compression bomb costs no more than a
// document at the size limit.
package scenarios
