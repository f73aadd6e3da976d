#pragma once
// Small typed helpers over the HDF5 C++ API for the io module (not part of its public headers):
// scalar and vector attributes, 1-D datasets of numbers and of strings, read back by type.
#include <H5Cpp.h>

#include <algorithm>
#include <cstdint>
#include <mutex>
#include <string>
#include <vector>

namespace strewn::hdf5 {

/// One lock for every HDF5 call of the process: the library and its C++ API are not safe for
/// concurrent calls (a sweep writes several cases' files from several threads).
std::recursive_mutex& hdf5_mutex();

template <class T>
H5::PredType type_of();
template <>
inline H5::PredType type_of<double>() {
  return H5::PredType::NATIVE_DOUBLE;
}
template <>
inline H5::PredType type_of<std::uint8_t>() {
  return H5::PredType::NATIVE_UINT8;
}
template <>
inline H5::PredType type_of<std::uint16_t>() {
  return H5::PredType::NATIVE_UINT16;
}
template <>
inline H5::PredType type_of<std::uint64_t>() {
  return H5::PredType::NATIVE_UINT64;
}
template <>
inline H5::PredType type_of<std::int64_t>() {
  return H5::PredType::NATIVE_INT64;
}
template <>
inline H5::PredType type_of<int>() {
  return H5::PredType::NATIVE_INT;
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

inline void write_strings_attribute(H5::H5Object& object, const std::string& name,
                                    const std::vector<std::string>& values) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  std::vector<const char*> pointers;
  for (const auto& v : values) pointers.push_back(v.c_str());
  H5::Attribute a = object.createAttribute(name, type, space);
  if (count) a.write(type, pointers.data());
}

template <class T>
T read_attribute(const H5::H5Object& object, const std::string& name) {
  T value{};
  object.openAttribute(name).read(type_of<T>(), &value);
  return value;
}

inline std::string read_string_attribute(const H5::H5Object& object, const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  std::string value;
  a.read(a.getStrType(), value);
  return value;
}

inline std::vector<double> read_vector_attribute(const H5::H5Object& object,
                                                 const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  hsize_t count = 0;
  a.getSpace().getSimpleExtentDims(&count);
  std::vector<double> values(count);
  if (count) a.read(type_of<double>(), values.data());
  return values;
}

inline std::vector<std::string> read_strings_attribute(const H5::H5Object& object,
                                                       const std::string& name) {
  H5::Attribute a = object.openAttribute(name);
  hsize_t count = 0;
  a.getSpace().getSimpleExtentDims(&count);
  std::vector<char*> pointers(count);
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  std::vector<std::string> values;
  if (count == 0) return values;
  a.read(type, pointers.data());
  for (char* p : pointers) values.emplace_back(p ? p : "");
  H5::DataSet::vlenReclaim(pointers.data(), type, a.getSpace());
  return values;
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
  std::vector<T> values(rows);
  if (rows > 0) set.read(values.data(), type_of<T>());
  return values;
}

inline void write_strings(H5::Group& group, const std::string& name,
                          const std::vector<std::string>& values) {
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  const hsize_t count = values.size();
  H5::DataSpace space(1, &count);
  std::vector<const char*> pointers;
  for (const auto& v : values) pointers.push_back(v.c_str());
  H5::DataSet set = group.createDataSet(name, type, space);
  if (count) set.write(pointers.data(), type);
}

inline std::vector<std::string> read_strings(const H5::Group& group, const std::string& name) {
  H5::DataSet set = group.openDataSet(name);
  hsize_t count = 0;
  set.getSpace().getSimpleExtentDims(&count);
  std::vector<std::string> values;
  if (count == 0) return values;
  H5::StrType type(H5::PredType::C_S1, H5T_VARIABLE);
  std::vector<char*> pointers(count);
  set.read(pointers.data(), type);
  for (char* p : pointers) values.emplace_back(p ? p : "");
  H5::DataSet::vlenReclaim(pointers.data(), type, set.getSpace());
  return values;
}

}  // namespace strewn::hdf5
