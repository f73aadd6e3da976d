#include "pipeline/study_pipeline.hpp"

#include <algorithm>
#include <cmath>
#include <optional>
#include <span>
#include <stdexcept>
#include <utility>

namespace strewn {

Footprint SampleFlights::statistics(const StudyColumns& rows, const FootprintSettings& settings) {
  return compute_footprint(impact_table(rows), settings);
}

StudyResult LocalFlights::fly(const SampleModel& model, const StudyOptions& part) {
  return run_study(model, part);
}

void append_rows(StudyResult& total, StudyResult&& part) {
  if (total.columns.rows() == 0 && total.samples == 0) {
    total = std::move(part);
    return;
  }
  total.columns.for_each_column_with(part.columns, [](auto& ours, const auto& theirs) {
    ours.insert(ours.end(), theirs.begin(), theirs.end());
  });
  total.samples += part.samples;
  total.completed += part.completed;
  total.failed += part.failed;
}

std::uint64_t next_sample_count(std::uint64_t n, double width, double target,
                                const Footprint& footprint, std::uint64_t max_samples) {
  double wanted;
  if (std::isfinite(width)) {
    const double factor = std::clamp(1.2 * (width / target) * (width / target), 1.5, 4.0);
    wanted = factor * static_cast<double>(n);
  } else {
    wanted = 2.0 * static_cast<double>(n);
    for (const auto& g : footprint.groups)
      for (const auto& c : g.containment)
        if (!c.radius_upper) wanted = std::max(wanted, 1.1 * static_cast<double>(c.samples_needed));
  }
  auto next = static_cast<std::uint64_t>(std::ceil(wanted / 1024.0)) * 1024;
  return std::min(std::max(next, n + 1), max_samples);
}

namespace {

// Rows of samples [first, first + count) of a study's rows.
StudyResult slice_samples(const StudyResult& from, std::uint64_t first, std::uint64_t count) {
  StudyResult piece;
  const std::size_t bodies = std::max<std::size_t>(1, from.bodies);
  piece.bodies = bodies;
  piece.samples = count;
  const std::size_t a = first * bodies, b = (first + count) * bodies;
  auto& p = piece.columns;
  p.set_inputs(from.columns.input_names, from.columns.choices);
  p.for_each_column_with(from.columns, [&](auto& to, const auto& column) {
    to.assign(column.begin() + a, column.begin() + b);
  });
  piece.count_outcomes();
  return piece;
}

// The rows of a part as the flights hand them over: the final ones (in order) are written and
// kept, a stopped part's others (beyond those written in order) only kept. `part_row` places the
// part's rows in the study.
class StoreFeed : public RowSink {
 public:
  explicit StoreFeed(StudyStore& store) : store_(store) {}
  void start_part(std::size_t part_row) {
    part_row_ = part_row;
    written_ = 0;
  }
  void write(const StudyColumns& c, std::size_t first, std::size_t end) override {
    store_.write(c, first, end);
    store_.keep(c, first, end, part_row_ + written_);
    written_ += end - first;
  }
  void keep(const StudyColumns& c, std::size_t first, std::size_t end) override {
    store_.keep(c, first, end, part_row_ + first);
  }

