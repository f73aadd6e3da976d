#pragma once
// The command line of strewn (CLI11): parses arguments, runs the command, and turns the library's
// typed errors into messages and exit codes. Exit status: 0 done; 2 bad usage or an invalid
// scenario (nothing written); 3 a run-time failure (I/O, numerical).
#include <iosfwd>

namespace strewn {

inline constexpr int kExitDone = 0;
inline constexpr int kExitInvalid = 2;
inline constexpr int kExitFailure = 3;
inline constexpr int kExitInterrupted = 4;  ///< SIGINT or SIGTERM: finished samples checkpointed

/// Runs strewn with the given arguments, writing results to `out` and messages to `err`.
class Job;

/// Runs one command line as a single process.
int run_command_line(int argc, const char* const* argv, std::ostream& out, std::ostream& err);
/// The same on the ranks of a job: every rank takes part in `run` and `sweep`; the other
/// commands run on rank 0. Only rank 0 prints results and input errors.
int run_command_line(int argc, const char* const* argv, std::ostream& out, std::ostream& err,
                     const Job& job);

}  // namespace strewn
