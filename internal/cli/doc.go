// Package cli holds the command-line flags bowline's commands share: corpus input, text analysis, and parsing flags given before or after file arguments.
package cli
