#include "io/results_file.hpp"

#include <H5Cpp.h>
#include <openssl/evp.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <ctime>
#include <filesystem>

#include "core/errors.hpp"
#include "core/version.hpp"

namespace strewn {

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

template <class T>
H5::PredType type_of();
template <>
H5::PredType type_of<double>() {
  return H5::PredType::NATIVE_DOUBLE;
}
template <>
H5::PredType type_of<std::uint8_t>() {
  return H5::PredType::NATIVE_UINT8;
}
template <>
H5::PredType type_of<std::uint16_t>() {
  return H5::PredType::NATIVE_UINT16;
}
template <>
H5::PredType type_of<std::uint64_t>() {
  return H5::PredType::NATIVE_UINT64;
}
template <>
H5::PredType type_of<int>() {
  return H5::PredType::NATIVE_INT;
}

// An extendible column: chunked (at most 64 Ki rows a chunk), byte-shuffled and deflated.
template <class T>
H5::DataSet create_column(H5::Group& group, const std::string& name, std::size_t rows) {
  const hsize_t zero = 0, unlimited = H5S_UNLIMITED;
  H5::DataSpace space(1, &zero, &unlimited);
  H5::DSetCreatPropList properties;
  const hsize_t chunk = std::clamp<hsize_t>(rows, 1, 65536);
  properties.setChunk(1, &chunk);
  properties.setShuffle();
  properties.setDeflate(1);  // level 1: as small as 4 on these columns, for less CPU
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

template <class T>
void write_attribute(H5::H5Object& object, const std::string& name, const T& value) {
  H5::DataSpace scalar;
  H5::Attribute a = object.createAttribute(name, type_of<T>(), scalar);
  a.write(type_of<T>(), &value);
}

void write_attribute(H5::H5Object& object, const std::string& name, const std::string& value) {
  H5::StrType type(H5::PredType::C_S1, std::max<std::size_t>(1, value.size()));
  H5::DataSpace scalar;
  H5::Attribute a = object.createAttribute(name, type, scalar);
  a.write(type, value.c_str());
}

void write_strings(H5::H5Object& object, const std::string& name,
                   const std::vector<std::string>& values) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  std::vector<const char*> pointers;
  for (const auto& v : values) pointers.push_back(v.c_str());
  H5::Attribute a = object.createAttribute(name, type, space);
  a.write(type, pointers.data());
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

struct ResultsWriter::Open {
  H5::H5File file;
  H5::Group samples;
  std::vector<H5::DataSet>
      columns;  // body, east, north, time, speed, energy, status, canopy, inputs...
  bool keep_samples = true;
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
                             const std::vector<std::string>& input_names, std::size_t rows,
                             bool keep_samples)
    : path_(path) {
  namespace fs = std::filesystem;
  const fs::path final_path(path);
  temporary_ = (final_path.parent_path() /
                (final_path.filename().string() + ".partial-" + std::to_string(::getpid())))
                   .string();
  H5::Exception::dontPrint();
  io_guard(path_, [&] {
    auto open = std::make_unique<Open>();
    open->keep_samples = keep_samples;
    open->file = H5::H5File(temporary_, H5F_ACC_TRUNC);
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
    write_strings(open->samples, "body_names", names);
    if (keep_samples) {
      auto& c = open->columns;
      c.push_back(create_column<std::uint16_t>(open->samples, "body", rows));
      for (const char* name : {"east", "north", "time", "speed", "energy"})
        c.push_back(create_column<double>(open->samples, name, rows));
      c.push_back(create_column<std::uint8_t>(open->samples, "status", rows));
      c.push_back(create_column<std::uint8_t>(open->samples, "canopy", rows));
      for (const auto& name : input_names)
        c.push_back(create_column<double>(open->samples, name, rows));
    }
    open_ = std::move(open);
  });
}

ResultsWriter::~ResultsWriter() {
  if (!open_) return;
  open_.reset();  // closes the file
  std::error_code ignored;
  std::filesystem::remove(temporary_, ignored);
}

void ResultsWriter::write(const StudyColumns& c, std::size_t first, std::size_t end) {
  if (!open_ || !open_->keep_samples || end <= first) return;
  io_guard(path_, [&] {
    auto& d = open_->columns;
    append(d[0], c.body, first, end);
    append(d[1], c.east, first, end);
    append(d[2], c.north, first, end);
    append(d[3], c.time, first, end);
    append(d[4], c.speed, first, end);
    append(d[5], c.energy, first, end);
    append(d[6], c.status, first, end);
    append(d[7], c.canopy, first, end);
    for (std::size_t k = 0; k < c.inputs.size(); ++k) append(d[8 + k], c.inputs[k], first, end);
  });
}

void ResultsWriter::finish(const StudyResult& result, const RunProvenance& provenance) {
  io_guard(path_, [&] {
    H5::H5File& file = open_->file;
    write_attribute(file, "seed", provenance.seed);
    write_attribute(file, "samples", result.samples);
    write_attribute(file, "completed", result.completed);
    write_attribute(file, "failed", result.failed);
    write_attribute(file, "threads", provenance.threads);
    file.flush(H5F_SCOPE_GLOBAL);
    open_.reset();  // closed before the rename
    std::filesystem::rename(temporary_, path_);
  });
}

void write_results(const std::string& path, const Scenario& scenario, const StudyResult& result,
                   const RunProvenance& provenance, bool keep_samples) {
  ResultsWriter writer(path, scenario, result.columns.input_names, result.columns.rows(),
                       keep_samples);
  writer.write(result.columns, 0, result.columns.rows());
  writer.finish(result, provenance);
}

StudyResult run_and_write(const SampleModel& model, StudyOptions options, const std::string& path,
                          const RunProvenance& provenance, bool keep_samples) {
  std::vector<std::string> names;
  for (const auto& input : model.sampler().inputs()) names.push_back(input.name);
  ResultsWriter writer(path, model.scenario(), names, options.samples * model.bodies(),
                       keep_samples);
  options.sink = &writer;
  const StudyResult result = run_study(model, options);
  writer.finish(result, provenance);
  return result;
}

namespace {
template <class T>
T read_attribute(const H5::H5Object& object, const std::string& name) {
  T value{};
  object.openAttribute(name).read(type_of<T>(), &value);
  return value;
}
std::string read_string_attribute(const H5::H5Object& object, const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  std::string value;
  a.read(a.getStrType(), value);
  return value;
}
template <class T>
std::vector<T> read_column(const H5::Group& group, const std::string& name) {
  H5::DataSet set = group.openDataSet(name);
  hsize_t rows = 0;
  set.getSpace().getSimpleExtentDims(&rows);
  std::vector<T> values(rows);
  if (rows > 0) set.read(values.data(), type_of<T>());
  return values;
}
}  // namespace

ResultsFile read_results(const std::string& path) {
  H5::Exception::dontPrint();
  if (!std::filesystem::exists(path)) throw IoError(path + ": no such results file");
  if (H5::H5File::isHdf5(path.c_str()) <= 0) throw IoError(path + ": not an HDF5 results file");
  ResultsFile r;
  try {
    H5::H5File file(path, H5F_ACC_RDONLY);
    if (!file.attrExists("format_version"))
      throw IoError(path + ": not a strewn results file (no format_version)");
    r.format_version = read_attribute<int>(file, "format_version");
    if (r.format_version != kResultsFormatVersion)
      throw IoError(path + ": results format version " + std::to_string(r.format_version) +
                    ", this strewn reads version " + std::to_string(kResultsFormatVersion));
    r.engine_version = read_string_attribute(file, "engine_version");
    r.created = read_string_attribute(file, "created");
    r.scenario_sha256 = read_string_attribute(file, "scenario_sha256");
    r.seed = read_attribute<std::uint64_t>(file, "seed");
    r.samples = read_attribute<std::uint64_t>(file, "samples");
    r.completed = read_attribute<std::uint64_t>(file, "completed");
    r.failed = read_attribute<std::uint64_t>(file, "failed");
    {
      H5::DataSet text = file.openDataSet("scenario");
      text.read(r.scenario_text, text.getStrType());
    }
    H5::Group samples = file.openGroup("samples");
    {
      H5::Attribute names = samples.openAttribute("body_names");
      hsize_t count = 0;
      names.getSpace().getSimpleExtentDims(&count);
      std::vector<char*> pointers(count);
      H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
      names.read(type, pointers.data());
      for (char* p : pointers) r.body_names.emplace_back(p);
      H5::DataSet::vlenReclaim(pointers.data(), type, names.getSpace());
    }
    if (samples.nameExists("east")) {
      StudyColumns& c = r.columns;
      c.body = read_column<std::uint16_t>(samples, "body");
      c.east = read_column<double>(samples, "east");
      c.north = read_column<double>(samples, "north");
      c.time = read_column<double>(samples, "time");
      c.speed = read_column<double>(samples, "speed");
      c.energy = read_column<double>(samples, "energy");
      c.status = read_column<std::uint8_t>(samples, "status");
      c.canopy = read_column<std::uint8_t>(samples, "canopy");
      const std::vector<std::string> fixed{"body",  "east",   "north",  "time",
                                           "speed", "energy", "status", "canopy"};
      for (hsize_t i = 0; i < samples.getNumObjs(); ++i) {
        const std::string name = samples.getObjnameByIdx(i);
        if (std::find(fixed.begin(), fixed.end(), name) != fixed.end()) continue;
        c.input_names.push_back(name);
        c.inputs.push_back(read_column<double>(samples, name));
      }
    }
  } catch (const H5::Exception& e) {
    throw IoError(path + ": cannot read the results file (" + e.getDetailMsg() + ")");
  }
  return r;
}

}  // namespace strewn
