package popsynth

import "math/rand/v2"

// BatchSize is the number of systems in one batch. Batch b of a run always holds systems
// [b*BatchSize, (b+1)*BatchSize) and draws its random numbers from Stream(seed, b) alone, which is
// what makes a catalogue independent of the number of workers. Changing it changes every catalogue.
const BatchSize = 1 << 16

// Stream returns the random stream of batch (or task) index i of a run with the given seed: a PCG
// generator (math/rand/v2) whose 128-bit state is derived from (seed, i) alone by SplitMix64
// finalisers, so that neighbouring indices give unrelated states.
func Stream(seed, i uint64) *rand.Rand {
	hi := splitmix64(seed ^ splitmix64(i+0x632be59bd9b4e019))
	lo := splitmix64(hi ^ (i * 0x9e3779b97f4a7c15))
	return rand.New(rand.NewPCG(hi, lo))
}

// DeriveSeed returns the seed of sub-run i (a sweep task, a repeat) of a run with the given seed.
func DeriveSeed(seed, i uint64) uint64 {
	return splitmix64(splitmix64(seed) ^ splitmix64(i^0xd1b54a32d192ed03))
}

// splitmix64 is the output function of Steele, Lea & Flood's SplitMix64 (2014, OOPSLA), a bijective
// 64-bit mixer.
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}
