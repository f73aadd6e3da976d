#include "io/results_file.hpp"

#include <H5Cpp.h>
#include <fcntl.h>
#include <openssl/evp.h>
#include <signal.h>
#include <sys/file.h>
#include <unistd.h>

#include <atomic>
#include <cctype>
#include <cerrno>
#include <chrono>
#include <cstdio>
#include <cstring>
#include <ctime>
#include <filesystem>
#include <optional>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "core/version.hpp"
#include "footprint/footprint.hpp"
#include "io/checkpoint.hpp"
#include "io/footprint_file.hpp"
#include "io/hdf5_support.hpp"

namespace strewn {

std::recursive_mutex& hdf5::hdf5_mutex() {
  static std::recursive_mutex lock;
  return lock;
}

std::string sha256_hex(const std::string& text) {
  unsigned char digest[EVP_MAX_MD_SIZE];
  unsigned int length = 0;
  EVP_Digest(text.data(), text.size(), digest, &length, EVP_sha256(), nullptr);
  std::string hex;
  char byte[3];
  for (unsigned int i = 0; i < length; ++i) {
    std::snprintf(byte, sizeof byte, "%02x", digest[i]);
    hex += byte;
  }
  return hex;
}

namespace {

using namespace hdf5;

// An extendible column: chunked (at most 64 Ki rows a chunk); with [output] compress, also
// byte-shuffled and deflated at level 1 (as small as level 4 on these columns, for less CPU).
// Deflating costs about 1.3 us per row on the writing thread for 40 % less disk; off by default,
// because the writer is the one serial part of a study on many ranks (docs/cluster.md).
template <class T>
H5::DataSet create_column(H5::Group& group, const std::string& name, std::size_t rows,
                          bool compress) {
  const hsize_t zero = 0, unlimited = H5S_UNLIMITED;
  H5::DataSpace space(1, &zero, &unlimited);
  H5::DSetCreatPropList properties;
  const hsize_t chunk = std::clamp<hsize_t>(rows, 1, 65536);
  properties.setChunk(1, &chunk);
  if (compress) {
    properties.setShuffle();
    properties.setDeflate(1);
  }
  return group.createDataSet(name, type_of<T>(), space, properties);
}

template <class T>
void append(H5::DataSet& set, const std::vector<T>& values, std::size_t first, std::size_t end) {
  hsize_t old_size = 0;
  set.getSpace().getSimpleExtentDims(&old_size);
  const hsize_t count = end - first;
  const hsize_t new_size = old_size + count;
  set.extend(&new_size);
  H5::DataSpace file_space = set.getSpace();
  file_space.selectHyperslab(H5S_SELECT_SET, &count, &old_size);
  H5::DataSpace memory(1, &count);
  set.write(values.data() + first, type_of<T>(), memory, file_space);
}

std::string now_iso8601() {
  const std::time_t t = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm utc{};
  gmtime_r(&t, &utc);
  char text[32];
  std::strftime(text, sizeof text, "%Y-%m-%dT%H:%M:%SZ", &utc);
  return text;
}

}  // namespace

namespace {
std::atomic<bool> unclean_close{false};
}  // namespace

bool hdf5_left_unclean() {
  return unclean_close.load();
}

struct ResultsWriter::Open {
  H5::H5File file;
  H5::Group samples;
  std::vector<H5::DataSet>
      columns;  // body, east, north, time, speed, energy, status, canopy, inputs...
  bool keep_samples = true;

