// The study engine: reproducibility for any thread count and block size, replay of a single
// sample, the results file read back, failed flights counted, the per-sample random choices.
#include <gtest/gtest.h>
#include <sys/stat.h>

#include <tbb/global_control.h>
#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <stdexcept>

#include "command_line.hpp"
#include "core/errors.hpp"
#include "store/checkpoint.hpp"
#include "store/results_file.hpp"
#include "study/study.hpp"
#include "support.hpp"

namespace strewn {
namespace {

const std::string kStudy = R"(title = "test study"
[site]
ground = 200.0
[wind]
layers = [ { altitude = 200.0, speed = 4.0, from = 250.0 }, { altitude = 1200.0, speed = 9.0, from = 270.0 } ]
[wind.uncertainty]
model = "layered"
speed_sd = 1.5
correlation_length = 600.0
[release]
altitude = 1400.0
speed = 40.0
track = 30.0
along_error = { dist = "normal", mean = 0.0, sd = 15.0 }
[release.burst]
speed = { dist = "uniform", min = 0.0, max = 5.0 }
[[body]]
name = "crate"
mass = { dist = "normal", mean = 60.0, sd = 3.0, min = 40.0 }
[body.drag]
model = "area"
cd = { dist = "uniform", min = 0.9, max = 1.2 }
area = 0.4
[body.parachute]
deploy_after = 2.0
fill_time = 1.0
drag_area = 35.0
partial_probability = 0.2
partial_drag_area = 5.0
failure_probability = 0.1
[[body]]
name = "strap"
count = 3
mass = 0.4
[body.drag]
model = "area"
cd = 1.1
area = { dist = "lognormal", median = 0.02, sigma = 0.3 }
[study]
seed = 4242
)";

StudyResult run_with(const SampleModel& model, std::uint64_t samples, int threads,
                     std::size_t block) {
  tbb::global_control limit(tbb::global_control::max_allowed_parallelism,
                            static_cast<std::size_t>(threads));
  StudyOptions options;
  options.samples = samples;
  options.block = block;
  return run_study(model, options);
}

template <class T>
bool same_bits(const std::vector<T>& a, const std::vector<T>& b) {
  return a.size() == b.size() && std::memcmp(a.data(), b.data(), a.size() * sizeof(T)) == 0;
}

bool same_columns(const StudyColumns& a, const StudyColumns& b) {
  bool same = a.inputs.size() == b.inputs.size();
  if (same)
    a.for_each_column_with(b,
                           [&](const auto& x, const auto& y) { same = same && same_bits(x, y); });
  return same;
}

TEST(Study, BitIdenticalForAnyThreadCountAndBlockSize) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 600);
  const StudyResult one = run_with(model, 600, 1, 256);
  ASSERT_EQ(one.columns.rows(), 1200u);  // two bodies per sample
  for (const auto& [threads, block] : {std::pair{2, 256}, {2, 1}, {2, 7}, {1, 1000}})
    EXPECT_TRUE(same_columns(one.columns, run_with(model, 600, threads, block).columns))
        << threads << " threads, blocks of " << block;
}

// The rows as bytes (messages between ranks, checkpoints) read back bit for bit, in parts, and a
// buffer too short for the rows it claims is refused with nothing read.
TEST(Study, RowBytesRoundTripAndRefuseShortInput) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 50);
  const StudyResult result = run_with(model, 50, 1, 256);
  const StudyColumns& rows = result.columns;
  ASSERT_EQ(rows.rows(), 100u);
  std::vector<std::byte> bytes;
  append_row_bytes(rows, 0, 30, bytes);
  append_row_bytes(rows, 30, 100, bytes);
  StudyColumns back;
  back.set_inputs(rows.input_names, rows.choices);
  std::size_t at = 0;
  ASSERT_TRUE(take_row_bytes(bytes, at, 30, back));
  ASSERT_TRUE(take_row_bytes(bytes, at, 70, back));
  EXPECT_EQ(at, bytes.size());
  EXPECT_TRUE(same_columns(rows, back));

  StudyColumns short_of;
  short_of.set_inputs(rows.input_names, rows.choices);
  at = 0;
  const std::span<const std::byte> cut(bytes.data(), bytes.size() - 1);
  EXPECT_FALSE(take_row_bytes(cut, at, 100, short_of));
  EXPECT_EQ(at, 0u);
  short_of.for_each_column(
      [](std::string_view name, const auto& column) { EXPECT_TRUE(column.empty()) << name; });
}

