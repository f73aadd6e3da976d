// The rules an output is held to beyond its kind (store/output_file.hpp): a file already there is
// replaced only when allowed, and an output a scenario names stays in the scenario's folder once
// `..` and links are resolved as the kernel resolves them.
#include <gtest/gtest.h>
#include <pthread.h>
#include <sys/syscall.h>
#include <sys/wait.h>
#include <unistd.h>

#include <csignal>
#include <filesystem>
#include <fstream>
#include <memory>
#include <vector>

#include "core/errors.hpp"
#include "store/output_file.hpp"
#include "support.hpp"

namespace strewn {
namespace {

namespace fs = std::filesystem;

// A folder to stay in, beside one to stay out of.
struct Folders {
  test::ScratchFolder root{"output-rules"};
  fs::path shared = root / "shared", elsewhere = root / "elsewhere";
  Folders() {
    fs::create_directories(shared / "real" / "deep");
    fs::create_directories(elsewhere / "sub");
  }
  [[nodiscard]] bool within(const fs::path& path) const {
    return lies_within(path.string(), shared.string());
  }
};

TEST(OutputRules, DotsAreResolvedBeforeTheFolderIsCompared) {
  const Folders f;
  EXPECT_TRUE(f.within(f.shared / "x.h5"));
  EXPECT_TRUE(f.within(f.shared / "a" / "." / "b.h5"));
  EXPECT_TRUE(f.within(f.shared / "a" / ".." / "b.h5"));
  EXPECT_TRUE(f.within(f.shared / "new" / "deeper" / "x.h5"));  // folders strewn would make
  EXPECT_FALSE(f.within(f.shared / "a" / ".." / ".." / "b.h5"));
  EXPECT_FALSE(f.within(f.shared / ".." / "x.h5"));
  EXPECT_FALSE(f.within(f.shared / ".." / "shared-twin" / "x.h5"));
  EXPECT_FALSE(f.within(f.root / "shared-twin" / "x.h5"));  // a name that only starts alike
  EXPECT_FALSE(f.within(f.elsewhere / "x.h5"));             // an absolute path outside
  EXPECT_FALSE(f.within("/x.h5"));
  EXPECT_FALSE(f.within(f.shared / ".." / ".." / ".." / ".." / ".." / ".." / ".." / "x.h5"));
  // Back in through the folder's own name after leaving it is within.
  EXPECT_TRUE(f.within(f.shared / ".." / "shared" / "x.h5"));
}

TEST(OutputRules, LinksAreFollowedAsTheKernelFollowsThem) {
  const Folders f;
  fs::create_symlink(f.elsewhere, f.shared / "away");              // absolute, out
  fs::create_symlink("../elsewhere", f.shared / "relative-away");  // relative, out
  fs::create_symlink("real", f.shared / "inner");                  // relative, in
  fs::create_symlink(f.elsewhere / "sub", f.shared / "down");      // out, one level below
  fs::create_symlink(f.shared / "real" / "deep", f.shared / "deep-link");
  EXPECT_FALSE(f.within(f.shared / "away" / "x.h5"));
  EXPECT_FALSE(f.within(f.shared / "away" / "missing" / "x.h5"));
  EXPECT_FALSE(f.within(f.shared / "relative-away" / "x.h5"));
  EXPECT_TRUE(f.within(f.shared / "inner" / "x.h5"));
  // A link met after a part that does not exist yet is followed all the same.
  EXPECT_FALSE(f.within(f.shared / "missing" / ".." / "away" / "x.h5"));
  // `..` after a link is the parent of its target, not of the link: down/.. is elsewhere, which
  // the path's text alone would put in the folder.
  EXPECT_FALSE(f.within(f.shared / "down" / ".." / "x.h5"));
  EXPECT_TRUE(f.within(f.shared / "deep-link" / ".." / "x.h5"));  // shared/real/x.h5
  // The folder reached through a link of its own is the same folder, either way round.
  fs::create_symlink(f.shared, f.root / "alias");
  EXPECT_TRUE(lies_within((f.root / "alias" / "x.h5").string(), f.shared.string()));
  EXPECT_TRUE(lies_within((f.shared / "x.h5").string(), (f.root / "alias").string()));
  EXPECT_FALSE(lies_within((f.elsewhere / "x.h5").string(), (f.root / "alias").string()));
  // A loop of links is not followed for ever, and counts as outside.
  fs::create_symlink(f.shared / "loop", f.shared / "loop");
  EXPECT_FALSE(f.within(f.shared / "loop" / "x.h5"));
}

TEST(OutputRules, RelativePathsAreTakenFromTheWorkingDirectory) {
  const Folders f;
  const fs::path before = fs::current_path();
  fs::current_path(f.shared);
  EXPECT_TRUE(lies_within("x.h5", "."));
  EXPECT_TRUE(lies_within("sub/x.h5", ""));  // an empty folder: the working directory
  EXPECT_FALSE(lies_within("../x.h5", "."));
  EXPECT_TRUE(lies_within((f.shared / "x.h5").string(), "."));
  EXPECT_TRUE(lies_within("real/x.h5", "real"));
  EXPECT_FALSE(lies_within("x.h5", "real"));
  fs::current_path(before);
}

// The rules as refuse_unsafe_output applies them: an existing file only with `replace`, a path
// outside `within` never, each with a message that says what to pass.
TEST(OutputRules, ExistingFilesAndPathsOutsideAreRefusedUnlessAllowed) {
  const Folders f;
  const std::string there = (f.shared / "there.h5").string();
  std::ofstream(there) << "keep me";
  OutputRules keep;
  try {
    refuse_unsafe_output(there, "origin: ", {}, keep);
    ADD_FAILURE() << "an existing file was not refused";
  } catch (const UsageError& e) {
    EXPECT_EQ(std::string(e.what()),
              "origin: " + there + ": already exists; pass --force to replace it");
  }
  OutputRules replace;
  replace.replace = true;
  EXPECT_NO_THROW(refuse_unsafe_output(there, "", {}, replace));
  EXPECT_NO_THROW(refuse_unsafe_output((f.shared / "new.h5").string(), "", {}, keep));
  // A file the command reads is refused as such even with --force.
  EXPECT_THROW(refuse_unsafe_output(there, "", {there}, replace), UsageError);

  OutputRules within = replace;
  within.within = f.shared.string();
  within.within_what = "the scenario's folder";
  EXPECT_NO_THROW(refuse_unsafe_output(there, "", {}, within));
  const std::string out = (f.elsewhere / "x.h5").string();
  try {
    prepare_output(out, "s.toml:3: output.file: ", true, {}, within);
    ADD_FAILURE() << "a path outside was not refused";
  } catch (const UsageError& e) {
    EXPECT_EQ(std::string(e.what()), "s.toml:3: output.file: " + out +
                                         ": is outside the scenario's folder (" +
                                         f.shared.string() +
                                         ") once .. and links are resolved; pass -o or "
                                         "--allow-outside");
  }
  // Refused before anything is made there: not the folder, not the probe file.
  const std::string deeper = (f.elsewhere / "new" / "x.h5").string();
  EXPECT_THROW(prepare_output(deeper, "", true, {}, within), UsageError);
  EXPECT_FALSE(fs::exists(f.elsewhere / "new"));
  std::size_t entries = 0;
  for (const auto& entry : fs::recursive_directory_iterator(f.elsewhere)) {
    ++entries;
    EXPECT_EQ(entry.path(), f.elsewhere / "sub");
  }
  EXPECT_EQ(entries, 1u);  // its own folder only
  EXPECT_NO_THROW(prepare_output((f.shared / "made" / "x.h5").string(), "", true, {}, within));
  EXPECT_TRUE(fs::is_directory(f.shared / "made"));
}

}  // namespace
}  // namespace strewn

