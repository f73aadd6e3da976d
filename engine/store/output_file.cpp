#include "store/output_file.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <atomic>
#include <cctype>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string_view>
#include <thread>

#include "core/errors.hpp"

namespace strewn {

std::string partial_suffix() {
  // Taken once: a host renamed during a run must not give its files two names.
  static const std::string suffix = [] {
    // The host name as it may stand in a file name: letters, digits, '-' and '.', the rest '_'.
    char host[256] = {};
    if (::gethostname(host, sizeof host - 1) != 0) host[0] = '\0';
    std::string name;
    for (const char* c = host; *c != '\0' && name.size() < 64; ++c) {
      const auto u = static_cast<unsigned char>(*c);
      name += (std::isalnum(u) || *c == '-' || *c == '.') ? *c : '_';
    }
    if (name.empty()) name = "host";
    return ".partial-" + name + "-" + std::to_string(::getpid());
  }();
  return suffix;
}

std::string temporary_path_of(const std::string& path) {
  const std::filesystem::path final_path(path);
  return (final_path.parent_path() / (final_path.filename().string() + partial_suffix())).string();
}

namespace {

// The state letter of a /proc/<pid>/stat or /proc/<pid>/task/<tid>/stat file (proc(5)), or '?'
// when it cannot be read. The line is "pid (comm) state ...": the command name may hold spaces
// and parentheses, so the state is read after the last ')'.
char process_state(const std::filesystem::path& stat_file) {
  std::ifstream stat(stat_file);
  std::string line;
  if (!std::getline(stat, line)) return '?';
  const std::size_t close = line.rfind(')');
  if (close == std::string::npos || close + 2 >= line.size()) return '?';
  return line[close + 2];
}

bool ended(char state) {
  return state == 'Z' || state == 'X';
}

// True while process `pid` of this machine may still write: it exists and has not ended. A process
// that has ended but whose parent has not yet collected its status (a zombie, state Z or X in
// /proc/<pid>/stat, proc(5)) still answers kill(pid, 0), yet writes nothing more: a rank killed
// under a launcher stays so until the launcher reaps it.
bool process_lives(pid_t pid) {
  if (::kill(pid, 0) != 0 && errno == ESRCH) return false;
  const std::filesystem::path proc = "/proc/" + std::to_string(pid);
  const char state = process_state(proc / "stat");
  if (state == '?') return true;  // no /proc: assume it lives
  if (!ended(state)) return true;
  // A leader thread that ended while other threads of its process run shows Z too: the process
  // lives while one of its threads (/proc/<pid>/task) has not ended.
  std::error_code ec;
  for (const auto& task : std::filesystem::directory_iterator(proc / "task", ec))
    if (const char s = process_state(task.path() / "stat"); s != '?' && !ended(s)) return true;
  return false;
}

}  // namespace

void remove_stale_partials(const std::string& folder, const std::string& output_name) {
  namespace fs = std::filesystem;
  const std::string suffix = partial_suffix();
  // ".partial-<host>-": what this machine's runs add, whatever their process id.
  const std::string ours = suffix.substr(0, suffix.rfind('-') + 1);
  std::error_code ec;
  for (const auto& entry : fs::directory_iterator(folder, ec)) {
    const std::string name = entry.path().filename().string();
    const std::size_t at = name.rfind(ours);
    if (at == std::string::npos || (!output_name.empty() && name != output_name + name.substr(at)))
      continue;
    const std::string digits = name.substr(at + ours.size());
    if (digits.empty() || digits.size() > 9 ||
        digits.find_first_not_of("0123456789") != std::string::npos)
      continue;
    const auto pid = static_cast<pid_t>(std::stol(digits));
    if (process_lives(pid)) continue;
    // A file someone holds locked is in use whatever its name says (HDF5 locks a file it
    // writes; two machines may share a host name): removed only while this process holds it.
    const int fd = ::open(entry.path().c_str(), O_RDONLY | O_NOFOLLOW | O_CLOEXEC | O_NONBLOCK);
    if (fd < 0) continue;
    if (::flock(fd, LOCK_EX | LOCK_NB) == 0) {
      std::error_code ignored;
      fs::remove(entry.path(), ignored);
    }
    ::close(fd);
  }
}

namespace {

// The slots of RemovedOnSignal. Each slot has one state, changed only by compare-and-swap, so
// that a name is never rewritten while a handler reads it and never unlinked after its holder
// let it go (a lock file of that name may by then be another run's):
//   free -> writing (claimed by a holder) -> held (published) -> removing (a handler unlinks it)
//   -> removed; the holder returns held or removed to free, and waits while a handler removes.
// Lock-free atomics are safe in a handler (signal-safety(7)).
enum SlotState : int { kFree, kWriting, kHeld, kRemoving, kRemoved };
struct HeldName {
  std::atomic<int> state{kFree};
  char path[4096] = "";
};
std::array<HeldName, kSlotsForSignals> held_names;
static_assert(std::atomic<int>::is_always_lock_free);

}  // namespace

RemovedOnSignal::RemovedOnSignal(const std::string& path) {
  if (path.empty() || path.size() >= sizeof HeldName::path) return;
  for (std::size_t k = 0; k < held_names.size(); ++k) {
    int free = kFree;
    if (!held_names[k].state.compare_exchange_strong(free, kWriting)) continue;
    std::memcpy(held_names[k].path, path.data(), path.size());
    held_names[k].path[path.size()] = '\0';
    held_names[k].state.store(kHeld, std::memory_order_release);
    slot_ = static_cast<int>(k);
    return;
  }
}

RemovedOnSignal::~RemovedOnSignal() {
  release();
}

void RemovedOnSignal::release() noexcept {
  if (slot_ < 0) return;
  std::atomic<int>& state = held_names[static_cast<std::size_t>(slot_)].state;
  for (;;) {
    int held = kHeld, removed = kRemoved;
    if (state.compare_exchange_strong(held, kFree) || state.compare_exchange_strong(removed, kFree))
      break;
    // A handler on another thread is removing the file and will end the process.
    std::this_thread::yield();
  }
  slot_ = -1;
}

void remove_files_held_for_signals() noexcept {
  for (HeldName& name : held_names) {
    int held = kHeld;
    if (!name.state.compare_exchange_strong(held, kRemoving, std::memory_order_acquire)) continue;
    ::unlink(name.path);
    name.state.store(kRemoved, std::memory_order_release);
  }
}

int create_new_file(const std::string& path) {
  std::error_code ignored;
  std::filesystem::remove(path, ignored);  // removes a link itself, never what it points to
  // 0666 less the umask, as any file a program makes: a group sharing a folder shares it.
  return ::open(path.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
}

namespace {

// `path` made absolute and resolved as the kernel resolves it when the file is made (lies_within);
// empty when a chain of links is too long to follow (the kernel gives up after 40: ELOOP).
std::filesystem::path resolved(const std::filesystem::path& path) {
  namespace fs = std::filesystem;
  std::error_code ec;
  const fs::path absolute = fs::absolute(path, ec);
  if (ec) return {};
  fs::path done = absolute.root_path();
  const fs::path parts = absolute.relative_path();
  std::vector<fs::path> pending(parts.begin(), parts.end());
  std::reverse(pending.begin(), pending.end());  // the next part last, taken from the back
  int links = 0;
  while (!pending.empty()) {
    const fs::path part = pending.back();
    pending.pop_back();
    if (part.empty() || part == ".") continue;
    if (part == "..") {
      done = done.parent_path();  // the root's parent is the root
      continue;
    }
    const fs::path next = done / part;
    if (!fs::is_symlink(fs::symlink_status(next, ec))) {
      done = next;  // a folder or file, or a part strewn would make
      continue;
    }
    if (++links > 40) return {};
    const fs::path target = fs::read_symlink(next, ec);
    if (ec) return {};
    // The target's parts are resolved in turn: from the root when it is absolute, else from the
    // folder that holds the link.
    if (target.is_absolute()) done = target.root_path();
    const fs::path rest = target.relative_path();
    for (auto at = std::make_reverse_iterator(rest.end());
         at != std::make_reverse_iterator(rest.begin()); ++at)
      pending.push_back(*at);
  }
  return done;
}

}  // namespace

bool lies_within(const std::string& path, const std::string& folder) {
  const std::filesystem::path inner = resolved(path),
                              outer = resolved(folder.empty() ? "." : folder);
  if (inner.empty() || outer.empty()) return false;
  auto at = inner.begin();
  for (const auto& part : outer) {
    if (part.empty()) continue;  // a trailing separator
    if (at == inner.end() || *at != part) return false;
    ++at;
  }
  return true;
}

// Everything here is found without writing anything: a refused output leaves no trace.
void refuse_unsafe_output(const std::string& path, const std::string& origin,
                          const std::vector<std::string>& inputs, const OutputRules& rules) {
  namespace fs = std::filesystem;
  // Longer than Linux's PATH_MAX, or a name longer than NAME_MAX (255), with the temporary
  // suffix and the probe's ".probe": no such file could be made.
  const std::size_t added = partial_suffix().size() + std::string_view(".probe").size();
  if (path.size() + added >= 4096)
    throw UsageError(origin + path.substr(0, 60) + "...: the output's path is too long (" +
                     std::to_string(path.size()) + " characters)");
  if (const std::string name = fs::path(path).filename().string(); name.size() + added > 255)
    throw UsageError(origin + path + ": the file's name is too long (" +
                     std::to_string(name.size()) + " characters; at most " +
                     std::to_string(255 - added) + " on this machine, which adds " +
                     std::to_string(added) + " to it while writing)");
  // A path ending in a slash, "." or ".." names a folder, whether it exists or not: writing a
  // file "there" would fail only after every flight.
  if (const std::string name = fs::path(path).filename().string();
      name.empty() || name == "." || name == "..")
    throw UsageError(origin + path + ": names a folder, not a file; name the output file itself");
  // Where the output lies is decided first: prepare_output goes on to make folders and a probe
  // file, none of which may happen outside, and a path outside is refused alike whether a file
  // is there or not.
  if (!rules.within.empty() && !lies_within(path, rules.within))
    throw UsageError(origin + path + ": is outside " + rules.within_what + " (" + rules.within +
                     ") once .. and links are resolved; pass -o or --allow-outside");
  std::error_code ec;
  const fs::file_status status = fs::symlink_status(path, ec);
  if (fs::is_directory(status))
    throw UsageError(origin + path + ": is a folder; name the output file itself");
  if (fs::exists(status) && !fs::is_regular_file(status))
    throw UsageError(origin + path +
                     ": is not a regular file (a device, a pipe or a link); strewn writes its "
                     "outputs only as regular files, which it replaces whole");
  for (const auto& input : inputs)
    if (fs::exists(status) && fs::equivalent(path, input, ec))
      throw UsageError(origin + path + ": is a file this command reads (" + input +
                       "); choose another name for the output");
  if (fs::exists(status) && !rules.replace)
    throw UsageError(origin + path + ": already exists; pass --force to replace it");
}

// Makes the folder of an output file (and its parents) when it is missing (with `make`; without,
// as `check` does, only finds that it could be made), and checks that a file can be made there,
// before any flight: a destination that cannot be written is refused with status 2, nothing
// having run. `origin` says where the path came from.
void prepare_output(const std::string& path, const std::string& origin, bool make,
                    const std::vector<std::string>& inputs, const OutputRules& rules) {
  namespace fs = std::filesystem;
  refuse_unsafe_output(path, origin, inputs, rules);
  std::error_code ec;
  const std::string checkpoint = path + ".checkpoint";
  if (const fs::file_status beside = fs::symlink_status(checkpoint, ec);
      fs::exists(beside) && !fs::is_regular_file(beside))
    throw UsageError(origin + path + ": its checkpoint " + checkpoint +
                     " is not a regular file (a folder, a device, a pipe or a link); remove it");
  fs::path folder = fs::path(path).parent_path();
  if (folder.empty()) folder = ".";
  fs::path existing = folder;  // the folder, or the nearest of its parents that exists
  while (!fs::exists(existing, ec)) {
    if (!existing.has_parent_path() || existing.parent_path() == existing) {
      existing = ".";  // a relative path's first part: the working directory holds it
      break;
    }
    existing = existing.parent_path();
  }
  if (!fs::is_directory(existing, ec))
    throw UsageError(origin + path + ": cannot make the folder " + folder.string() + " (" +
                     existing.string() + " is a file, not a folder)");
  if (make && existing != folder) {
    fs::create_directories(folder, ec);
    if (ec || !fs::is_directory(folder))
      throw UsageError(origin + path + ": cannot make the folder " + folder.string() + " (" +
                       (ec ? ec.message() : std::string("a file is in the way")) + ")");
    existing = folder;
  }
  // A file made and removed again: the one sure test that the folder takes new files.
  const std::string probe =
      (existing / (fs::path(temporary_path_of(path)).filename().string() + ".probe")).string();
  const int fd = ::open(probe.c_str(), O_WRONLY | O_CREAT | O_EXCL, 0644);
  if (fd < 0)
    throw UsageError(origin + path + ": cannot write in " + existing.string() + " (" +
                     std::strerror(errno) + ")");
  ::close(fd);
  ::unlink(probe.c_str());
  if (!make) return;
  // Temporary files of runs that were killed (their process is gone): strewn's own leftovers.
  remove_stale_partials(existing.string(), fs::path(path).filename().string());
}

OutputLock::OutputLock(const std::string& path) : lock_path_(path + ".lock") {
  // Taken on the file the name holds when the lock is held: a holder that removed the lock file
  // between our open and our flock has left us a lock on a file no one else will find, so the
  // name is opened again.
  for (int attempt = 0; attempt < 100; ++attempt) {
    fd_ = ::open(lock_path_.c_str(), O_RDWR | O_CREAT | O_NOFOLLOW | O_CLOEXEC, 0666);
    if (fd_ < 0)
      throw IoError(lock_path_ + ": cannot make the output's lock file (" + std::strerror(errno) +
                    ")");
    if (::flock(fd_, LOCK_EX | LOCK_NB) != 0) {
      const int error = errno;
      ::close(fd_);
      fd_ = -1;
      if (error == EWOULDBLOCK)
        throw UsageError(path + ": another strewn run is writing this output now (it holds " +
                         lock_path_ + "); wait for it to end, or choose another output");
      throw IoError(lock_path_ + ": cannot lock the output (" + std::strerror(error) + ")");
    }
    struct stat held {
    }, named{};
    if (::fstat(fd_, &held) == 0 && ::stat(lock_path_.c_str(), &named) == 0 &&
        held.st_dev == named.st_dev && held.st_ino == named.st_ino) {
      // Held from here: a rank of a job ended by a signal leaves no lock file behind.
      removed_on_signal_ = std::make_unique<RemovedOnSignal>(lock_path_);
      return;
    }
    ::close(fd_);
    fd_ = -1;
  }
  throw IoError(lock_path_ + ": cannot lock the output (its lock file keeps changing)");
}

OutputLock::~OutputLock() {
  if (fd_ < 0) return;
  removed_on_signal_.reset();
  ::unlink(lock_path_.c_str());  // while still held: no one takes a lock on a file being removed
  ::close(fd_);
}

void durable_rename(const std::string& from, const std::string& to, bool replace) {
  namespace fs = std::filesystem;
  const auto fail = [&](const std::string& what, int error) {
    std::error_code ignored;
    fs::remove(from, ignored);
    throw IoError(to + ": " + what + " (" + std::strerror(error) + ")");
  };
  const int fd = ::open(from.c_str(), O_RDONLY | O_NOFOLLOW | O_CLOEXEC);
  if (fd < 0) fail("cannot open the written file to flush it", errno);
  if (::fsync(fd) != 0) {
    const int error = errno;
    ::close(fd);
    fail("cannot flush the file to disk", error);
  }
  ::close(fd);
  // Without leave to replace, the rename itself refuses a file that appeared since the outputs
  // were checked (another report racing to the same name); renameat2 with RENAME_NOREPLACE (Linux
  // 3.15, rename(2)), or a plain rename where the file system cannot do it.
  int moved =
      replace ? -1 : ::renameat2(AT_FDCWD, from.c_str(), AT_FDCWD, to.c_str(), RENAME_NOREPLACE);
  if (moved != 0 && !replace && errno == EEXIST)
    fail("appeared while it was being written; pass --force to replace it", EEXIST);
  if (moved != 0) {
    std::error_code renamed;
    fs::rename(from, to, renamed);
    if (renamed) fail("cannot put the file in place", renamed.value());
  }
  // The folder's new entry; a file system that cannot flush a folder (EINVAL) keeps it anyway.
  fs::path folder = fs::path(to).parent_path();
  if (folder.empty()) folder = ".";
  const int dir = ::open(folder.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (dir >= 0) {
    const int synced = ::fsync(dir);
    const int error = errno;
    ::close(dir);
    if (synced != 0 && error != EINVAL && error != ENOTSUP)
      throw IoError(to + ": cannot flush its folder to disk (" + std::strerror(error) + ")");
  }
}

}  // namespace strewn