TEST(Study, ReplayedSampleEqualsItsRow) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 200);
  const StudyResult result = run_with(model, 200, 2, 16);
  for (std::uint64_t sample : {0ULL, 17ULL, 199ULL}) {
    for (std::size_t b = 0; b < 2; ++b) {
      const ReplayedRow row = replay_row(model, sample, b);
      const std::size_t r = sample * 2 + b;
      EXPECT_EQ(row.result.position.x(), result.columns.east[r]);
      EXPECT_EQ(row.result.position.y(), result.columns.north[r]);
      EXPECT_EQ(row.result.energy, result.columns.energy[r]);
      for (std::size_t d = 0; d < row.values.size(); ++d)
        EXPECT_EQ(row.values[d], result.columns.inputs[d][r]);
    }
  }
}

// Every random choice a sample makes is a column beside the sampled inputs, so that it can be
// replayed and ranked: the layered wind's perturbation (its mean over the layers) and the burst
// velocity, whose length is the sampled burst speed (the canopy state has a column of its own).
TEST(Study, RandomChoicesAreRecordedColumns) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 100);
  const StudyResult result = run_with(model, 100, 2, 16);
  const StudyColumns& c = result.columns;
  auto column = [&](const std::string& name) -> const std::vector<double>& {
    const auto at = std::find(c.input_names.begin(), c.input_names.end(), name);
    if (at == c.input_names.end()) throw std::runtime_error("no column " + name);
    return c.inputs[static_cast<std::size_t>(at - c.input_names.begin())];
  };
  EXPECT_EQ(c.choices, 5u);
  EXPECT_EQ(c.sampled_inputs(), model.sampler().dimensions());
  const auto &east = column("release.burst.east"), &north = column("release.burst.north"),
             &up = column("release.burst.up"), &speed = column("release.burst.speed");
  const auto& perturbation = column("wind.perturbation_east");
  for (std::size_t i = 0; i < c.rows(); ++i) {
    EXPECT_NEAR(std::sqrt(east[i] * east[i] + north[i] * north[i] + up[i] * up[i]), speed[i],
                1e-12 * (1.0 + speed[i]));
    // Both bodies of a sample share its wind; each has its own burst direction.
    if (i % 2 == 1) {
      EXPECT_EQ(perturbation[i], perturbation[i - 1]);
    }
  }
  // The layered perturbation is Gaussian with sd 1.5 per layer, its mean over two layers
  // correlated by exp(-1000/600): sd 1.5 sqrt((1 + 0.189) / 2) = 1.16; over 100 samples the
  // spread of the column is that within a few standard errors (common practice).
  double sum = 0.0, squares = 0.0;
  for (std::size_t i = 0; i < c.rows(); i += 2) {
    sum += perturbation[i];
    squares += perturbation[i] * perturbation[i];
  }
  const double sd = std::sqrt(squares / 100.0 - (sum / 100.0) * (sum / 100.0));
  EXPECT_NEAR(sd, 1.5 * std::sqrt((1.0 + std::exp(-1000.0 / 600.0)) / 2.0), 0.35);
  // Replayed alone, a sample gives the same choices.
  const ReplayedRow row = replay_row(model, 37, 1);
  for (std::size_t d = 0; d < row.values.size(); ++d)
    EXPECT_EQ(row.values[d], c.inputs[d][37 * 2 + 1]) << c.input_names[d];
}

