#include "store/results_file.hpp"

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
#include <fstream>
#include <optional>
#include <sstream>

#include "core/errors.hpp"
#include "core/text.hpp"
#include "core/version.hpp"
#include "footprint/footprint.hpp"
#include "store/file_seal.hpp"
#include "store/footprint_file.hpp"
#include "store/hdf5_support.hpp"
#include "store/output_file.hpp"

namespace strewn {

std::recursive_mutex& hdf5::hdf5_mutex() {
  static std::recursive_mutex lock;
  return lock;
}

std::string sha256_hex(const std::string& text) {
  unsigned char digest[EVP_MAX_MD_SIZE];
  unsigned int length = 0;
  EVP_Digest(text.data(), text.size(), digest, &length, EVP_sha256(), nullptr);
  return hex_text(digest, length);
}

std::string inputs_sha256(const Scenario& s) {
  return inputs_sha256(s.text, s.files_read);
}

std::string inputs_sha256(const std::string& text, const std::vector<std::string>& files_read) {
  // The text, then each file read by its content (a file that cannot be read now counts as
  // different from any that could).
  std::string all = text;
  for (std::size_t k = 1; k < files_read.size(); ++k) {
    std::ifstream in(files_read[k], std::ios::binary);
    std::ostringstream content;
    content << in.rdbuf();
    all += "\n--- " + std::to_string(k) + (in ? " read\n" : " unreadable\n") + content.str();
  }
  return sha256_hex(all);
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

ResultsWriter::ResultsWriter(const std::string& path, const Scenario& scenario,
                             const std::vector<std::string>& input_names, std::size_t choices,
                             std::size_t rows, bool keep_samples)
    : path_(path) {
  temporary_ = temporary_path_of(path);
  removed_on_signal_ = std::make_unique<RemovedOnSignal>(temporary_);
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  io_guard(path_, [&] {
    auto open = std::make_unique<Open>();
    open->keep_samples = keep_samples;
    // Made new, never through a link planted under the temporary name.
    std::error_code ignored;
    std::filesystem::remove(temporary_, ignored);
    open->file = H5::H5File(temporary_, H5F_ACC_EXCL, sealed_file_properties());
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
    open_.reset();  // closed before the seal and the rename
    try {
      seal_file(temporary_);
    } catch (...) {
      std::error_code ignored;
      std::filesystem::remove(temporary_, ignored);  // never left half sealed
      throw;
    }
    durable_rename(temporary_, path_);  // on disk before the checkpoint is removed
    removed_on_signal_->release();      // the name is the results file's now
  });
}

void write_results(const std::string& path, const Scenario& scenario, const StudyResult& result,
                   const StudyRecord& record, bool keep_samples) {
  ResultsWriter writer(path, scenario, result.columns.input_names, result.columns.choices,
                       result.columns.rows(), keep_samples);
  writer.write(result.columns, 0, result.columns.rows());
  writer.finish(record);
}

ResultsStore::ResultsStore(const std::string& path, const SampleModel& model, std::uint64_t samples,
                           bool keep_samples, const RunControl& control)
    : writer_(path, model.scenario(), model.column_names(), model.choice_names().size(),
              samples * model.bodies(), keep_samples) {
  if (control.checkpoint || control.resume) {
    const Scenario& s = model.scenario();
    const std::vector<std::string> names = model.column_names();
    checkpoint_.emplace(
        path + ".checkpoint",
        Checkpoint::Identity{inputs_sha256(s), s.study.seed, samples, model.bodies(), names.size()},
        names, model.choice_names().size(), control.resume);
  }
}

void ResultsStore::write(const StudyColumns& columns, std::size_t first, std::size_t end) {
  writer_.write(columns, first, end);
}

void ResultsStore::keep(const StudyColumns& columns, std::size_t first, std::size_t end,
                        std::size_t study_row) {
  if (checkpoint_) checkpoint_->append(columns, first, end, study_row - first);
}

std::vector<KeptRows> ResultsStore::take_kept() {
  return checkpoint_ ? checkpoint_->take_pieces() : std::vector<KeptRows>{};
}

void ResultsStore::finish(const StudyRecord& record) {
  writer_.finish(record);
  if (checkpoint_) checkpoint_->remove();
}

StudyRun run_and_write(const SampleModel& model, const World& world, StudyOptions options,
                       const std::string& path, int threads, bool keep_samples,
                       const RunControl& control) {
  ResultsStore store(path, model, options.samples, keep_samples, control);
  LocalFlights flights;
  return run_pipeline(model, world, std::move(options), &store, flights, threads, control);
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

namespace {

// Refuses, before HDF5 opens it, a path that is missing, a folder or not an HDF5 file.
void check_results_path(const std::string& path) {
  if (!std::filesystem::exists(path)) throw InputFileError(path + ": no such results file");
  if (std::filesystem::is_directory(path))
    throw InputFileError(path + ": is a folder, not a results file");
  // A pipe, a device or a file of /proc is not a results file, and HDF5 cannot seek in it.
  if (!std::filesystem::is_regular_file(path))
    throw InputFileError(path +
                         ": is not a regular file (a pipe, a device or a special file); a "
                         "results file is read from disk");
  // Nothing in a damaged file is believed, and the HDF5 library never parses one: the seal is
  // checked with plain reads first. A file that is not HDF5 at all is named so (HDF5's check of
  // the signature alone, which throws on files it cannot seek in).
  auto hdf5 = [&] {
    try {
      return H5::H5File::isHdf5(path.c_str()) > 0;
    } catch (const H5::Exception&) {
      return false;
    }
  };
  const InputFileError not_hdf5(path + ": not an HDF5 file (a strewn results file is HDF5)");
  try {
    check_seal(path);
  } catch (const InputFileError&) {
    if (!hdf5()) throw not_hdf5;
    throw;
  }
  if (!hdf5()) throw not_hdf5;
}

// The file's format version; refuses a file without one or of another version.
int read_format_version(const H5::H5File& file, const std::string& path) {
  if (!file.attrExists("format_version"))
    throw InputFileError(path + ": not a strewn results file (no format_version)");
  const int version = read_attribute<int>(file, "format_version");
  if (version != kResultsFormatVersion)
    throw InputFileError(path + ": results format version " + std::to_string(version) +
                         ", this strewn reads version " + std::to_string(kResultsFormatVersion) +
                         "; run the study again with this strewn");
  return version;
}

// The group holding case `sweep_case` of a sweep's file; names the case (by its axes' values)
// and the file in the record. Refuses a missing or out-of-range case.
H5::Group open_sweep_case(const H5::H5File& file, const std::string& path,
                          std::optional<std::uint64_t> sweep_case, StudyRecord& record) {
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
  H5::Group root = file.openGroup("cases/" + std::to_string(*sweep_case));
  // Which case this is, in its axes' values: said wherever the record is shown.
  std::string values;
  for (const auto& key : read_strings_attribute(file, "axes"))
    if (root.attrExists(key))
      values += (values.empty() ? "" : ", ") + key + " = " +
                printf_text("%g", read_attribute<double>(root, key));
  record.case_label = "case " + std::to_string(*sweep_case) + " of the sweep" +
                      (values.empty() ? "" : ": " + values);
  record.file = path + " (case " + std::to_string(*sweep_case) + ")";
  return root;
}

// Reads every sample column, and checks that they have one length and name listed bodies only.
void read_sample_columns(const H5::Group& samples, const std::string& path, ResultsFile& r) {
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
  c.for_each_column(
      [&](std::string_view, const auto& column) { whole = whole && column.size() == c.rows(); });
  if (!whole) throw InputFileError(path + ": the sample columns differ in length");
  for (std::uint16_t b : c.body)
    if (b >= r.body_names.size())
      throw InputFileError(path + ": a sample names a body the file does not list");
}

}  // namespace

ResultsFile read_results(const std::string& path, bool with_samples,
                         std::optional<std::uint64_t> sweep_case) {
  const std::lock_guard<std::recursive_mutex> lock(hdf5_mutex());
  H5::Exception::dontPrint();
  check_results_path(path);
  ResultsFile r;
  StudyRecord& record = r.record;
  try {
    H5::H5File file(path, H5F_ACC_RDONLY);
    r.format_version = read_format_version(file, path);
    // A study's own file, or one case of a sweep's file: the same layout under /cases/<index>.
    const bool sweep = file.attrExists("kind") && read_string_attribute(file, "kind") == "sweep";
    H5::Group root = file.openGroup("/");
    if (sweep) {
      root = open_sweep_case(file, path, sweep_case, record);
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
      const H5::StrType type = text.getStrType();
      check_declared_size(root, 1, type.getSize(), "scenario");
      text.read(record.scenario_text, type);
    }
    H5::Group samples = root.openGroup("samples");
    r.body_names = read_strings_attribute(samples, "body_names");
    record.body_names = r.body_names;
    read_footprint(root, record);
    r.has_samples = samples.nameExists("east");
    if (with_samples && r.has_samples) read_sample_columns(samples, path, r);
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
