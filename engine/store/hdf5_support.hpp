#pragma once
// Small typed helpers over the HDF5 C++ API for the store module (not part of its public headers):
// scalar and vector attributes, 1-D datasets of numbers and of strings, read back by type.
#include <H5Cpp.h>

#include <algorithm>
#include <cstdint>
#include <mutex>
#include <string>
#include <tuple>
#include <type_traits>
#include <vector>

namespace strewn::hdf5 {

/// One lock for every HDF5 call of the process: the library and its C++ API are not safe for
/// concurrent calls (a sweep writes several cases' files from several threads).
std::recursive_mutex& hdf5_mutex();

/// Refuses (an HDF5 exception, which the readers report as a damaged file) a dataset or attribute
/// of `object` that declares more values than its file could hold, before anything is allocated
/// for them: deflate expands at most 1032 times (zlib technical details, "maximum compression
/// factor"), and strewn writes every value it declares, so `count` values of `size` bytes need
/// at least count * size / 1032 bytes of file.
inline void check_declared_size(const H5::H5Object& object, hsize_t count, std::size_t size,
                                const std::string& name) {
  hsize_t file_bytes = 0;
  const hid_t file = H5Iget_file_id(object.getId());
  if (file >= 0) {
    H5Fget_filesize(file, &file_bytes);
    H5Fclose(file);
  }
  const long double declared = static_cast<long double>(count) * static_cast<long double>(size);
  if (declared > 1032.0L * static_cast<long double>(file_bytes) + 65536.0L)
    throw H5::DataSetIException(
        "read", name + " declares " + std::to_string(count) + " values, more than the file holds");
}

template <class T>
H5::PredType type_of() {
  if constexpr (std::is_same_v<T, double>)
    return H5::PredType::NATIVE_DOUBLE;
  else if constexpr (std::is_same_v<T, float>)
    return H5::PredType::NATIVE_FLOAT;
  else if constexpr (std::is_same_v<T, std::uint8_t>)
    return H5::PredType::NATIVE_UINT8;
  else if constexpr (std::is_same_v<T, std::uint16_t>)
    return H5::PredType::NATIVE_UINT16;
  else if constexpr (std::is_same_v<T, std::uint64_t>)
    return H5::PredType::NATIVE_UINT64;
  else if constexpr (std::is_same_v<T, std::int64_t>)
    return H5::PredType::NATIVE_INT64;
  else {
    static_assert(std::is_same_v<T, int>, "no HDF5 type for this number type");
    return H5::PredType::NATIVE_INT;
  }
}

template <class T>
void write_attribute(H5::H5Object& object, const std::string& name, const T& value) {
  H5::DataSpace scalar;
  H5::Attribute a = object.createAttribute(name, type_of<T>(), scalar);
  a.write(type_of<T>(), &value);
}

inline void write_attribute(H5::H5Object& object, const std::string& name,
                            const std::string& value) {
  H5::StrType type(H5::PredType::C_S1, std::max<std::size_t>(1, value.size()));
  H5::DataSpace scalar;
  H5::Attribute a = object.createAttribute(name, type, scalar);
  a.write(type, value.c_str());
}

inline void write_attribute(H5::H5Object& object, const std::string& name,
                            const std::vector<double>& values) {
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  H5::Attribute a = object.createAttribute(name, type_of<double>(), space);
  if (count) a.write(type_of<double>(), values.data());
}

// Strings of variable length, as HDF5 writes them: the pointers to their characters.
inline std::vector<const char*> pointers_to(const std::vector<std::string>& values) {
  std::vector<const char*> pointers;
  for (const auto& v : values) pointers.push_back(v.c_str());
  return pointers;
}

// Strings of variable length read by `read(pointers, type)` from an attribute or dataset of
// `space`, copied out and their memory given back to HDF5.
template <class Read>
std::vector<std::string> read_variable_strings(const H5::H5Object& object, const std::string& name,
                                               const H5::DataSpace& space, Read read) {
  if (space.getSimpleExtentNdims() != 1)
    throw H5::DataSetIException("read_variable_strings", name + " is not 1-D");
  hsize_t count = 0;
  space.getSimpleExtentDims(&count);
  check_declared_size(object, count, sizeof(char*), name);
  std::vector<std::string> values;
  if (count == 0) return values;
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  std::vector<char*> pointers(count);
  read(pointers.data(), type);
  for (char* p : pointers) values.emplace_back(p ? p : "");
  H5::DataSet::vlenReclaim(pointers.data(), type, space);
  return values;
}

inline void write_strings_attribute(H5::H5Object& object, const std::string& name,
                                    const std::vector<std::string>& values) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  H5::Attribute a = object.createAttribute(name, type, space);
  if (count) a.write(type, pointers_to(values).data());
}