 private:
  StudyStore& store_;
  std::size_t part_row_ = 0, written_ = 0;
};

// Takes the samples from `done` on that an earlier run kept in `piece` (up to `total`) into the
// study's rows and the store; returns where the study now stands.
std::uint64_t take_kept(const KeptRows& piece, std::uint64_t done, std::uint64_t total,
                        StudyStore& store, StudyRun& run) {
  const std::uint64_t end = std::min(total, piece.first_sample + piece.rows.samples);
  StudyResult rows = slice_samples(piece.rows, done - piece.first_sample, end - done);
  run.resumed += rows.samples;
  store.write(rows.columns, 0, rows.columns.rows());
  append_rows(run.result, std::move(rows));
  return end;
}

// The samples below `total` in kept pieces (those past it, of a longer earlier round, are not
// counted).
std::uint64_t kept_samples(std::span<const KeptRows> pieces, std::uint64_t total) {
  std::uint64_t samples = 0;
  for (const KeptRows& piece : pieces)
    if (piece.first_sample < total)
      samples += std::min(total, piece.first_sample + piece.rows.samples) - piece.first_sample;
  return samples;
}

// A run stopped with `finished` samples done (in order or not) of the `planned`.
void mark_interrupted(StudyRun& run, std::uint64_t finished, std::uint64_t planned) {
  run.result.interrupted = true;
  run.result.finished = finished;
  run.result.planned = planned;
}

// The sample count to grow to when the footprint is not yet as precise as the scenario's
// target_width asks (0: no more samples).
std::uint64_t grown_total(const Scenario& s, const Footprint& footprint, std::uint64_t total) {
  if (!s.study.target_width) return 0;
  const double width = footprint.widest_relative_width();
  const auto max_samples = static_cast<std::uint64_t>(s.study.max_samples);
  if (width > *s.study.target_width && total < max_samples)
    return next_sample_count(total, width, *s.study.target_width, footprint, max_samples);
  return 0;
}

}  // namespace

StudyRun run_pipeline(const SampleModel& model, const World& world, StudyOptions options,
                      StudyStore* store, SampleFlights& flights, int threads,
                      const RunControl& control) {
  // A stop or a checkpoint on one process of several would leave the others waiting in the
  // exchange of rows or in agree(): only a single process may be stopped and resumed.
  if (flights.processes() > 1 && (control.stop || control.checkpoint || control.resume))
    throw std::logic_error(
        "run_pipeline: a study on several processes cannot be stopped or resumed");
  const Scenario& s = model.scenario();
  const std::size_t bodies = model.bodies();
  std::vector<KeptRows> kept = store ? store->take_kept() : std::vector<KeptRows>{};
  std::optional<StoreFeed> feed;
  if (store) feed.emplace(*store);
  options.sink = feed ? &*feed : nullptr;
  options.stop = control.stop;
  StudyRun run;
  run.result.bodies = bodies;
  run.result.columns.set_inputs(model.column_names(), model.choice_names().size());
  std::uint64_t done = 0, total = options.samples;
  int rounds = 0;
  Footprint footprint;
  auto stopped = [&] { return control.stop && control.stop->load(); };
  std::size_t next_kept = 0;
  while (true) {
    // Samples [done, total) in index order: each run of them taken from what an earlier run kept
    // when it finished them, else flown.
    while (done < total) {
      while (next_kept < kept.size() &&
             kept[next_kept].first_sample + kept[next_kept].rows.samples <= done)
        ++next_kept;
      if (next_kept < kept.size() && kept[next_kept].first_sample <= done) {
        done = take_kept(kept[next_kept], done, total, *store, run);
        if (options.progress) options.progress(done);
        continue;
      }
      const std::uint64_t gap_end =
          next_kept < kept.size() ? std::min(total, kept[next_kept].first_sample) : total;
      StudyOptions part = options;
      part.first_sample = done;
      part.samples = gap_end - done;
      if (feed) feed->start_part(done * bodies);
      StudyResult flown = flights.fly(model, part);
      if (flown.interrupted) {
        // Every sample finished so far is kept: those of this run and of earlier ones.
        const std::span<const KeptRows> later(kept.begin() + static_cast<long>(next_kept),
                                              kept.end());
        mark_interrupted(run, done + flown.finished + kept_samples(later, total), total);
        return run;  // the store is not finished: what it kept stays
      }
      append_rows(run.result, std::move(flown));
      done = gap_end;
    }
    // A signal that came after the last flight stops the run here, everything kept.
    if (stopped()) {
      mark_interrupted(run, done, total);
      return run;
    }
    ++rounds;
    footprint = flights.statistics(run.result.columns, footprint_settings(s, world, done));
    // A signal during the statistics stops the run too, within their time (under a second for
    // a million samples), everything kept.
    if (stopped()) {
      mark_interrupted(run, done, total);
      return run;
    }
    const std::uint64_t next =
        flights.agree(flights.gathers() ? grown_total(s, footprint, total) : 0);
    if (next == 0) break;
    total = next;
  }
  if (!flights.gathers()) return {};
  run.record = make_record(s, world, run.result, std::move(footprint), s.study.seed, threads);
  run.record.rounds = rounds;
  run.record.ranks = flights.processes();
  store->finish(run.record);
  return run;
}

}  // namespace strewn