// A study stopped by a signal keeps every sample it finished: those of the rounds written in
// order, and the starts of the blocks that were flying, handed to the sink to keep; each kept row
// is the row the uninterrupted study has at that index.
TEST(Study, AStoppedStudyKeepsEveryFinishedSample) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const std::uint64_t n = 3000;
  const SampleModel model(s, world, n);
  const StudyResult whole = run_with(model, n, 2, 4);
  struct Keeper : RowSink {
    std::atomic<bool> stop{false};
    std::vector<std::pair<std::size_t, std::size_t>> written, kept;
    StudyColumns rows;
    void write(const StudyColumns& c, std::size_t first, std::size_t end) override {
      written.emplace_back(first, end);
      stop = true;  // stop at the first round written
      if (rows.input_names.empty()) rows.set_inputs(c.input_names, c.choices);
      rows.for_each_column_with(c, [&](auto& ours, const auto& theirs) {
        ours.insert(ours.end(), theirs.begin() + static_cast<long>(first),
                    theirs.begin() + static_cast<long>(end));
      });
    }
    void keep(const StudyColumns& c, std::size_t first, std::size_t end) override {
      kept.emplace_back(first, end);
      for (std::size_t row = first; row < end; ++row) rows_kept.push_back({row, c.east[row]});
    }
    std::vector<std::pair<std::size_t, double>> rows_kept;
  } sink;
  tbb::global_control limit(tbb::global_control::max_allowed_parallelism, 2);
  StudyOptions options;
  options.samples = n;
  options.block = 4;
  options.sink = &sink;
  options.stop = &sink.stop;
  const StudyResult stopped = run_study(model, options);
  ASSERT_TRUE(stopped.interrupted);
  std::size_t rows = 0;
  for (const auto& [first, end] : sink.written) rows += end - first;
  for (const auto& [first, end] : sink.kept) {
    EXPECT_EQ(first % 2, 0u);  // whole samples (two bodies)
    EXPECT_EQ(end % 2, 0u);
    rows += end - first;
  }
  EXPECT_EQ(rows, stopped.finished * 2);
  EXPECT_GT(stopped.finished, stopped.samples);  // more than the rounds written in order
  for (const auto& [row, east] : sink.rows_kept) EXPECT_EQ(east, whole.columns.east[row]);
  for (std::size_t row = 0; row < sink.rows.rows(); ++row)
    EXPECT_EQ(sink.rows.east[row], whole.columns.east[row]);
}

// Found by a tester: a study of fewer than 16 384 samples wrote its rows in one round, at its end,
// so a kill (or a power cut) kept nothing of it however long it had flown. The rows now reach the
// sink in about 16 rounds or more.
TEST(Study, RowsReachTheSinkAsTheStudyGoes) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 1600);
  struct Counter : RowSink {
    int writes = 0;
    void write(const StudyColumns&, std::size_t, std::size_t) override { ++writes; }
  } sink;
  tbb::global_control limit(tbb::global_control::max_allowed_parallelism, 2);
  StudyOptions options;
  options.samples = 1600;
  options.sink = &sink;
  (void)run_study(model, options);
  EXPECT_GE(sink.writes, 8);
}