namespace strewn {
namespace {

// A rank killed under a launcher stays a zombie (ended, its status not yet collected) until the
// launcher reaps it; kill(pid, 0) still answers for it (POSIX kill(2)), yet it writes nothing more.
// Its partial file is a leftover like any other (proc(5): state Z in /proc/<pid>/stat).
TEST(OutputRules, ALeftoverOfAnEndedProcessNotYetReapedIsRemoved) {
  const test::ScratchFolder dir("zombie-leftover");
  const pid_t child = ::fork();
  if (child == 0) ::_exit(0);
  ASSERT_GT(child, 0);
  // Ended, not reaped: wait until the kernel says so (WNOWAIT leaves it a zombie).
  siginfo_t info{};
  ASSERT_EQ(::waitid(P_PID, static_cast<id_t>(child), &info, WEXITED | WNOWAIT), 0);
  ASSERT_EQ(::kill(child, 0), 0);  // it still answers
  const std::string suffix = partial_suffix();
  const std::string leftover =
      (dir / "r.h5").string() + suffix.substr(0, suffix.rfind('-') + 1) + std::to_string(child);
  std::ofstream(leftover) << "left";
  remove_stale_partials(dir.string(), "r.h5");
  EXPECT_FALSE(fs::exists(leftover));
  ::waitpid(child, nullptr, 0);
}

// From a review: a process whose first thread has ended while another still runs shows state Z
// in /proc/<pid>/stat too (proc(5)), yet lives and may write; its partial file is left alone.
TEST(OutputRules, APartialFileOfAProcessWhoseFirstThreadEndedIsKept) {
  const test::ScratchFolder dir("leader-ended");
  const pid_t child = ::fork();
  if (child == 0) {
    pthread_t worker;
    ::pthread_create(
        &worker, nullptr,
        [](void*) -> void* {
          ::sleep(30);  // ended by the parent long before
          return nullptr;
        },
        nullptr);
    // The first thread ends, the process goes on: the exit system call ends only the calling
    // thread (exit(2)), without the unwinding of pthread_exit through the test framework.
    ::syscall(SYS_exit, 0);
  }
  ASSERT_GT(child, 0);
  const std::string stat = "/proc/" + std::to_string(child) + "/stat";
  bool leader_ended = false;
  for (int k = 0; k < 400 && !leader_ended; ++k) {
    std::ifstream in(stat);
    std::string line;
    std::getline(in, line);
    const std::size_t close = line.rfind(')');
    leader_ended = close != std::string::npos && close + 2 < line.size() && line[close + 2] == 'Z';
    if (!leader_ended) ::usleep(5000);
  }
  const std::string suffix = partial_suffix();
  const std::string partial =
      (dir / "r.h5").string() + suffix.substr(0, suffix.rfind('-') + 1) + std::to_string(child);
  std::ofstream(partial) << "being written";
  remove_stale_partials(dir.string(), "r.h5");
  const bool kept = fs::exists(partial);
  ::kill(child, SIGKILL);
  ::waitpid(child, nullptr, 0);
  ASSERT_TRUE(leader_ended) << "the first thread did not show as ended";
  EXPECT_TRUE(kept);
}

// What a rank ended by a signal removes (RemovedOnSignal): the names held while they are held,
// and no other.
TEST(OutputRules, FilesHeldForSignalsAreRemovedOnlyWhileHeld) {
  const test::ScratchFolder dir("held-for-signals");
  const std::string held = (dir / "held").string(), dropped = (dir / "dropped").string(),
                    never = (dir / "never").string();
  for (const auto& f : {held, dropped, never}) std::ofstream(f) << "x";
  const RemovedOnSignal keep(held);
  { const RemovedOnSignal gone(dropped); }
  remove_files_held_for_signals();
  EXPECT_FALSE(fs::exists(held));
  EXPECT_TRUE(fs::exists(dropped));
  EXPECT_TRUE(fs::exists(never));
  // Removed once: a file made again under a removed name (a lock file another run now holds) is
  // left alone, and so is a name let go by release() (a temporary renamed into its final name).
  std::ofstream(held) << "another run's";
  RemovedOnSignal renamed(never);
  renamed.release();
  remove_files_held_for_signals();
  EXPECT_TRUE(fs::exists(held));
  EXPECT_TRUE(fs::exists(never));
  // A name longer than a slot takes none (a path of 5000 characters: beyond PATH_MAX too); it
  // is held below while every slot is taken.
  const RemovedOnSignal too_long((dir / std::string(5000, 'x')).string());
  // Every slot taken: a name beyond them is not held (the next run clears such leftovers), and
  // the slots are free again once dropped.
  std::vector<fs::path> names;
  for (int k = 0; k < 40; ++k) names.push_back(dir / fs::path("m").concat(std::to_string(k)));
  std::vector<std::unique_ptr<RemovedOnSignal>> many;
  for (const auto& name : names) many.push_back(std::make_unique<RemovedOnSignal>(name.string()));
  for (const auto& name : names) std::ofstream(name) << "x";
  remove_files_held_for_signals();
  int removed = 0;
  for (const auto& name : names) removed += fs::exists(name) ? 0 : 1;
  EXPECT_EQ(removed, static_cast<int>(kSlotsForSignals) - 1);  // one slot held by `keep`
  many.clear();
  std::ofstream(dropped) << "x";
  const RemovedOnSignal again(dropped);
  remove_files_held_for_signals();
  EXPECT_FALSE(fs::exists(dropped));
}

}  // namespace
}  // namespace strewn
