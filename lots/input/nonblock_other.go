//go:build !unix

package input

const nonBlock = 0
