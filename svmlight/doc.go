// Package svmlight writes and reads sparse rows in the SVMlight text format and bowline's feature-map files.
package svmlight
