#include "cluster/job.hpp"

#include <algorithm>
#include <cstdlib>
#include <stdexcept>

#ifdef STREWN_WITH_MPI
#include <mpi.h>
#endif

namespace strewn {

SampleRange rank_share(std::uint64_t samples, int ranks, int rank) {
  const auto n = static_cast<std::uint64_t>(ranks), r = static_cast<std::uint64_t>(rank);
  const std::uint64_t base = samples / n, extra = samples % n;
  return {r * base + std::min(r, extra), base + (r < extra ? 1 : 0)};
}

#ifdef STREWN_WITH_MPI

bool Job::built_with_mpi() {
  return true;
}

namespace {
// Launched by an MPI launcher or a scheduler's process manager? (Open MPI's mpirun, PMI and PMIx
// as Slurm and MPICH set them.) Without one, strewn is a single process: initialising MPI as a
// singleton would cost a third of a second on every command.
bool under_launcher() {
  for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_RANK", "PMI_SIZE"})
    if (std::getenv(name)) return true;
  return false;
}
}  // namespace

Job::Job(int& argc, char**& argv) {
  if (!under_launcher()) return;
  int provided = 0;
  MPI_Init_thread(&argc, &argv, MPI_THREAD_SERIALIZED, &provided);
  initialised_ = true;
  if (provided < MPI_THREAD_SERIALIZED) {
    MPI_Finalize();
    throw std::runtime_error(
        "this MPI library cannot serve a second thread (MPI_THREAD_SERIALIZED)");
  }
  MPI_Comm_rank(MPI_COMM_WORLD, &rank_);
  MPI_Comm_size(MPI_COMM_WORLD, &size_);
}

Job::~Job() {
  if (initialised_) MPI_Finalize();
}

void Job::send(int to, std::span<const std::byte> bytes, int tag) const {
  const auto size = static_cast<std::uint64_t>(bytes.size());
  MPI_Send(&size, 1, MPI_UINT64_T, to, tag, MPI_COMM_WORLD);
  // In pieces of at most 1 GiB: MPI counts are int.
  constexpr std::uint64_t kPiece = std::uint64_t{1} << 30;
  for (std::uint64_t at = 0; at < size; at += kPiece)
    MPI_Send(bytes.data() + at, static_cast<int>(std::min(kPiece, size - at)), MPI_BYTE, to, tag,
             MPI_COMM_WORLD);
}

struct Job::Sends::State {
  std::vector<std::unique_ptr<std::uint64_t>> sizes;
  std::vector<std::vector<std::byte>> buffers;
  std::vector<MPI_Request> requests;
};
Job::Sends::Sends() : state_(std::make_unique<State>()) {}
Job::Sends::~Sends() {
  finish();
}
void Job::Sends::add(const Job&, int to, std::vector<std::byte> bytes, int tag) {
  constexpr std::uint64_t kPiece = std::uint64_t{1} << 30;
  auto& st = *state_;
  st.sizes.push_back(std::make_unique<std::uint64_t>(bytes.size()));
  st.buffers.push_back(std::move(bytes));
  const auto& data = st.buffers.back();
  st.requests.emplace_back();
  MPI_Isend(st.sizes.back().get(), 1, MPI_UINT64_T, to, tag, MPI_COMM_WORLD, &st.requests.back());
  for (std::uint64_t at = 0; at < data.size(); at += kPiece) {
    st.requests.emplace_back();
    MPI_Isend(data.data() + at, static_cast<int>(std::min<std::uint64_t>(kPiece, data.size() - at)),
              MPI_BYTE, to, tag, MPI_COMM_WORLD, &st.requests.back());
  }
}
void Job::Sends::finish() {
  if (!state_ || state_->requests.empty()) return;
  MPI_Waitall(static_cast<int>(state_->requests.size()), state_->requests.data(),
              MPI_STATUSES_IGNORE);
  state_->requests.clear();
  state_->buffers.clear();
  state_->sizes.clear();
}

std::vector<std::byte> Job::receive(int from, int tag) const {
  int sender = from;
  return receive_from(from, tag, sender);
}

std::vector<std::byte> Job::receive_any(int tag, int& from) const {
  return receive_from(MPI_ANY_SOURCE, tag, from);
}

// A message sent by send(): its size, then the bytes in pieces of at most 1 GiB, all from the
// rank that sent the size (`source` may be MPI_ANY_SOURCE; `from` gets the sender).
std::vector<std::byte> Job::receive_from(int source, int tag, int& from) const {
  std::uint64_t size = 0;
  MPI_Status status;
  MPI_Recv(&size, 1, MPI_UINT64_T, source, tag, MPI_COMM_WORLD, &status);
  from = status.MPI_SOURCE;
  std::vector<std::byte> bytes(size);
  constexpr std::uint64_t kPiece = std::uint64_t{1} << 30;
  for (std::uint64_t at = 0; at < size; at += kPiece)
    MPI_Recv(bytes.data() + at, static_cast<int>(std::min(kPiece, size - at)), MPI_BYTE, from, tag,
             MPI_COMM_WORLD, MPI_STATUS_IGNORE);
  return bytes;
}

std::uint64_t Job::broadcast(std::uint64_t value) const {
  if (size_ > 1) MPI_Bcast(&value, 1, MPI_UINT64_T, 0, MPI_COMM_WORLD);
  return value;
}

int Job::highest(int value) const {
  int highest = value;
  if (size_ > 1) MPI_Allreduce(&value, &highest, 1, MPI_INT, MPI_MAX, MPI_COMM_WORLD);
  return highest;
}

void Job::barrier() const {
  if (size_ > 1) MPI_Barrier(MPI_COMM_WORLD);
}

void Job::abort(int status) const {
  if (size_ > 1) MPI_Abort(MPI_COMM_WORLD, status);
  std::exit(status);
}

#else  // a single process

bool Job::built_with_mpi() {
  return false;
}
Job::Job(int&, char**&) {}
Job::~Job() = default;
void Job::send(int, std::span<const std::byte>, int) const {
  throw std::logic_error("Job::send on a single-process job");
}
std::vector<std::byte> Job::receive(int, int) const {
  throw std::logic_error("Job::receive on a single-process job");
}
struct Job::Sends::State {
  bool unused = false;
};
Job::Sends::Sends() : state_(std::make_unique<State>()) {}
Job::Sends::~Sends() = default;
void Job::Sends::add(const Job&, int, std::vector<std::byte>, int) {
  throw std::logic_error("Job::Sends on a single-process job");
}
void Job::Sends::finish() {}
std::vector<std::byte> Job::receive_any(int, int&) const {
  throw std::logic_error("Job::receive_any on a single-process job");
}
std::vector<std::byte> Job::receive_from(int, int, int&) const {
  throw std::logic_error("Job::receive on a single-process job");
}
std::uint64_t Job::broadcast(std::uint64_t value) const {
  return value;
}
int Job::highest(int value) const {
  return value;
}
void Job::barrier() const {}
void Job::abort(int status) const {
  std::exit(status);
}

#endif

std::string start_verdict(const Job& job, const std::string& mine) {
  if (job.size() == 1) return mine.starts_with("ok ") ? "" : mine.substr(mine.find(' ') + 1);
  constexpr int kStartTag = 41, kVerdictTag = 42;
  const auto bytes_of = [](const std::string& text) {
    return std::span(reinterpret_cast<const std::byte*>(text.data()), text.size());
  };
  const auto text_of = [](const std::vector<std::byte>& bytes) {
    return std::string(reinterpret_cast<const char*>(bytes.data()), bytes.size());
  };
  std::string verdict;
  if (job.leader()) {
    // Rank 0's own failure first, then the others' in rank order; then any digest unlike its own.
    std::vector<std::string> said{mine};
    for (int r = 1; r < job.size(); ++r) said.push_back(text_of(job.receive(r, kStartTag)));
    for (int r = 0; r < job.size() && verdict.empty(); ++r)
      if (!said[r].starts_with("ok "))
        verdict = "rank " + std::to_string(r) + ": " + said[r].substr(said[r].find(' ') + 1);
    for (int r = 1; r < job.size() && verdict.empty(); ++r)
      if (said[r] != said[0])
        verdict = "rank " + std::to_string(r) +
                  " read or was given other inputs than rank 0 (the scenario or sweep, a file "
                  "it reads, the sample count, the seed, a sweep's output or the version of "
                  "strewn differ); every rank must see the same files and the same command";
    for (int r = 1; r < job.size(); ++r) job.send(r, bytes_of(verdict), kVerdictTag);
  } else {
    job.send(0, bytes_of(mine), kStartTag);
    verdict = text_of(job.receive(0, kVerdictTag));
  }
  return verdict;
}

}  // namespace strewn
