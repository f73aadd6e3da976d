#pragma once
// A results file carries the SHA-256 digest of its own bytes, so that a damaged or altered file is
// refused before anything in it is believed (and before the HDF5 library parses it). The digest
// sits in the file's user block: the first kSealBytes bytes, which HDF5 reserves for the
// application and skips (HDF5 User's Guide, "File Creation Properties": H5Pset_userblock), so
// every HDF5 tool still reads the file.
#include <H5Cpp.h>

#include <cstddef>
#include <string>

namespace strewn {

/// `length` bytes as lower-case hexadecimal, two digits a byte (how digests are written).
std::string hex_text(const unsigned char* bytes, std::size_t length);

/// The size of the user block that holds the seal (HDF5 requires a power of two, at least 512).
inline constexpr std::size_t kSealBytes = 512;

/// The creation properties of a file to be sealed: a user block of kSealBytes.
H5::FileCreatPropList sealed_file_properties();

/// Writes the seal of a closed HDF5 file made with sealed_file_properties(): the SHA-256 of every
/// byte after the user block, and their count, in its user block. Throws IoError when the file
/// cannot be read or written.
void seal_file(const std::string& path);

/// Checks the seal of `path`: the user block must hold a seal in strewn's words, the file the
/// number of bytes it names, and their SHA-256 the digest it names. Throws InputFileError (status
/// 2) naming what is wrong: no seal (not written by this strewn), a damaged seal, a truncated or
/// lengthened file, or a digest that differs (the file was damaged or changed after strewn
/// wrote it).
void check_seal(const std::string& path);

}  // namespace strewn
