#include "cluster/distributed_study.hpp"

#include <cstring>
#include <optional>
#include <stdexcept>

namespace strewn {

namespace {

constexpr int kRowsTag = 11;
constexpr std::size_t kRowsPerMessage = 65536;

// Rows [first, end) of the columns as one message: the row count, then each column in turn.
std::vector<std::byte> pack(const StudyColumns& c, std::size_t first, std::size_t end) {
  std::vector<std::byte> out;
  const std::uint64_t rows = end - first;
  out.resize(sizeof rows);
  std::memcpy(out.data(), &rows, sizeof rows);
  append_row_bytes(c, first, end, out);
  return out;
}

// Appends a message's rows to `c` and returns how many there were.
std::size_t unpack(const std::vector<std::byte>& in, StudyColumns& c) {
  std::uint64_t rows = 0;
  if (in.size() >= sizeof rows) std::memcpy(&rows, in.data(), sizeof rows);
  std::size_t at = sizeof rows;
  if (!take_row_bytes(in, at, rows, c) || at != in.size())
    throw std::runtime_error("a message of rows between ranks is malformed");
  return rows;
}

}  // namespace

namespace {

constexpr int kFootprintTag = 12;
constexpr std::uint64_t kNoMore = 0;

// Sends rows [0, rows) of `c` to `to`, in messages of kRowsPerMessage rows.
void send_rows(const Job& job, int to, const StudyColumns& c) {
  for (std::size_t first = 0; first < c.rows(); first += kRowsPerMessage)
    job.send(to, pack(c, first, std::min(c.rows(), first + kRowsPerMessage)), kRowsTag);
}

// Receives `rows` rows from `from` (every message, before anything else is done with them, so the
// sender is not held up) as a part of a study.
StudyResult receive_rows(const Job& job, int from, std::uint64_t rows,
                         const std::vector<std::string>& input_names, std::size_t choices,
                         std::size_t bodies) {
  StudyResult piece;
  piece.bodies = bodies;
  piece.columns.set_inputs(input_names, choices);
  for (std::uint64_t received = 0; received < rows;)
    received += unpack(job.receive(from, kRowsTag), piece.columns);
  piece.samples = rows / bodies;
  piece.count_outcomes();
  return piece;
}

}  // namespace

// Rank 0 writes the file and computes half of the statistics (kShapes); rank 1 computes the other
// half (kPlaceAndSpread) meanwhile. The order of the messages keeps both busy and cannot
// deadlock:
//   rank 0: send its rows to 1 while receiving 1's (non-blocking sends); write them; receive
//           2's, ...; compute its half; receive rank 1's half and merge;
//   rank 1: send its rows to 0 while receiving 0's; receive 2's, ...; compute its half; send it;
//   rank r >= 2: send its rows to 1, then to 0.
StudyRun run_on_ranks(const Job& job, const SampleModel& model, const World& world,
                      StudyOptions options, const std::string& path, int threads,
                      bool keep_samples) {
  if (job.size() == 1) return run_and_write(model, world, options, path, threads, keep_samples);
  const Scenario& s = model.scenario();
  const std::size_t bodies = model.bodies();
  const std::vector<std::string> names = model.column_names();
  const std::size_t choices = model.choice_names().size();
  std::optional<ResultsWriter> writer;
  if (job.leader()) writer.emplace(path, s, names, choices, options.samples * bodies, keep_samples);
  constexpr int kStatistics = 1;

  StudyRun run;  // rank 0: the rows in the file; rank 1: the rows for the statistics
  std::uint64_t done = 0, total = options.samples;
  int rounds = 0;
  Footprint footprint;
  while (true) {
    const auto rows_of = [&](int rank) {
      return rank_share(total - done, job.size(), rank).count * bodies;
    };
    const SampleRange share = rank_share(total - done, job.size(), job.rank());
    StudyOptions part = options;
    part.first_sample = done + share.first;
    part.samples = share.count;
    part.sink = job.leader() ? &*writer : nullptr;
    if (!job.leader()) part.progress = nullptr;
    StudyResult mine = run_study(model, part);
    if (job.leader()) {
      // Its rows go to rank 1 while rank 1's come here: both directions at once.
      Job::Sends sends;
      for (std::size_t first = 0; first < mine.columns.rows(); first += kRowsPerMessage)
        sends.add(job, kStatistics,
                  pack(mine.columns, first, std::min(mine.columns.rows(), first + kRowsPerMessage)),
                  kRowsTag);
      append_rows(run.result, std::move(mine));
      for (int from = 1; from < job.size(); ++from) {
        StudyResult piece = receive_rows(job, from, rows_of(from), names, choices, bodies);
        if (from == kStatistics) sends.finish();
        writer->write(piece.columns, 0, piece.columns.rows());
        append_rows(run.result, std::move(piece));
      }
      sends.finish();
      // The other half of the statistics, while rank 1 computes its half.
      FootprintSettings settings = footprint_settings(s, world, run.result.samples);
      settings.sections = kShapes;
      footprint = compute_footprint(impact_table(run.result.columns), settings);
      merge_sections(footprint, footprint_from_image(job.receive(kStatistics, kFootprintTag)));
    } else if (job.rank() == kStatistics) {
      Job::Sends sends;
      for (std::size_t first = 0; first < mine.columns.rows(); first += kRowsPerMessage)
        sends.add(job, 0,
                  pack(mine.columns, first, std::min(mine.columns.rows(), first + kRowsPerMessage)),
                  kRowsTag);
      append_rows(run.result, receive_rows(job, 0, rows_of(0), names, choices, bodies));
      sends.finish();
      append_rows(run.result, std::move(mine));
      for (int from = 2; from < job.size(); ++from)
        append_rows(run.result, receive_rows(job, from, rows_of(from), names, choices, bodies));
      FootprintSettings settings = footprint_settings(s, world, run.result.samples);
      settings.sections = kPlaceAndSpread;
      StudyRecord partial;
      partial.footprint = compute_footprint(impact_table(run.result.columns), settings);
      job.send(0, footprint_image(partial), kFootprintTag);
    } else {
      send_rows(job, kStatistics, mine.columns);
      send_rows(job, 0, mine.columns);
    }
    ++rounds;
    done = total;
    std::uint64_t next = kNoMore;
    if (job.leader() && s.study.target_width) {
      const double width = footprint.widest_relative_width();
      const auto max_samples = static_cast<std::uint64_t>(s.study.max_samples);
      if (width > *s.study.target_width && total < max_samples)
        next = next_sample_count(total, width, *s.study.target_width, footprint, max_samples);
    }
    next = job.broadcast(next);
    if (next == kNoMore) break;
    total = next;
  }
  if (!job.leader()) return {};
  run.record = make_record(s, world, run.result, std::move(footprint), s.study.seed, threads);
  run.record.rounds = rounds;
  run.record.ranks = job.size();
  writer->finish(run.record);
  return run;
}

}  // namespace strewn
