#include "store/file_seal.hpp"

#include <fcntl.h>
#include <openssl/evp.h>
#include <sys/stat.h>
#include <unistd.h>

#include <array>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>
#include <string_view>

#include "core/errors.hpp"

namespace strewn {

namespace {

// The seal's words: a first line naming it, the digest, the byte count; zero bytes after them to
// the end of the user block (any other byte there is damage).
constexpr std::string_view kSealTitle = "strewn sealed results\n";

// A file descriptor closed on every path out.
struct Descriptor {
  int fd = -1;
  explicit Descriptor(int f) : fd(f) {}
  ~Descriptor() {
    if (fd >= 0) ::close(fd);
  }
  Descriptor(const Descriptor&) = delete;
  Descriptor& operator=(const Descriptor&) = delete;
};

using DigestContext = std::unique_ptr<EVP_MD_CTX, decltype(&EVP_MD_CTX_free)>;

// The SHA-256 (hex) of the bytes of `fd` from kSealBytes to the end, and their count; an empty
// text when the file cannot be read.
std::string digest_after_seal(int fd, unsigned long long& bytes) {
  DigestContext context(EVP_MD_CTX_new(), &EVP_MD_CTX_free);
  if (!context || EVP_DigestInit_ex(context.get(), EVP_sha256(), nullptr) != 1) return {};
  std::array<unsigned char, 1 << 16> buffer;
  bytes = 0;
  off_t at = static_cast<off_t>(kSealBytes);
  for (;;) {
    const ssize_t got = ::pread(fd, buffer.data(), buffer.size(), at);
    if (got < 0 && errno == EINTR) continue;
    if (got < 0) return {};
    if (got == 0) break;
    EVP_DigestUpdate(context.get(), buffer.data(), static_cast<std::size_t>(got));
    at += got;
    bytes += static_cast<unsigned long long>(got);
  }
  unsigned char digest[EVP_MAX_MD_SIZE];
  unsigned int length = 0;
  if (EVP_DigestFinal_ex(context.get(), digest, &length) != 1) return {};
  return hex_text(digest, length);
}

std::string seal_text(const std::string& digest, unsigned long long bytes) {
  return std::string(kSealTitle) + "sha256 " + digest + "\nbytes " + std::to_string(bytes) + "\n";
}

}  // namespace

std::string hex_text(const unsigned char* bytes, std::size_t length) {
  static constexpr char kDigits[] = "0123456789abcdef";
  std::string hex;
  for (std::size_t i = 0; i < length; ++i) {
    hex += kDigits[bytes[i] >> 4];
    hex += kDigits[bytes[i] & 0xF];
  }
  return hex;
}

H5::FileCreatPropList sealed_file_properties() {
  H5::FileCreatPropList properties;
  properties.setUserblock(kSealBytes);
  return properties;
}

void seal_file(const std::string& path) {
  const Descriptor file(::open(path.c_str(), O_RDWR | O_CLOEXEC | O_NOFOLLOW));
  if (file.fd < 0)
    throw IoError(path + ": cannot open the results file to seal it (" + std::strerror(errno) +
                  ")");
  unsigned long long bytes = 0;
  const std::string digest = digest_after_seal(file.fd, bytes);
  if (digest.empty()) throw IoError(path + ": cannot read the results file back to seal it");
  std::string block = seal_text(digest, bytes);
  block.resize(kSealBytes, '\0');
  if (::pwrite(file.fd, block.data(), block.size(), 0) != static_cast<ssize_t>(block.size()))
    throw IoError(path + ": cannot write the seal of the results file (" + std::strerror(errno) +
                  ")");
}

void check_seal(const std::string& path) {
  const Descriptor file(::open(path.c_str(), O_RDONLY | O_CLOEXEC));
  if (file.fd < 0)
    throw InputFileError(path + ": cannot open the results file (" + std::strerror(errno) + ")");
  std::string block(kSealBytes, '\0');
  const ssize_t got = ::pread(file.fd, block.data(), block.size(), 0);
  if (got != static_cast<ssize_t>(kSealBytes) || !block.starts_with(kSealTitle))
    throw InputFileError(path +
                         ": has no strewn seal (the digest of its bytes): it was not written by "
                         "this version of strewn, or its first bytes are damaged; run the study "
                         "again");
  unsigned long long bytes = 0;
  const std::string digest = digest_after_seal(file.fd, bytes);
  if (digest.empty()) throw InputFileError(path + ": cannot read the results file");
  // The whole block compared, its zero padding too: a changed byte anywhere in it is damage.
  std::string sealed = seal_text(digest, bytes);
  sealed.resize(kSealBytes, '\0');
  if (block == sealed) return;
  const std::string refused = "; refused: run the study again, or use an intact copy";
  unsigned long long sealed_bytes = 0;
  char sealed_digest[65] = {};
  const bool readable =
      std::sscanf(block.c_str() + kSealTitle.size(), "sha256 %64[0-9a-f]\nbytes %llu",
                  sealed_digest, &sealed_bytes) == 2;
  if (!readable || (digest == sealed_digest && sealed_bytes == bytes))
    throw InputFileError(path + ": its seal (the digest of its bytes) is damaged" + refused);
  if (sealed_bytes != bytes)
    throw InputFileError(path + ": holds " + std::to_string(bytes) + " bytes, not the " +
                         std::to_string(sealed_bytes) +
                         " strewn sealed it with (truncated or lengthened)" + refused);
  throw InputFileError(path +
                       ": its bytes do not match the digest strewn sealed it with (damaged or "
                       "changed after it was written)" +
                       refused);
}

}  // namespace strewn