inline std::string read_string_attribute(const H5::H5Object& object, const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  std::string value;
  a.read(a.getStrType(), value);
  return value;
}

inline std::vector<double> read_vector_attribute(const H5::H5Object& object,
                                                 const std::string& name);

template <class T>
T read_attribute(const H5::H5Object& object, const std::string& name) {
  if constexpr (std::is_same_v<T, std::string>) {
    return read_string_attribute(object, name);
  } else if constexpr (std::is_same_v<T, std::vector<double>>) {
    return read_vector_attribute(object, name);
  } else {
    T value{};
    object.openAttribute(name).read(type_of<T>(), &value);
    return value;
  }
}

/// Fields of a record stored as attributes of one object, from a single list of
/// (attribute name, member pointer) pairs that serves both writing and reading.
template <class Record, class... Field>
void write_attributes(H5::H5Object& object, const Record& record,
                      const std::tuple<Field...>& fields) {
  std::apply([&](const auto&... f) { (write_attribute(object, f.first, record.*f.second), ...); },
             fields);
}
template <class Record, class... Field>
void read_attributes(const H5::H5Object& object, Record& record,
                     const std::tuple<Field...>& fields) {
  std::apply(
      [&](const auto&... f) {
        ((record.*f.second =
              read_attribute<std::remove_cvref_t<decltype(record.*f.second)>>(object, f.first)),
         ...);
      },
      fields);
}

inline std::vector<double> read_vector_attribute(const H5::H5Object& object,
                                                 const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  const H5::DataSpace space = a.getSpace();
  if (space.getSimpleExtentNdims() != 1)
    throw H5::AttributeIException("read_vector_attribute", name + " is not 1-D");
  hsize_t count = 0;
  space.getSimpleExtentDims(&count);
  check_declared_size(object, count, sizeof(double), name);
  std::vector<double> values(count);
  if (count) a.read(type_of<double>(), values.data());
  return values;
}

inline std::vector<std::string> read_strings_attribute(const H5::H5Object& object,
                                                       const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  return read_variable_strings(object, name, a.getSpace(),
                               [&](char** to, const H5::StrType& type) { a.read(type, to); });
}

/// A 1-D dataset written whole (compressed when large).
template <class T>
void write_vector(H5::Group& group, const std::string& name, const std::vector<T>& values) {
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  H5::DSetCreatPropList properties;
  if (count >= 4096) {
    const hsize_t chunk = std::min<hsize_t>(count, 65536);
    properties.setChunk(1, &chunk);
    properties.setShuffle();
    properties.setDeflate(1);
  } else if (count * sizeof(T) <= 16384) {
    properties.setLayout(H5D_COMPACT);  // small: the data lives in the object header
  }
  H5::DataSet set = group.createDataSet(name, type_of<T>(), space, properties);
  if (count) set.write(values.data(), type_of<T>());
}

template <class T>
std::vector<T> read_vector(const H5::Group& group, const std::string& name) {
  H5::DataSet set = group.openDataSet(name);
  const H5::DataSpace space = set.getSpace();
  if (space.getSimpleExtentNdims() != 1)
    throw H5::DataSetIException("read_vector", name + " is not 1-D");
  hsize_t rows = 0;
  space.getSimpleExtentDims(&rows);
  check_declared_size(group, rows, sizeof(T), name);
  std::vector<T> values(rows);
  if (rows > 0) set.read(values.data(), type_of<T>());
  return values;
}

inline void write_strings(H5::Group& group, const std::string& name,
                          const std::vector<std::string>& values) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  H5::DataSet set = group.createDataSet(name, type, space);
  if (count) set.write(pointers_to(values).data(), type);
}

inline std::vector<std::string> read_strings(const H5::Group& group, const std::string& name) {
  H5::DataSet set = group.openDataSet(name);
  return read_variable_strings(group, name, set.getSpace(),
                               [&](char** to, const H5::StrType& type) { set.read(to, type); });
}

}  // namespace strewn::hdf5
