#include "store/checkpoint.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>
#include <zlib.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <sstream>

#include "core/errors.hpp"

namespace strewn {

namespace {

constexpr std::uint64_t kRecordMagic = 0x73747277636b7074ULL;  // "strwckpt"

std::string header_of(const Checkpoint::Identity& id) {
  std::ostringstream h;
  h << "strewn checkpoint 4\n"
    << id.scenario_sha256 << ' ' << id.seed << ' ' << id.samples << ' ' << id.bodies << ' '
    << id.inputs << '\n';
  return h.str();
}

// The CRC-32 of a record: its four fields, then its payload. The fields are covered too: a
// damaged first row would otherwise file intact rows under other samples (found by flipping
// every byte of a checkpoint, Study.EveryFlippedBitOfACheckpointIsRefusedOrCutOff).
std::uint32_t crc_of(const std::uint64_t (&fields)[4], const std::vector<std::byte>& bytes) {
  uLong crc = crc32(0L, Z_NULL, 0);
  crc = crc32(crc, reinterpret_cast<const Bytef*>(fields), sizeof fields);
  // zlib takes at most 4 GiB at a time.
  for (std::size_t at = 0; at < bytes.size(); at += std::size_t{1} << 30)
    crc = crc32(crc, reinterpret_cast<const Bytef*>(bytes.data()) + at,
                static_cast<uInt>(std::min(bytes.size() - at, std::size_t{1} << 30)));
  return static_cast<std::uint32_t>(crc);
}

// Opens a new, empty checkpoint, never through a link (O_NOFOLLOW): a link planted under its
// name would have the study write elsewhere. 0666 less the umask, as any file a program makes.
// Null with errno set on failure.
std::FILE* open_empty(const std::string& path) {
  const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_NOFOLLOW | O_CLOEXEC, 0666);
  if (fd < 0) return nullptr;
  std::FILE* file = ::fdopen(fd, "wb");
  if (!file) ::close(fd);
  return file;
}

// On --resume, the checkpoint is opened once, never through a link, and read, cut and
// appended to through that one descriptor: a link put in its place meanwhile is not followed.
// Null when there is no checkpoint.
std::FILE* open_for_resume(const std::string& path) {
  const int fd = ::open(path.c_str(), O_RDWR | O_NOFOLLOW | O_CLOEXEC);
  if (fd < 0 && errno != ENOENT)
    throw IoError(path + ": cannot read the checkpoint (" + std::strerror(errno) + ")");
  std::FILE* in = nullptr;
  if (fd >= 0 && !(in = ::fdopen(fd, "r+b"))) {
    ::close(fd);
    throw IoError(path + ": cannot read the checkpoint");
  }
  return in;
}

// What a checkpoint read back holds: its records, by first row, and the bytes up to the end of
// the last complete one (0 without a whole header).
struct ReadBack {
  std::uint64_t good_bytes = 0;
  std::vector<std::pair<std::uint64_t, StudyColumns>> records;
};

// Reads the header and then the complete records of `in`, stopping at the first torn or damaged
// one. Closes `in` and throws when the header is another study's or a record splits a sample.
ReadBack read_records(std::FILE* in, const std::string& path, const std::string& header,
                      std::size_t bodies, const std::vector<std::string>& input_names,
                      std::size_t choices) {
  ReadBack back;
  std::string head(header.size(), '\0');
  const bool whole_header = std::fread(head.data(), 1, head.size(), in) == head.size();
  if (whole_header && head != header) {
    std::fclose(in);
    throw UsageError(path +
                     ": this checkpoint belongs to another study (the scenario, a file it reads, "
                     "the seed or the sample count differ) or another version of strewn; run "
                     "without --resume to start over");
  }
  if (!whole_header) return back;
  back.good_bytes = header.size();
  struct stat status {};
  const bool size_known = ::fstat(::fileno(in), &status) == 0;
  const auto file_bytes = static_cast<std::uint64_t>(status.st_size);
  while (true) {              // complete records only
    std::uint64_t fields[4];  // magic, first row, rows, payload bytes
    if (std::fread(fields, sizeof fields, 1, in) != 1 || fields[0] != kRecordMagic) break;
    // A damaged length is not believed: a whole record lies within the file.
    if (!size_known || fields[3] > file_bytes - back.good_bytes) break;
    std::vector<std::byte> payload(fields[3]);
    std::uint32_t crc = 0;
    if (std::fread(payload.data(), 1, payload.size(), in) != payload.size() ||
        std::fread(&crc, sizeof crc, 1, in) != 1 || crc != crc_of(fields, payload))
      break;
    StudyColumns rows;
    rows.set_inputs(input_names, choices);
    std::size_t at = 0;
    if (!take_row_bytes(payload, at, fields[2], rows) || at != payload.size()) break;
    // Whole samples only (a record always holds whole samples; be safe).
    if (fields[1] % bodies != 0 || fields[2] % bodies != 0) {
      std::fclose(in);
      throw IoError(path + ": the checkpoint holds a part of a sample");
    }
    back.records.emplace_back(fields[1], std::move(rows));
    back.good_bytes += sizeof fields + payload.size() + sizeof crc;
  }
  return back;
}

// Runs of consecutive samples in index order; a record overlapping one already taken (the
// same samples flown again after a torn record) adds only what is new.
std::vector<KeptRows> join_records(std::vector<std::pair<std::uint64_t, StudyColumns>>& records,
                                   std::size_t bodies, const std::vector<std::string>& input_names,
                                   std::size_t choices) {
  std::vector<KeptRows> pieces;
  std::stable_sort(records.begin(), records.end(),
                   [](const auto& a, const auto& b) { return a.first < b.first; });
  for (auto& [first_row, rows] : records) {
    std::uint64_t first = first_row / bodies, count = rows.rows() / bodies, skip = 0;
    if (!pieces.empty()) {
      const KeptRows& last = pieces.back();
      const std::uint64_t end = last.first_sample + last.rows.samples;
      if (first < end) skip = std::min(count, end - first);
    }
    if (skip == count) continue;
    if (!pieces.empty() &&
        pieces.back().first_sample + pieces.back().rows.samples == first + skip) {
      StudyColumns& into = pieces.back().rows.columns;
      into.for_each_column_with(rows, [&](auto& ours, const auto& theirs) {
        ours.insert(ours.end(), theirs.begin() + static_cast<long>(skip * bodies), theirs.end());
      });
      pieces.back().rows.samples += count - skip;
    } else {
      KeptRows piece;
      piece.first_sample = first + skip;
      piece.rows.bodies = bodies;
      piece.rows.samples = count - skip;
      piece.rows.columns.set_inputs(input_names, choices);
      piece.rows.columns.for_each_column_with(rows, [&](auto& ours, const auto& theirs) {
        ours.assign(theirs.begin() + static_cast<long>(skip * bodies), theirs.end());
      });
      pieces.push_back(std::move(piece));
    }
  }
  for (auto& piece : pieces) piece.rows.count_outcomes();
  return pieces;
}

// Cuts off a torn end of the checkpoint read (all of it without a whole header), to go on
// writing after what is kept, through the descriptor read. Closes `in` and throws on failure.
void cut_torn_end(std::FILE* in, const std::string& path, std::uint64_t good_bytes) {
  if (std::fflush(in) != 0 || ::ftruncate(::fileno(in), static_cast<off_t>(good_bytes)) != 0 ||
      std::fseek(in, static_cast<long>(good_bytes), SEEK_SET) != 0) {
    const int saved = errno;
    std::fclose(in);
    throw IoError(path + ": cannot repair the checkpoint (" + std::strerror(saved) + ")");
  }
}

}  // namespace

