// Package campaign runs Monte Carlo injection–recovery campaigns: a grid of
// wall parameters (thickness × speed class × amplitude) × N trials per cell,
// each trial a short dataset around its injection with fresh noise, plus
// background trials without a wall; any pipeline scores them.
//
// Reproducibility: trial k's random stream is rand.NewPCG(seed,
// splitmix64(k)), drawn from nothing else, so every worker count and every
// sharding gives the same trials, and rerunning one trial reproduces it.
// Shard I of N runs the trials with k mod N = I. Each shard writes its
// results atomically with a manifest (campaign hash, I, N, trial ids, tool
// version); a finished shard is not rerun, and an interrupted one resumes
// after its last completed trial (completed trials are appended, one line
// each, to a journal that is flushed and synced).
//
// Merging refuses missing, duplicated or foreign shards, then recomputes
// the threshold, every efficiency and interval and the sigmoid fits from
// the pooled per-trial outcomes, so a merged result is byte-identical to
// the single-process one.
package campaign