// Found by a tester: a signal that came after the last flight, while the statistics were
// computed, was ignored and the run ended as if never stopped. It stops the run, everything kept
// in the checkpoint, and a resumed run writes the uninterrupted file.
TEST(Study, AStopAfterTheLastFlightKeepsEverythingAndResumes) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 300);
  const test::ScratchFolder dir("study-late-stop");
  const std::string straight = (dir / "straight.h5").string(), late = (dir / "late.h5").string();
  StudyOptions options;
  options.samples = 300;
  const StudyRun whole = run_and_write(model, world, options, straight, 1);
  std::atomic<bool> stop{false};
  options.progress = [&](std::uint64_t done) {
    if (done == 300) stop = true;  // the signal comes once every sample has flown
  };
  RunControl control;
  control.stop = &stop;
  control.checkpoint = true;
  const StudyRun stopped = run_and_write(model, world, options, late, 1, true, control);
  EXPECT_TRUE(stopped.result.interrupted);
  EXPECT_EQ(stopped.result.finished, 300u);
  EXPECT_FALSE(std::filesystem::exists(late));
  EXPECT_TRUE(std::filesystem::exists(late + ".checkpoint"));
  options.progress = nullptr;
  control.stop = nullptr;
  control.resume = true;
  const StudyRun resumed = run_and_write(model, world, options, late, 1, true, control);
  EXPECT_EQ(resumed.resumed, 300u);  // nothing flown again
  EXPECT_TRUE(same_columns(resumed.result.columns, whole.result.columns));
  EXPECT_FALSE(std::filesystem::exists(late + ".checkpoint"));
}

// A study on several processes is never stopped or resumed: one process stopping alone would
// leave the others waiting for its rows. The pipeline refuses it before anything flies.
TEST(Study, ASeveralProcessStudyIsNeverStoppedOrResumed) {
  class TwoProcesses final : public SampleFlights {
   public:
    StudyResult fly(const SampleModel&, const StudyOptions&) override {
      ADD_FAILURE() << "flown despite a stop on several processes";
      return {};
    }
    [[nodiscard]] int processes() const override { return 2; }
  };
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 10);
  StudyOptions options;
  options.samples = 10;
  TwoProcesses flights;
  std::atomic<bool> stop{false};
  RunControl stoppable;
  stoppable.stop = &stop;
  EXPECT_THROW(run_pipeline(model, world, options, nullptr, flights, 1, stoppable),
               std::logic_error);
  RunControl resumed;
  resumed.resume = true;
  EXPECT_THROW(run_pipeline(model, world, options, nullptr, flights, 1, resumed), std::logic_error);
}

// A checkpoint damaged anywhere (one bit of every byte flipped, one copy each) is refused with a
// message or read back as a prefix of intact records: never a crash, and never a row that differs
// from what was written (each record carries its CRC-32, which detects every single-bit error:
// ITU-T V.42, from memory).
TEST(Study, EveryFlippedBitOfACheckpointIsRefusedOrCutOff) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 40);
  const StudyResult rows = run_with(model, 40, 1, 8);
  const test::ScratchFolder dir("study-flipped");
  const auto path = (dir / "intact.checkpoint").string();
  const Checkpoint::Identity id{sha256_hex(s.text), s.study.seed, 40, 2,
                                rows.columns.input_names.size()};
  {
    Checkpoint fresh(path, id, rows.columns.input_names, rows.columns.choices, false);
    fresh.append(rows.columns, 0, 40);
    fresh.append(rows.columns, 40, 80);
  }
  const std::string intact = test::slurp(path);
  const auto damaged = (dir / "damaged.checkpoint").string();
  std::size_t refused = 0, cut = 0;
  for (std::size_t byte = 0; byte < intact.size(); ++byte) {
    std::string bytes = intact;
    bytes[byte] = static_cast<char>(bytes[byte] ^ (1 << (byte % 8)));
    std::ofstream(damaged, std::ios::binary | std::ios::trunc) << bytes;
    try {
      Checkpoint back(damaged, id, rows.columns.input_names, rows.columns.choices, true);
      for (const auto& piece : back.take_pieces()) {
        const std::size_t first = piece.first_sample * 2;  // two bodies a sample
        ASSERT_LE(first + piece.rows.columns.rows(), rows.columns.rows()) << "byte " << byte;
        for (std::size_t r = 0; r < piece.rows.columns.rows(); ++r)
          ASSERT_EQ(piece.rows.columns.east[r], rows.columns.east[first + r]) << "byte " << byte;
        cut += piece.rows.samples < 40 ? 1 : 0;
      }
    } catch (const UsageError&) {
      ++refused;
    } catch (const IoError&) {
      ++refused;
    }
  }
  // Both ways were taken: the header's damage is refused, a record's cut off.
  EXPECT_GT(refused, 0u);
  EXPECT_GT(cut, 0u);
}

