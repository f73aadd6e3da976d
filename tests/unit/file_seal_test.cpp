// The seal of a results file (store/file_seal.hpp): the SHA-256 of its bytes after the HDF5 user
// block. Checked against the published SHA-256 example, and attacked by flipping every bit of a
// sealed HDF5 file, truncating it and lengthening it: every change is refused.
#include <gtest/gtest.h>

#include <H5Cpp.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "core/errors.hpp"
#include "store/file_seal.hpp"
#include "support.hpp"

namespace strewn {
namespace {

std::string read_bytes(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}
void write_bytes(const std::filesystem::path& path, const std::string& bytes) {
  std::ofstream(path, std::ios::binary | std::ios::trunc) << bytes;
}
// The message of check_seal's refusal, or "" when the file is accepted.
std::string refusal(const std::filesystem::path& path) {
  try {
    check_seal(path.string());
    return "";
  } catch (const InputFileError& e) {
    return e.what();
  }
}

TEST(FileSeal, DigestIsTheSha256OfTheBytesAfterTheUserBlock) {
  const test::ScratchFolder dir("seal-test");
  const auto path = dir / "abc.bin";
  write_bytes(path, std::string(kSealBytes, '\0') + "abc");
  seal_file(path.string());
  const std::string block = read_bytes(path).substr(0, kSealBytes);
  // FIPS 180-2, appendix B.1: SHA-256("abc").
  EXPECT_NE(block.find("sha256 ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad\n"),
            std::string::npos)
      << block;
  EXPECT_NE(block.find("bytes 3\n"), std::string::npos) << block;
  EXPECT_EQ(refusal(path), "");
}

TEST(FileSeal, EveryFlippedBitOfASealedHdf5FileIsRefused) {
  const test::ScratchFolder dir("seal-test");
  const auto path = dir / "small.h5";
  {
    H5::H5File file(path.string(), H5F_ACC_TRUNC, sealed_file_properties());
    const double value = 42.0;
    file.createAttribute("value", H5::PredType::NATIVE_DOUBLE, H5::DataSpace())
        .write(H5::PredType::NATIVE_DOUBLE, &value);
  }
  seal_file(path.string());
  ASSERT_EQ(refusal(path), "");
  ASSERT_GT(H5::H5File::isHdf5(path.string().c_str()), 0);  // HDF5 skips the user block
  const std::string intact = read_bytes(path);
  const auto damaged = dir / "damaged.h5";
  std::size_t accepted = 0;
  // One bit of every byte (the bit moving along), so that every byte of the seal, of HDF5's
  // structures and of the data is changed once.
  for (std::size_t byte = 0; byte < intact.size(); ++byte) {
    std::string bytes = intact;
    bytes[byte] = static_cast<char>(bytes[byte] ^ (1 << (byte % 8)));
    write_bytes(damaged, bytes);
    if (refusal(damaged).empty()) ++accepted;
  }
  EXPECT_EQ(accepted, 0u) << "of " << intact.size() << " single-bit flips";
  // Truncated, lengthened, and with the seal's padding changed.
  write_bytes(damaged, intact.substr(0, intact.size() - 1));
  EXPECT_NE(refusal(damaged).find("truncated or lengthened"), std::string::npos);
  write_bytes(damaged, intact + '\0');
  EXPECT_NE(refusal(damaged).find("truncated or lengthened"), std::string::npos);
  std::string padded = intact;
  padded[kSealBytes - 1] = ' ';
  write_bytes(damaged, padded);
  EXPECT_NE(refusal(damaged).find("seal (the digest of its bytes) is damaged"), std::string::npos);
  std::string changed = intact;
  changed[intact.size() - 1] = static_cast<char>(changed[intact.size() - 1] ^ 1);
  write_bytes(damaged, changed);
  EXPECT_NE(refusal(damaged).find("do not match the digest"), std::string::npos);
  write_bytes(damaged, intact.substr(0, 100));
  EXPECT_NE(refusal(damaged).find("has no strewn seal"), std::string::npos);
}

}  // namespace
}  // namespace strewn
