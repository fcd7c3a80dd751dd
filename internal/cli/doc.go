// Package cli holds the command-line flags bowline's commands share: corpus input, text analysis, the files a command reads and writes (refused when an output would overwrite an input or another output), and parsing flags given before or after file arguments.
package cli
