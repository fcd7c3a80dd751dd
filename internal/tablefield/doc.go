// Package tablefield reads the table fields beside the text (categories, numbers and times): their settings from flags, their values, the periodic encoding of times, their columns, and their statistics at learn and encode time.
package tablefield
