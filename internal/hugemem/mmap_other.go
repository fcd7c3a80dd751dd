//go:build !linux

package hugemem

func mapHuge(size int) []byte { return nil }

func unmap(t []byte) {}

func release(t []byte) {}
