#pragma once
// The processes of a run: one, or the ranks of an MPI job when strewn is built with MPI and
// launched by mpirun or a batch scheduler (docs/cluster.md). Without MPI, or without a launcher,
// a Job is a single rank and everything runs on threads.
//
// MPI is initialised with MPI_THREAD_SERIALIZED: TBB worker threads never call MPI, and the one
// extra thread that does (the case manager of a sweep, on rank 0) runs while its rank's main
// thread makes no MPI call.
#include <cstdint>
#include <exception>
#include <memory>
#include <span>
#include <string>
#include <vector>

namespace strewn {

class Job {
 public:
  /// A single-process job (no MPI).
  Job() = default;
  /// Initialises MPI when strewn was built with it and was started by an MPI launcher (mpirun,
  /// srun: the environment says so); finalises it on destruction. Otherwise a single process.
  Job(int& argc, char**& argv);
  ~Job();
  Job(const Job&) = delete;
  Job& operator=(const Job&) = delete;

  [[nodiscard]] int rank() const { return rank_; }
  [[nodiscard]] int size() const { return size_; }
  [[nodiscard]] bool leader() const { return rank_ == 0; }
  /// True when built with MPI (whatever the number of ranks).
  static bool built_with_mpi();

  // Point-to-point and collective helpers over MPI_COMM_WORLD (no-ops on a single rank).
  void send(int to, std::span<const std::byte> bytes, int tag) const;
  /// Messages sent without waiting (MPI_Isend): they complete while this rank waits in other MPI
  /// calls, so two ranks can exchange in both directions at once. Call finish() before dropping.
  class Sends {
   public:
    Sends();
    ~Sends();
    Sends(const Sends&) = delete;
    Sends& operator=(const Sends&) = delete;
    /// Sends `bytes` (kept until finished) to `to`.
    void add(const Job& job, int to, std::vector<std::byte> bytes, int tag);
    /// Waits until every message is delivered.
    void finish();

   private:
    struct State;
    std::unique_ptr<State> state_;
  };
  std::vector<std::byte> receive(int from, int tag) const;
  /// A message with this tag from any rank; `from` is set to the sender.
  std::vector<std::byte> receive_any(int tag, int& from) const;
  /// Rank 0's value, on every rank.
  [[nodiscard]] std::uint64_t broadcast(std::uint64_t value) const;
  /// The highest of the ranks' values, on every rank.
  [[nodiscard]] int highest(int value) const;
  void barrier() const;
  /// Ends every rank at once (an error on one rank must not leave the others waiting).
  [[noreturn]] void abort(int status) const;

 private:
  std::vector<std::byte> receive_from(int source, int tag, int& from) const;
  int rank_ = 0, size_ = 1;
  bool initialised_ = false;
};

/// A failure at a point where no other rank of the job waits for this one: every rank failed at
/// the same agreed point (start_verdict), or the others have finished their part. The rank ends
/// by itself with the cause's status. Any other failure on a rank of several ends the whole job
/// (Job::abort), since the other ranks may be waiting for this one's messages.
struct FailureNoRankWaitsFor {
  std::exception_ptr cause;
};

/// What the ranks of a job agree on before any flight: each gives "ok <digest>" (the digest of
/// what it read and was asked: scenario, its files, samples, seed, strewn version) or "failed
/// <message>". Returns, on every rank, "" when every rank is ok with rank 0's digest, else the
/// first cause in words ("rank 2: ..."). A collective call: every rank must make it, whether its
/// preparation failed or not, so that no rank waits for one that has given up.
std::string start_verdict(const Job& job, const std::string& mine);

/// Samples [first, first + count) of rank `rank` among `ranks`: contiguous blocks in rank order,
/// the remainder one each to the first ranks.
struct SampleRange {
  std::uint64_t first = 0, count = 0;
};
SampleRange rank_share(std::uint64_t samples, int ranks, int rank);

}  // namespace strewn