// Found by a tester: a checkpoint whose record length was damaged made --resume fail for want of
// memory, for ever. A length the file cannot hold is not believed: that record and those after
// it are cut off, and the records before it are kept.
TEST(Study, ADamagedRecordLengthIsCutOff) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 40);
  const StudyResult rows = run_with(model, 40, 1, 8);
  const test::ScratchFolder dir("study-damaged");
  const auto path = (dir / "damaged.checkpoint").string();
  const Checkpoint::Identity id{sha256_hex(s.text), s.study.seed, 40, 2,
                                rows.columns.input_names.size()};
  std::uintmax_t first_record_end = 0;
  {
    Checkpoint fresh(path, id, rows.columns.input_names, rows.columns.choices, false);
    fresh.append(rows.columns, 0, 40);  // samples 0 .. 19
    first_record_end = std::filesystem::file_size(path);
    fresh.append(rows.columns, 40, 80);  // samples 20 .. 39
  }
  {
    // The second record's payload length (its fourth 8-byte field) made enormous.
    std::fstream file(path, std::ios::in | std::ios::out | std::ios::binary);
    file.seekp(static_cast<std::streamoff>(first_record_end + 3 * sizeof(std::uint64_t)));
    const std::uint64_t huge = 0xffffffffffffULL;
    file.write(reinterpret_cast<const char*>(&huge), sizeof huge);
  }
  {
    Checkpoint back(path, id, rows.columns.input_names, rows.columns.choices, true);
    const auto pieces = back.take_pieces();
    ASSERT_EQ(pieces.size(), 1u);
    EXPECT_EQ(pieces[0].first_sample, 0u);
    EXPECT_EQ(pieces[0].rows.samples, 20u);
    // Appended after what was kept, through the descriptor it was read by: the damaged
    // record is gone and the one written now is read back whole.
    EXPECT_EQ(std::filesystem::file_size(path), first_record_end);
    back.append(rows.columns, 40, 80);
  }
  {
    Checkpoint again(path, id, rows.columns.input_names, rows.columns.choices, true);
    const auto pieces = again.take_pieces();
    ASSERT_EQ(pieces.size(), 1u);
    EXPECT_EQ(pieces[0].rows.samples, 40u);
  }
  // Made as any program makes a file, 0666 less the umask, so that a group sharing the folder
  // can resume (found in a read of the code: it was 0644 whatever the umask).
  const mode_t mask = ::umask(002);
  ::umask(mask);
  EXPECT_EQ(std::filesystem::status(path).permissions() & std::filesystem::perms::all,
            static_cast<std::filesystem::perms>(0666 & ~mask));
  // A link put in the checkpoint's place is never read, cut or written through.
  const std::string target = path + ".target";
  std::ofstream(target) << "keep me";
  std::filesystem::remove(path);
  std::filesystem::create_symlink(target, path);
  EXPECT_THROW(Checkpoint(path, id, rows.columns.input_names, rows.columns.choices, true), IoError);
  EXPECT_THROW(Checkpoint(path, id, rows.columns.input_names, rows.columns.choices, false),
               IoError);
  EXPECT_EQ(test::slurp(target), "keep me");
}

