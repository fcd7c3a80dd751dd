//go:build race

package main

// raceDetector is on: resident-set figures are not the program's own.
const raceDetector = true
