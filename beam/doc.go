// Package beam runs bowline's learn and encode as Apache Beam pipelines, so that counting and encoding scale out on an existing distributed engine.
package beam
