#pragma once
// Output files written safely: a path strewn must not write is refused before anything runs, a
// file is made new (never through a link) under a temporary name beside the final one and renamed
// into place when whole, and the temporary files of killed runs are cleared away.
#include <cstddef>
#include <memory>
#include <string>
#include <vector>

namespace strewn {

/// What the command line allows an output beyond what strewn always permits: replacing a file
/// already there, and lying outside the folder of the file that named it. The defaults allow
/// neither.
struct OutputRules {
  /// A regular file already under the output's name may be replaced: the user said so (--force).
  /// Without it the file is refused: strewn does not destroy a file it was not told it may.
  bool replace = false;
  /// When not empty, the folder the output must lie in once `..` and links are resolved: the
  /// folder of the scenario or sweep file that named the output, so that a file shared with a
  /// user cannot have strewn write wherever that user may. Empty when the path came from the
  /// command line (the user chose it), is strewn's default, or --allow-outside was given.
  std::string within;
  /// What `within` is, for the message: "the scenario's folder".
  std::string within_what;
  /// The rules of a write whose path its command has checked already with the user's own rules
  /// (report's files are checked all before any is written, then each again as it is written):
  /// the file found there is the one the user allowed to be replaced.
  static OutputRules checked_before() {
    OutputRules rules;
    rules.replace = true;
    return rules;
  }
};

/// True when `path` lies in `folder` or below it once both are made absolute and resolved as the
/// kernel resolves them when a file is made: `.` dropped, `..` taken to the parent of what is
/// resolved so far (of a link's target, not of the link), every link met followed; the parts
/// that do not exist yet are folders strewn would make. The folder itself counts as within (an
/// output that is a folder is refused as such); a chain of more than 40 links is not followed,
/// and counts as outside.
bool lies_within(const std::string& path, const std::string& folder);

/// Refuses (UsageError, status 2) an output path that strewn must not write: a folder, an existing
/// entry that is not a regular file (a device such as /dev/null, a pipe, a link: writing a whole
/// file under the name would replace it), one of `inputs`, the files the command reads, or a path
/// or name too long to be written; and, by `rules`, a path outside `rules.within` and an existing
/// file that may not be replaced. The message starts with `origin` (where the path came from,
/// e.g. "file:line: output.file: ").
void refuse_unsafe_output(const std::string& path, const std::string& origin,
                          const std::vector<std::string>& inputs = {},
                          const OutputRules& rules = OutputRules::checked_before());

/// Refuses an unsafe output (refuse_unsafe_output, by `rules`) and a checkpoint beside it
/// (`<path>.checkpoint`) that is not a regular file (a link planted there would have the study
/// write through it), makes the folder of an output file (and its
/// parents) when it is missing (with `make`; without, as `check` does, only finds that it could
/// be made), and checks that a file can be made there by making and removing one. With `make`,
/// also removes the temporary files that killed runs on this machine left under this name (their
/// process is gone; remove_stale_partials). Throws UsageError (status 2: refused before anything
/// runs).
void prepare_output(const std::string& path, const std::string& origin, bool make,
                    const std::vector<std::string>& inputs, const OutputRules& rules);

/// What strewn adds to an output's name while it writes it: ".partial-<host>-<process id>". The
/// host name keeps two machines sharing a folder (a cluster's shared file system) from taking
/// each other's process ids for their own.
std::string partial_suffix();

/// The temporary name a results file is written under until it is complete: beside it, with
/// partial_suffix() added.
std::string temporary_path_of(const std::string& path);

/// Removes from `folder` the temporary files (partial_suffix) left by killed runs of this machine
/// whose process is gone, for the output named `output_name`, or for every output when it is
/// empty. Files of other machines, of live processes, and any a process holds locked (HDF5
/// locks a file it writes) are left alone.
void remove_stale_partials(const std::string& folder, const std::string& output_name);

/// A file removed when the process is ended by a signal before this object is dropped: the
/// temporary name of an output being written, or an output's lock file. A handler may only read
/// memory and call async-signal-safe functions (POSIX.1-2008, signal-safety(7)), so each name is
/// copied into one of a fixed number of slots that remove_files_held_for_signals() unlinks. A
/// name that finds no free slot, or is longer than a slot, is not held: a run killed outright
/// leaves the same kind of file, and the next run on the output clears it
/// (remove_stale_partials).
class RemovedOnSignal {
 public:
  explicit RemovedOnSignal(const std::string& path);
  ~RemovedOnSignal();
  RemovedOnSignal(const RemovedOnSignal&) = delete;
  RemovedOnSignal& operator=(const RemovedOnSignal&) = delete;
  /// Lets the name go before the object is dropped (the file was renamed into its final name).
  /// Waits while a handler on another thread removes it (that handler ends the process).
  void release() noexcept;

 private:
  int slot_ = -1;
};

/// How many names can be held for signals at once.
inline constexpr std::size_t kSlotsForSignals = 16;

/// Unlinks every file held by a RemovedOnSignal now (each once). Async-signal-safe: for a signal
/// handler that ends the process.
void remove_files_held_for_signals() noexcept;

/// One writer for an output: held while a study writes `<path>` (and its checkpoint), so that a
/// second run or resume on the same output is refused instead of mixing two studies into one.
/// An advisory lock (flock) on `<path>.lock`, released by the kernel when the process ends however
/// it ends; the next run takes over a lock file left by a killed one, and the holder removes it.
class OutputLock {
 public:
  /// Takes the lock; throws UsageError (status 2) when another process holds it, IoError when the
  /// lock file cannot be made.
  explicit OutputLock(const std::string& path);
  ~OutputLock();
  OutputLock(const OutputLock&) = delete;
  OutputLock& operator=(const OutputLock&) = delete;

 private:
  std::string lock_path_;
  int fd_ = -1;
  std::unique_ptr<RemovedOnSignal> removed_on_signal_;
};

/// Puts the complete file `from` in place as `to`, durably: the file's data is flushed to disk
/// (fsync) before the rename, and the folder's entry after it, so that a power cut leaves either
/// the old state or the new, never a name pointing at data not yet written. Throws IoError when
/// the file cannot be flushed or renamed (the file under `from` is then removed).
/// With `replace` false, a file already under `to` is never replaced: IoError instead.
void durable_rename(const std::string& from, const std::string& to, bool replace = true);

/// Opens `path` for writing as a new regular file, never through a link: an entry already there
/// under the name (a leftover, or a link planted to redirect the write) is removed first, then
/// the file is made with O_EXCL | O_NOFOLLOW. Returns the descriptor, or -1 with errno set.
int create_new_file(const std::string& path);

}  // namespace strewn