Checkpoint::Checkpoint(std::string path, Identity id, const std::vector<std::string>& input_names,
                       std::size_t choices, bool resume)
    : path_(std::move(path)), bodies_(std::max<std::size_t>(1, id.bodies)) {
  const std::string header = header_of(id);
  std::FILE* in = resume ? open_for_resume(path_) : nullptr;
  ReadBack back;
  if (in) back = read_records(in, path_, header, bodies_, input_names, choices);
  pieces_ = join_records(back.records, bodies_, input_names, choices);
  if (in) {
    cut_torn_end(in, path_, back.good_bytes);
    file_ = in;
  } else {
    file_ = open_empty(path_);
  }
  if (!file_) throw IoError(path_ + ": cannot write the checkpoint (" + std::strerror(errno) + ")");
  if (back.good_bytes == 0 &&
      (std::fwrite(header.data(), 1, header.size(), file_) != header.size() ||
       std::fflush(file_) != 0)) {
    std::fclose(file_);  // a constructor that throws runs no destructor
    file_ = nullptr;
    throw IoError(path_ + ": cannot write the checkpoint");
  }
}

Checkpoint::~Checkpoint() {
  if (file_) std::fclose(file_);
}

std::vector<KeptRows> Checkpoint::take_pieces() {
  return std::move(pieces_);
}

void Checkpoint::append(const StudyColumns& c, std::size_t first, std::size_t end,
                        std::size_t offset_rows) {
  if (!file_ || end <= first) return;
  std::vector<std::byte> payload;
  append_row_bytes(c, first, end, payload);
  const std::uint64_t fields[4] = {kRecordMagic, first + offset_rows, end - first, payload.size()};
  const std::uint32_t crc = crc_of(fields, payload);
  if (std::fwrite(fields, sizeof fields, 1, file_) != 1 ||
      std::fwrite(payload.data(), 1, payload.size(), file_) != payload.size() ||
      std::fwrite(&crc, sizeof crc, 1, file_) != 1 || std::fflush(file_) != 0 ||
      ::fdatasync(::fileno(file_)) != 0)
    throw IoError(path_ + ": cannot write the checkpoint (" + std::strerror(errno) + ")");
}

void Checkpoint::remove() {
  if (file_) std::fclose(file_);
  file_ = nullptr;
  std::error_code ignored;
  std::filesystem::remove(path_, ignored);
}

}  // namespace strewn
