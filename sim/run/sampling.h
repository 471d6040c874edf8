// Sampled simulation (tritsim run --sample): one SystemC simulation of a
// reduced trace, and an estimate of the whole run with its stated error.
//
// The work of a step is a prologue (the embedding), L decoder layers of
// identical shapes and an epilogue (final norm and head). The reduced trace
// keeps a systematic sample of the decode steps (always the first and the
// last) and, within every kept step, its prologue, its epilogue, its first
// and last layer and a systematic sample of the layers between. Every kept
// unit is measured as the difference of the counters at the retirement of
// its last op and of the unit before it, so the units of the reduced run
// partition its timeline exactly (and stalls keep summing to cycles);
// events are those of the unit's own ops. Warm-up: each measured unit is
// preceded and followed in the reduced trace by a unit of the same kind as
// in the full one (the prologue by an epilogue, a layer by a layer, the
// epilogue by the last layer), so the DRAM queues, open rows, prefetched
// tiles and scratchpad occupancy at its boundaries are those of a steady
// state, and no measurement is discarded.
//
// Estimator (two-stage sampling, Cochran, "Sampling Techniques", 3rd ed.,
// 1977, ch. 10; regression estimator ch. 7; chapters cited from memory): a kept step's estimate is
// prologue + epilogue + first + last layer + (L - 2) x the mean of its
// sampled layers; the decode
// phase's total is the least-squares line of the kept steps' estimates on
// their context, summed over all steps. Every additive figure (cycles,
// stalls, events, DRAM counts, per-op figures) is estimated by the same
// linear rule, so the identities of an exact run (stalls sum to cycles,
// energy components to the total, phases to the run) hold. The stated
// error is the half-width of the two-sided confidence interval at 99.7 %
// (Student t, degrees of freedom by Welch-Satterthwaite), relative to the
// estimate, as in statistical simulation sampling (Wunderlich, Wenisch,
// Falsafi, Hoe, "SMARTS", ISCA 2003). docs/performance.md has the
// validation against exact runs.
#pragma once

#include <cstdint>

#include "config/arch_config.h"
#include "mapping/sim_options.h"
#include "results/run_result.h"
#include "trace/trace_source.h"

namespace tritsim {

struct SamplingOptions {
  int64_t layers = 0;          // decoder layers per step (the model's); >= 1
  int64_t decode_steps = 6;    // decode steps kept (all when the workload has fewer), >= 3;
                               // why 6: docs/performance.md, "Sample size"
  int64_t step_layers = 2;     // layers sampled per kept decode step besides the first and
                               // last (all when fewer), >= 2
  int64_t prefill_layers = 4;  // same in the prefill, >= 2
  double confidence = 0.997;   // two-sided level of the stated error
};

// Simulates the reduced trace of `trace` and returns the estimated run with
// RunResult::sampling filled. Call at most once per process (SystemC).
// REQUIRES: a trace whose steps hold `sampling.layers` decoder layers of
// the same op names (what BuildTrace generates). Throws like RunSimulation.
RunResult RunSampledSimulation(const ArchConfig& arch, TraceSource& trace,
                               const SimOptions& options, const SamplingOptions& sampling);

}  // namespace tritsim