TEST(Study, ResultsFileReadsBackWithEveryName) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const SampleModel model(s, world, 300);
  const StudyResult result = run_with(model, 300, 2, 64);
  const test::ScratchFolder dir("study-test");
  const auto path = (dir / "study-test.h5").string();
  const Footprint footprint =
      compute_footprint(impact_table(result.columns), footprint_settings(s, world, result.samples));
  write_results(path, s, result, make_record(s, world, result, footprint, s.study.seed, 2));
  const ResultsFile file = read_results(path);
  EXPECT_EQ(file.format_version, kResultsFormatVersion);
  EXPECT_EQ(file.record.seed, 4242u);
  EXPECT_EQ(file.record.samples, 300u);
  EXPECT_EQ(file.record.completed + file.record.failed, 600u);
  EXPECT_EQ(file.record.threads, 2);
  EXPECT_EQ(file.record.scenario_text, kStudy);  // exactly as read
  EXPECT_EQ(file.record.scenario_sha256, sha256_hex(kStudy));
  EXPECT_EQ(file.body_names, (std::vector<std::string>{"crate", "strap"}));
  EXPECT_TRUE(same_columns(file.columns, result.columns));  // input columns in their own order
  for (const char* name : {"crate.mass", "crate.drag.cd", "release.along_error",
                           "release.burst.speed", "strap.drag.area"})
    EXPECT_NE(std::find(file.columns.input_names.begin(), file.columns.input_names.end(), name),
              file.columns.input_names.end())
        << name;
  // No temporary file is left beside it.
  for (const auto& entry : std::filesystem::directory_iterator(dir.path()))
    EXPECT_EQ(entry.path().filename().string().find("study-test.h5.partial"), std::string::npos);
}

TEST(Study, RefusesFilesThatAreNotResults) {
  EXPECT_THROW(read_results("/nonexistent/strewn.h5"), InputFileError);
  const test::ScratchFolder dir("study-not-hdf5");
  const auto path = (dir / "not-hdf5.h5").string();
  std::ofstream(path) << "not an HDF5 file";
  EXPECT_THROW(read_results(path), InputFileError);
  EXPECT_THROW(write_results("/nonexistent/folder/out.h5", parse_scenario(kStudy, "s.toml"),
                             StudyResult{}, StudyRecord{}),
               IoError);
}

// Canopy failures and partial openings come out at their probabilities (within five binomial
// standard errors), and failed flights are counted, never lost.
TEST(Study, CanopyStatesAndFailedFlightsAreCounted) {
  const Scenario s = parse_scenario(kStudy, "study.toml");
  const World world = build_world(s);
  const std::uint64_t n = 4000;
  const SampleModel model(s, world, n);
  const StudyResult r = run_with(model, n, 2, 128);
  std::uint64_t failed = 0, partial = 0, crates = 0;
  for (std::size_t i = 0; i < r.columns.rows(); ++i) {
    if (r.columns.body[i] != 0) continue;
    ++crates;
    failed += r.columns.canopy[i] == static_cast<std::uint8_t>(CanopyState::failed);
    partial += r.columns.canopy[i] == static_cast<std::uint8_t>(CanopyState::partial);
  }
  ASSERT_EQ(crates, n);
  EXPECT_NEAR(static_cast<double>(failed) / n, 0.1, 5.0 * std::sqrt(0.1 * 0.9 / n));
  EXPECT_NEAR(static_cast<double>(partial) / n, 0.2, 5.0 * std::sqrt(0.2 * 0.8 / n));
  EXPECT_EQ(r.completed + r.failed, r.columns.rows());

  // A body lighter than the air floats away: every one of its flights fails, and is counted.
  std::string floating = kStudy;
  floating.replace(floating.find("mass = 0.4"), 10, "mass = 0.01");
  floating.replace(floating.find("cd = 1.1"), 8, "cd = 1.1\nvolume = 1.0");
  const Scenario f = parse_scenario(floating, "floating.toml");
  const World fw = build_world(f);
  const SampleModel fm(f, fw, 50);
  const StudyResult fr = run_with(fm, 50, 2, 8);
  EXPECT_EQ(fr.failed, 50u);
  for (std::size_t i = 1; i < fr.columns.rows(); i += 2)
    EXPECT_NE(fr.columns.status[i], static_cast<std::uint8_t>(FlightStatus::landed));
}

}  // namespace
}  // namespace strewn
