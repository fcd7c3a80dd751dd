// Package hashing maps feature keys into a fixed number of buckets with seeded XXH64, optionally signed, and accounts exactly for collisions.
package hashing
