#pragma once
// A study over the ranks of a job. Rank r flies the contiguous block of sample indices that
// rank_share() gives it, on its own threads. The rows travel in messages of 65 536 rows, in rank
// order, so they arrive in index order: rank 0 writes them to the results file and computes half
// of the footprint statistics while rank 1 computes the other half (the serial tail of a study,
// split over two processes), then rank 0 merges the halves, writes the footprint and renames the
// file into place. The rows depend only on their
// sample index and the statistics only on the rows, so the file is bit-identical to a threaded
// run's.
#include "cluster/job.hpp"
#include "io/results_file.hpp"

namespace strewn {

/// On rank 0: the whole run (its file written). On the other ranks: an empty StudyRun.
/// With study.target_width, every part is split over the ranks the same way, and rank 0's
/// decision to add samples is broadcast.
StudyRun run_on_ranks(const Job& job, const SampleModel& model, const World& world,
                      StudyOptions options, const std::string& path, int threads,
                      bool keep_samples = true);

}  // namespace strewn
