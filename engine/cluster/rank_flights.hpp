#pragma once
// The samples of a study flown over the ranks of a job: a strategy of the study pipeline
// (pipeline/study_pipeline.hpp), which runs the same lifecycle as on threads.
//
// Rank r flies the contiguous block of sample indices that rank_share() gives it, on its own
// threads. The rows travel in messages of 65 536 rows, in rank order, so they arrive in index
// order: rank 0 writes them to the store and computes half of the footprint statistics while
// rank 1 computes the other half (the serial tail of a study, split over two processes), then
// rank 0 merges the halves. Rank 0's decision to add samples (growth toward study.target_width)
// is broadcast. The rows depend only on their sample index and the statistics only on the rows,
// so the file is bit-identical to a threaded run's. A study on several ranks is neither stopped by
// a signal nor resumed from a checkpoint (run_pipeline refuses it): one rank stopping alone would
// leave the others waiting.
#include <cstddef>
#include <string>
#include <vector>

#include "cluster/job.hpp"
#include "pipeline/study_pipeline.hpp"
#include "store/results_file.hpp"

namespace strewn {

class RankFlights final : public SampleFlights {
 public:
  /// The flights of `model`'s samples over the ranks of `job` (more than one).
  RankFlights(const Job& job, const SampleModel& model);
  StudyResult fly(const SampleModel& model, const StudyOptions& part) override;
  Footprint statistics(const StudyColumns& rows, const FootprintSettings& settings) override;
  [[nodiscard]] std::uint64_t agree(std::uint64_t value) const override;
  [[nodiscard]] bool gathers() const override { return job_.leader(); }
  [[nodiscard]] int processes() const override { return job_.size(); }

 private:
  const Job& job_;
  std::vector<std::string> names_;
  std::size_t choices_ = 0, bodies_ = 1;
};

/// The study of `model` run on the ranks of `job` into the results file `path` (on one rank,
/// run_and_write). On rank 0: the whole run, its file written; on the other ranks: an empty
/// StudyRun.
StudyRun run_on_ranks(const Job& job, const SampleModel& model, const World& world,
                      StudyOptions options, const std::string& path, int threads,
                      bool keep_samples = true);

}  // namespace strewn