  // Closes everything, explicitly: after a failed write (a full disk) a close can fail too.
  // Returns false then; the caller must not destroy this object, whose HDF5 destructors would
  // close the same identifiers again (HDF5 1.10 crashes on that), and the program ends without
  // HDF5's exit-time clean-up (hdf5_left_unclean).
  bool close() {
    bool clean = true;
    auto attempt = [&](auto& object) {
      try {
        object.close();
      } catch (const H5::Exception&) {
        clean = false;
      }
    };
    for (auto& c : columns) attempt(c);
    attempt(samples);
    attempt(file);
    if (!clean) unclean_close = true;
    return clean;
  }
};

namespace {
// Runs an HDF5 or file-system action, turning its failures into IoError naming the path.
template <class F>
void io_guard(const std::string& path, F&& action) {
  try {
    action();
  } catch (const H5::Exception& e) {
    throw IoError(path + ": cannot write the results file (" + e.getDetailMsg() + ")");
  } catch (const std::filesystem::filesystem_error& e) {
    throw IoError(path + ": cannot write the results file (" + e.code().message() + ")");
  }
}
}  // namespace

std::string partial_suffix() {
  // Taken once: a host renamed during a run must not give its files two names.
  static const std::string suffix = [] {
    // The host name as it may stand in a file name: letters, digits, '-' and '.', the rest '_'.
    char host[256] = {};
    if (::gethostname(host, sizeof host - 1) != 0) host[0] = '\0';
    std::string name;
    for (const char* c = host; *c != '\0' && name.size() < 64; ++c) {
      const auto u = static_cast<unsigned char>(*c);
      name += (std::isalnum(u) || *c == '-' || *c == '.') ? *c : '_';
    }
    if (name.empty()) name = "host";
    return ".partial-" + name + "-" + std::to_string(::getpid());
  }();
  return suffix;
}

std::string temporary_path_of(const std::string& path) {
  const std::filesystem::path final_path(path);
  return (final_path.parent_path() / (final_path.filename().string() + partial_suffix())).string();
}

void remove_stale_partials(const std::string& folder, const std::string& output_name) {
  namespace fs = std::filesystem;
  const std::string suffix = partial_suffix();
  // ".partial-<host>-": what this machine's runs add, whatever their process id.
  const std::string ours = suffix.substr(0, suffix.rfind('-') + 1);
  std::error_code ec;
  for (const auto& entry : fs::directory_iterator(folder, ec)) {
    const std::string name = entry.path().filename().string();
    const std::size_t at = name.rfind(ours);
    if (at == std::string::npos || (!output_name.empty() && name != output_name + name.substr(at)))
      continue;
    const std::string digits = name.substr(at + ours.size());
    if (digits.empty() || digits.size() > 9 ||
        digits.find_first_not_of("0123456789") != std::string::npos)
      continue;
    const auto pid = static_cast<pid_t>(std::stol(digits));
    if (::kill(pid, 0) == 0 || errno != ESRCH) continue;  // its process lives
    // A file someone holds locked is in use whatever its name says (HDF5 locks a file it
    // writes; two machines may share a host name): removed only while this process holds it.
    const int fd = ::open(entry.path().c_str(), O_RDONLY | O_NOFOLLOW | O_CLOEXEC | O_NONBLOCK);
    if (fd < 0) continue;
    if (::flock(fd, LOCK_EX | LOCK_NB) == 0) {
      std::error_code ignored;
      fs::remove(entry.path(), ignored);
    }
    ::close(fd);
  }
}

int create_new_file(const std::string& path) {
  std::error_code ignored;
  std::filesystem::remove(path, ignored);  // removes a link itself, never what it points to
  // 0666 less the umask, as any file a program makes: a group sharing a folder shares it.
  return ::open(path.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
}

// Makes the folder of an output file (and its parents) when it is missing (with `make`; without,
// as `check` does, only finds that it could be made), and checks that a file can be made there,
// before any flight: a destination that cannot be written is refused with status 2, nothing
// having run. `origin` says where the path came from.
void refuse_unsafe_output(const std::string& path, const std::string& origin,
                          const std::vector<std::string>& inputs) {
  namespace fs = std::filesystem;
  // Longer than Linux's PATH_MAX, or a name longer than NAME_MAX (255), with the temporary
  // suffix and the probe's ".probe": no such file could be made.
  const std::size_t added = partial_suffix().size() + std::string_view(".probe").size();
  if (path.size() + added >= 4096)
    throw UsageError(origin + path.substr(0, 60) + "...: the output's path is too long (" +
                     std::to_string(path.size()) + " characters)");
  if (const std::string name = fs::path(path).filename().string(); name.size() + added > 255)
    throw UsageError(origin + path + ": the file's name is too long (" +
                     std::to_string(name.size()) + " characters; at most " +
                     std::to_string(255 - added) + " on this machine, which adds " +
                     std::to_string(added) + " to it while writing)");
  std::error_code ec;
  const fs::file_status status = fs::symlink_status(path, ec);
  if (fs::is_directory(status))
    throw UsageError(origin + path + ": is a folder; name the output file itself");
  if (fs::exists(status) && !fs::is_regular_file(status))
    throw UsageError(origin + path +
                     ": is not a regular file (a device, a pipe or a link); strewn writes its "
                     "outputs only as regular files, which it replaces whole");
  for (const auto& input : inputs)
    if (fs::exists(status) && fs::equivalent(path, input, ec))
      throw UsageError(origin + path + ": is a file this command reads (" + input +
                       "); choose another name for the output");
}

void prepare_output(const std::string& path, const std::string& origin, bool make,
                    const std::vector<std::string>& inputs) {
  namespace fs = std::filesystem;
  refuse_unsafe_output(path, origin, inputs);
  std::error_code ec;
  const std::string checkpoint = path + ".checkpoint";
  if (const fs::file_status beside = fs::symlink_status(checkpoint, ec);
      fs::exists(beside) && !fs::is_regular_file(beside))
    throw UsageError(origin + path + ": its checkpoint " + checkpoint +
                     " is not a regular file (a folder, a device, a pipe or a link); remove it");
  fs::path folder = fs::path(path).parent_path();
  if (folder.empty()) folder = ".";
  fs::path existing = folder;  // the folder, or the nearest of its parents that exists
  while (!fs::exists(existing, ec)) {
    if (!existing.has_parent_path() || existing.parent_path() == existing) {
      existing = ".";  // a relative path's first part: the working directory holds it
      break;
    }
    existing = existing.parent_path();
  }
  if (!fs::is_directory(existing, ec))
    throw UsageError(origin + path + ": cannot make the folder " + folder.string() + " (" +
                     existing.string() + " is a file, not a folder)");
  if (make && existing != folder) {
    fs::create_directories(folder, ec);
    if (ec || !fs::is_directory(folder))
      throw UsageError(origin + path + ": cannot make the folder " + folder.string() + " (" +
                       (ec ? ec.message() : std::string("a file is in the way")) + ")");
    existing = folder;
  }
  // A file made and removed again: the one sure test that the folder takes new files.
  const std::string probe =
      (existing / (fs::path(temporary_path_of(path)).filename().string() + ".probe")).string();
  const int fd = ::open(probe.c_str(), O_WRONLY | O_CREAT | O_EXCL, 0644);
  if (fd < 0)
    throw UsageError(origin + path + ": cannot write in " + existing.string() + " (" +
                     std::strerror(errno) + ")");
  ::close(fd);
  ::unlink(probe.c_str());
  if (!make) return;
  // Temporary files of runs that were killed (their process is gone): strewn's own leftovers.
  remove_stale_partials(existing.string(), fs::path(path).filename().string());
}

ResultsWriter::ResultsWriter(const std::string& path, const Scenario& scenario,
                             const std::vector<std::string>& input_names, std::size_t choices,
                             std::size_t rows, bool keep_samples)
    : path_(path) {
  temporary_ = temporary_path_of(path);
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  io_guard(path_, [&] {
    auto open = std::make_unique<Open>();
    open->keep_samples = keep_samples;
    // Made new, never through a link planted under the temporary name.
    std::error_code ignored;
    std::filesystem::remove(temporary_, ignored);
    open->file = H5::H5File(temporary_, H5F_ACC_EXCL);
    H5::H5File& file = open->file;
    write_attribute(file, "format_version", kResultsFormatVersion);
    write_attribute(file, "engine_version", std::string(kEngineVersion));
    write_attribute(file, "created", now_iso8601());
    write_attribute(file, "scenario_sha256", sha256_hex(scenario.text));
    {
      H5::StrType type(H5::PredType::C_S1, std::max<std::size_t>(1, scenario.text.size()));
      H5::DataSpace scalar;
      H5::DataSet text = file.createDataSet("scenario", type, scalar);
      text.write(scenario.text.c_str(), type);
    }
    open->samples = file.createGroup("samples");
    std::vector<std::string> names;
    for (const auto& b : scenario.bodies) names.push_back(b.name);
    write_strings_attribute(open->samples, "body_names", names);
    StudyColumns shape;  // no rows: only the names and types of the columns
    shape.set_inputs(input_names, choices);
    write_strings_attribute(
        open->samples, "input_names",
        std::vector<std::string>(input_names.begin(), input_names.end() - choices));
    write_strings_attribute(
        open->samples, "choice_names",
        std::vector<std::string>(input_names.end() - choices, input_names.end()));
    if (keep_samples) {
      shape.for_each_column([&](std::string_view name, const auto& column) {
        using Value = typename std::decay_t<decltype(column)>::value_type;
        open->columns.push_back(
            create_column<Value>(open->samples, std::string(name), rows, scenario.output.compress));
      });
    }
    open_ = std::move(open);
  });
}

ResultsWriter::~ResultsWriter() {
  if (!open_) return;
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  if (open_->close())
    open_.reset();
  else
    (void)open_.release();  // left to the end of the program, see Open::close()
  std::error_code ignored;
  std::filesystem::remove(temporary_, ignored);
}

void ResultsWriter::write(const StudyColumns& c, std::size_t first, std::size_t end) {
  if (!open_ || !open_->keep_samples || end <= first) return;
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  io_guard(path_, [&] {
    auto set = open_->columns.begin();
    c.for_each_column(
        [&](std::string_view, const auto& column) { append(*set++, column, first, end); });
  });
}

void ResultsWriter::finish(const StudyRecord& record) {
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  io_guard(path_, [&] {
    H5::H5File& file = open_->file;
    write_attributes(file, record, run_counters());
    write_footprint(file, record);
    file.flush(H5F_SCOPE_GLOBAL);
    if (!open_->close()) {
      (void)open_.release();  // see Open::close()
      throw IoError(path_ + ": cannot close the results file");
    }
    open_.reset();  // closed before the rename
    std::filesystem::rename(temporary_, path_);
  });
}

void write_results(const std::string& path, const Scenario& scenario, const StudyResult& result,
                   const StudyRecord& record, bool keep_samples) {
  ResultsWriter writer(path, scenario, result.columns.input_names, result.columns.choices,
                       result.columns.rows(), keep_samples);
  writer.write(result.columns, 0, result.columns.rows());
  writer.finish(record);
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

// The next sample count of a study grown toward a target width. Widths of order-statistic
// bounds shrink about as 1/sqrt(n), so n (w / target)^2 with a 20 percent margin, at least 1.5
// and at most 4 times the current count; an undetermined bound asks for the samples it needs.
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

// Rows go to the results file and, when kept, to the checkpoint; a stopped part's rows beyond
// those written in order go to the checkpoint only. `offset_rows` places a part's rows in the
// study.
class Tee : public RowSink {
 public:
  Tee(ResultsWriter& writer, Checkpoint* checkpoint) : writer_(writer), checkpoint_(checkpoint) {}
  void write(const StudyColumns& c, std::size_t first, std::size_t end) override {
    writer_.write(c, first, end);
    if (checkpoint_) checkpoint_->append(c, first, end, offset_rows);
  }
  void keep(const StudyColumns& c, std::size_t first, std::size_t end) override {
    if (checkpoint_) checkpoint_->append(c, first, end, offset_rows);
  }
  std::size_t offset_rows = 0;

 private:
  ResultsWriter& writer_;
  Checkpoint* checkpoint_;
};
}  // namespace

StudyRun run_and_write(const SampleModel& model, const World& world, StudyOptions options,
                       const std::string& path, int threads, bool keep_samples,
                       const RunControl& control) {
  const Scenario& s = model.scenario();
  const std::vector<std::string> names = model.column_names();
  const std::size_t choices = model.choice_names().size();
  ResultsWriter writer(path, s, names, choices, options.samples * model.bodies(), keep_samples);
  std::optional<Checkpoint> checkpoint;
  std::vector<Checkpoint::Piece> pieces;  // what an earlier, stopped run finished
  if (control.checkpoint || control.resume) {
    checkpoint.emplace(path + ".checkpoint",
                       Checkpoint::Identity{sha256_hex(s.text), s.study.seed, options.samples,
                                            model.bodies(), names.size()},
                       names, choices, control.resume);
    pieces = checkpoint->take_pieces();
  }
  const std::size_t bodies = model.bodies();
  Tee tee(writer, checkpoint ? &*checkpoint : nullptr);
  options.sink = &tee;
  options.stop = control.stop;
  StudyRun run;
  run.result.bodies = bodies;
  run.result.columns.set_inputs(names, choices);
  std::uint64_t total = options.samples;
  int rounds = 0;
  Footprint footprint;
  auto stopped = [&] { return control.stop && control.stop->load(); };
  std::size_t next_piece = 0;
  while (true) {
    // Samples [done, total) in index order: each run of them taken from the checkpoint when an
    // earlier run finished it, else flown.
    while (run.result.samples < total) {
      const std::uint64_t done = run.result.samples;
      while (next_piece < pieces.size() &&
             pieces[next_piece].first_sample + pieces[next_piece].rows.samples <= done)
        ++next_piece;
      const bool held = next_piece < pieces.size() && pieces[next_piece].first_sample <= done;
      if (held) {
        const Checkpoint::Piece& piece = pieces[next_piece];
        const std::uint64_t end = std::min(total, piece.first_sample + piece.rows.samples);
        StudyResult rows = slice_samples(piece.rows, done - piece.first_sample, end - done);
        run.resumed += rows.samples;
        writer.write(rows.columns, 0, rows.columns.rows());
        append_rows(run.result, std::move(rows));
        if (options.progress) options.progress(run.result.samples);
        continue;
      }
      const std::uint64_t gap_end =
          next_piece < pieces.size() ? std::min(total, pieces[next_piece].first_sample) : total;
      StudyOptions part = options;
      part.first_sample = done;
      part.samples = gap_end - done;
      tee.offset_rows = done * bodies;
      StudyResult flown = run_study(model, part);
      if (flown.interrupted) {
        run.result.interrupted = true;
        // Every sample finished so far is in the checkpoint: those of this run and of earlier ones.
        std::uint64_t kept = done + flown.finished;
        // Pieces past the planned total (of a longer earlier round) are not counted in it.
        for (std::size_t k = next_piece; k < pieces.size(); ++k) {
          const std::uint64_t first = pieces[k].first_sample;
          if (first < total) kept += std::min(total, first + pieces[k].rows.samples) - first;
        }
        run.result.finished = kept;
        run.result.planned = total;
        return run;  // the writer removes its temporary file; the checkpoint stays
      }
      append_rows(run.result, std::move(flown));
    }
    // A signal that came after the last flight stops the run here, everything kept.
    if (stopped()) {
      run.result.interrupted = true;
      run.result.finished = run.result.samples;
      run.result.planned = total;
      return run;
    }
    ++rounds;
    footprint = compute_footprint(impact_table(run.result.columns),
                                  footprint_settings(s, world, run.result.samples));
    // A signal during the statistics stops the run too, within their time (under a second for
    // a million samples), everything kept.
    if (stopped()) {
      run.result.interrupted = true;
      run.result.finished = run.result.samples;
      run.result.planned = total;
      return run;
    }
    if (!s.study.target_width) break;
    const double width = footprint.widest_relative_width();
    const auto max_samples = static_cast<std::uint64_t>(s.study.max_samples);
    if (width <= *s.study.target_width || total >= max_samples) break;
    total = next_sample_count(total, width, *s.study.target_width, footprint, max_samples);
  }
  run.record = make_record(s, world, run.result, std::move(footprint), s.study.seed, threads);
  run.record.rounds = rounds;
  writer.finish(run.record);
  if (checkpoint) checkpoint->remove();
  return run;
}

std::vector<std::byte> footprint_image(const StudyRecord& record) {
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  try {
    H5::FileAccPropList access;
    access.setCore(1 << 20, false);  // in memory, never on disk
    H5::H5File file("footprint-image", H5F_ACC_TRUNC, H5::FileCreatPropList::DEFAULT, access);
    write_footprint(file, record);
    file.flush(H5F_SCOPE_GLOBAL);
    const ssize_t size = H5Fget_file_image(file.getId(), nullptr, 0);
    if (size < 0) throw IoError("cannot take the image of the footprint");
    std::vector<std::byte> image(static_cast<std::size_t>(size));
    if (H5Fget_file_image(file.getId(), image.data(), image.size()) < 0)
      throw IoError("cannot take the image of the footprint");
    return image;
  } catch (const H5::Exception& e) {
    throw IoError("cannot take the image of the footprint (" + e.getDetailMsg() + ")");
  }
}

Footprint footprint_from_image(std::span<const std::byte> image) {
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  try {
    H5::FileAccPropList access;
    access.setCore(1 << 20, false);
    // The library copies the image in; it is only read.
    if (H5Pset_file_image(access.getId(), const_cast<std::byte*>(image.data()), image.size()) < 0)
      throw IoError("cannot read the image of the footprint");
    H5::H5File file("footprint-image", H5F_ACC_RDONLY, H5::FileCreatPropList::DEFAULT, access);
    StudyRecord record;
    read_footprint(file, record);
    return std::move(record.footprint);
  } catch (const H5::Exception& e) {
    throw IoError("cannot read the image of the footprint (" + e.getDetailMsg() + ")");
  }
}

ResultsFile read_results(const std::string& path, bool with_samples,
                         std::optional<std::uint64_t> sweep_case) {
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  if (!std::filesystem::exists(path)) throw InputFileError(path + ": no such results file");
  if (std::filesystem::is_directory(path))
    throw InputFileError(path + ": is a folder, not a results file");
  if (H5::H5File::isHdf5(path.c_str()) <= 0)
    throw InputFileError(path + ": not an HDF5 file (a strewn results file is HDF5)");
  ResultsFile r;
  StudyRecord& record = r.record;
  try {
    H5::H5File file(path, H5F_ACC_RDONLY);
    if (!file.attrExists("format_version"))
      throw InputFileError(path + ": not a strewn results file (no format_version)");
    r.format_version = read_attribute<int>(file, "format_version");
    if (r.format_version != kResultsFormatVersion)
      throw InputFileError(path + ": results format version " + std::to_string(r.format_version) +
                           ", this strewn reads version " + std::to_string(kResultsFormatVersion) +
                           "; run the study again with this strewn");
    // A study's own file, or one case of a sweep's file: the same layout under /cases/<index>.
    const bool sweep = file.attrExists("kind") && read_string_attribute(file, "kind") == "sweep";
    H5::Group root = file.openGroup("/");
    if (sweep) {
      const auto cases = read_attribute<std::uint64_t>(file, "cases");
      if (!sweep_case)
        throw InputFileError(path + ": is the file of a sweep of " + std::to_string(cases) +
                             " cases; name one with --case (0 to " +
                             std::to_string(cases ? cases - 1 : 0) +
                             "); the summary of all is beside it as CSV");
      if (*sweep_case >= cases)
        throw InputFileError(path + ": the sweep holds cases 0 to " +
                             std::to_string(cases ? cases - 1 : 0) + ", not " +
                             std::to_string(*sweep_case));
      root = file.openGroup("cases/" + std::to_string(*sweep_case));
      // Which case this is, in its axes' values: said wherever the record is shown.
      std::string values;
      for (const auto& key : read_strings_attribute(file, "axes"))
        if (root.attrExists(key))
          values += (values.empty() ? "" : ", ") + key + " = " +
                    printf_text("%g", read_attribute<double>(root, key));
      record.case_label = "case " + std::to_string(*sweep_case) + " of the sweep" +
                          (values.empty() ? "" : ": " + values);
      record.file = path + " (case " + std::to_string(*sweep_case) + ")";
    } else {
      if (sweep_case)
        throw InputFileError(path +
                             ": is the file of one study, not of a sweep; --case is for "
                             "a sweep's file");
      record.file = path;
    }
    read_attributes(root, record, run_identity());
    read_attributes(root, record, run_counters());
    {
      H5::DataSet text = root.openDataSet("scenario");
      text.read(record.scenario_text, text.getStrType());
    }
    H5::Group samples = root.openGroup("samples");
    r.body_names = read_strings_attribute(samples, "body_names");
    record.body_names = r.body_names;
    read_footprint(root, record);
    r.has_samples = samples.nameExists("east");
    if (with_samples && r.has_samples) {
      StudyColumns& c = r.columns;
      std::vector<std::string> names = read_strings_attribute(samples, "input_names");
      const std::vector<std::string> choices = read_strings_attribute(samples, "choice_names");
      names.insert(names.end(), choices.begin(), choices.end());
      c.set_inputs(std::move(names), choices.size());
      c.for_each_column([&](std::string_view name, auto& column) {
        using Value = typename std::decay_t<decltype(column)>::value_type;
        column = read_vector<Value>(samples, std::string(name));
      });
      bool whole = true;
      c.for_each_column([&](std::string_view, const auto& column) {
        whole = whole && column.size() == c.rows();
      });
      if (!whole) throw InputFileError(path + ": the sample columns differ in length");
      for (std::uint16_t b : c.body)
        if (b >= r.body_names.size())
          throw InputFileError(path + ": a sample names a body the file does not list");
    }
  } catch (const H5::Exception& e) {
    std::string message = path;
    message += ": cannot read the results file; it is truncated, damaged or incomplete (";
    message += e.getDetailMsg();
    message += ")";
    throw InputFileError(message);
  }
  return r;
}

}  // namespace strewn
