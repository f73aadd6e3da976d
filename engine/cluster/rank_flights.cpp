#include "cluster/rank_flights.hpp"

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

RankFlights::RankFlights(const Job& job, const SampleModel& model)
    : job_(job),
      names_(model.column_names()),
      choices_(model.choice_names().size()),
      bodies_(model.bodies()) {}

// Rank 0 stores the rows and computes half of the statistics (kShapes); rank 1 computes the other
// half (kPlaceAndSpread) meanwhile. The order of the messages keeps both busy and cannot
// deadlock:
//   rank 0: send its rows to 1 while receiving 1's (non-blocking sends); store them; receive
//           2's, ...; compute its half; receive rank 1's half and merge;
//   rank 1: send its rows to 0 while receiving 0's; receive 2's, ...; compute its half; send it;
//   rank r >= 2: send its rows to 1, then to 0.
StudyResult RankFlights::fly(const SampleModel& model, const StudyOptions& options) {
  constexpr int kStatistics = 1;
  const auto rows_of = [&](int rank) {
    return rank_share(options.samples, job_.size(), rank).count * bodies_;
  };
  const SampleRange share = rank_share(options.samples, job_.size(), job_.rank());
  StudyOptions part = options;
  part.first_sample = options.first_sample + share.first;
  part.samples = share.count;
  if (!job_.leader()) {
    part.progress = nullptr;
    part.sink = nullptr;
  }
  StudyResult mine = run_study(model, part);
  StudyResult rows;
  if (job_.leader()) {
    // Its rows go to rank 1 while rank 1's come here: both directions at once.
    Job::Sends sends;
    for (std::size_t first = 0; first < mine.columns.rows(); first += kRowsPerMessage)
      sends.add(job_, kStatistics,
                pack(mine.columns, first, std::min(mine.columns.rows(), first + kRowsPerMessage)),
                kRowsTag);
    append_rows(rows, std::move(mine));
    for (int from = 1; from < job_.size(); ++from) {
      StudyResult piece = receive_rows(job_, from, rows_of(from), names_, choices_, bodies_);
      if (from == kStatistics) sends.finish();
      if (options.sink) options.sink->write(piece.columns, 0, piece.columns.rows());
      append_rows(rows, std::move(piece));
    }
    sends.finish();
  } else if (job_.rank() == kStatistics) {
    Job::Sends sends;
    for (std::size_t first = 0; first < mine.columns.rows(); first += kRowsPerMessage)
      sends.add(job_, 0,
                pack(mine.columns, first, std::min(mine.columns.rows(), first + kRowsPerMessage)),
                kRowsTag);
    append_rows(rows, receive_rows(job_, 0, rows_of(0), names_, choices_, bodies_));
    sends.finish();
    append_rows(rows, std::move(mine));
    for (int from = 2; from < job_.size(); ++from)
      append_rows(rows, receive_rows(job_, from, rows_of(from), names_, choices_, bodies_));
  } else {
    send_rows(job_, kStatistics, mine.columns);
    send_rows(job_, 0, mine.columns);
  }
  return rows;
}

Footprint RankFlights::statistics(const StudyColumns& rows, const FootprintSettings& settings) {
  constexpr int kStatistics = 1;
  FootprintSettings half = settings;
  if (job_.leader()) {
    // The other half of the statistics, while rank 1 computes its half.
    half.sections = kShapes;
    Footprint footprint = compute_footprint(impact_table(rows), half);
    merge_sections(footprint, footprint_from_image(job_.receive(kStatistics, kFootprintTag)));
    return footprint;
  }
  if (job_.rank() == kStatistics) {
    half.sections = kPlaceAndSpread;
    StudyRecord partial;
    partial.footprint = compute_footprint(impact_table(rows), half);
    job_.send(0, footprint_image(partial), kFootprintTag);
  }
  return {};
}

std::uint64_t RankFlights::agree(std::uint64_t value) const {
  return job_.broadcast(value);
}

StudyRun run_on_ranks(const Job& job, const SampleModel& model, const World& world,
                      StudyOptions options, const std::string& path, int threads,
                      bool keep_samples) {
  if (job.size() == 1) return run_and_write(model, world, options, path, threads, keep_samples);
  std::optional<ResultsStore> store;
  if (job.leader()) store.emplace(path, model, options.samples, keep_samples, RunControl{});
  RankFlights flights(job, model);
  return run_pipeline(model, world, std::move(options), store ? &*store : nullptr, flights,
                      threads);
}

}  // namespace strewn
