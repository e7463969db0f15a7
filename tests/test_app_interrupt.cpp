// Interrupted runs and sweeps lose nothing (tools/app/output_folder.h): `run` and `sweep` are stopped by
// SIGINT, SIGTERM or SIGKILL at random moments (fixed seed), with and without an earlier result in
// place; afterwards every result folder is absent or complete, and the next run leaves no staging
// folders behind. Stale staging folders are removed only when their process is gone and they hold
// nothing but our files.
#include <gtest/gtest.h>

#include <signal.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>
#include <thread>
#include <vector>

#include "cli_fixture.h"
#include "postproc/text_format.h"
#include "result_checks.h"
#include "tools/app/output_folder.h"

namespace hv {
namespace {

namespace fs = std::filesystem;
using testing::Sandbox;

using Clock = std::chrono::steady_clock;

// Seconds since `start`.
double seconds_since(Clock::time_point start) { return std::chrono::duration<double>(Clock::now() - start).count(); }

// Waits for `pid` and gives its wait status.
int wait_status(pid_t pid) {
  int status = 0;
  while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {
  }
  return status;
}

// Reaps every process of group `group` (the sweep's variants, handed to this process when their
// parent was killed: see the subreaper in SweepKillTest).
void wait_for_group(pid_t group) {
  int status = 0;
  while (::waitpid(-group, &status, 0) > 0 || errno == EINTR) {
  }
}

// The longest wall time of three uninterrupted `hvstress ARGS...` in the sandbox (the machine may be
// busy: the kill moments should span a slow run too).
double longest_of_three(const Sandbox& box, const std::vector<std::string>& args) {
  double longest = 0.0;
  for (int i = 0; i < 3; ++i) {
    const Clock::time_point start = Clock::now();
    const int status = wait_status(testing::start_hvstress(box.root(), args));
    EXPECT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << "an uninterrupted run failed";
    longest = std::max(longest, seconds_since(start));
  }
  return longest;
}

// Whether a process ended by SIGINT/SIGTERM ended as output_folder.h says: by the same signal (the
// staging folder removed), or with exit 0 when it had finished first.
bool ended_as_documented(int status, int signal_number) {
  return (WIFSIGNALED(status) && WTERMSIG(status) == signal_number) || (WIFEXITED(status) && WEXITSTATUS(status) == 0);
}

const int kSignals[] = {SIGINT, SIGTERM, SIGKILL};

const char* kRingCase = HV_SOURCE_DIR "/cases/ring-study.yaml";

// `run` of the ring study (about 0.6 s, with discharge onset: every kind of output file) stopped at 24
// random moments: 3 signals x with/without an earlier result, 4 times each. The earlier result has
// another tube radius, so a mixture of the two would show in the file comparison.
TEST(RunKillTest, DestinationIsTheEarlierOrTheNewCompleteResultOrAbsent) {
  Sandbox box;
  const std::string earlier_setting = "tube_r=50 mm";
  ASSERT_EQ(box.hvstress(std::string("run '") + kRingCase + "' -o reference-new --quiet").exit_code, 0);
  ASSERT_EQ(box.hvstress(std::string("run '") + kRingCase + "' -o reference-old --quiet --set '" + earlier_setting + "'")
                .exit_code,
            0);
  const fs::path destination = box.root() / "results";
  const double run_seconds = longest_of_three(box, {"run", kRingCase, "-o", "timed", "--quiet"});

  // Fixed seed: the same kill points every time. Moments up to a little beyond the run time, so that
  // some runs put their results in place (or finish) before the signal.
  std::mt19937 random(20261202);
  std::uniform_real_distribution<double> moment(0.0, 1.15 * run_seconds);
  int absent = 0, earlier = 0, renewed = 0, finished_first = 0;
  for (int k = 0; k < 24; ++k) {
    const int signal_number = kSignals[k % 3];
    const bool with_earlier = (k / 3) % 2 == 0;
    fs::remove_all(destination);
    if (with_earlier) fs::copy(box.root() / "reference-old", destination, fs::copy_options::recursive);

    const double delay = moment(random);
    const pid_t run = testing::start_hvstress(box.root(), {"run", kRingCase, "-o", "results", "--quiet"});
    std::this_thread::sleep_for(std::chrono::duration<double>(delay));
    ::kill(run, signal_number);
    const int status = wait_status(run);
    const std::string where = "kill point " + std::to_string(k) + ": signal " + std::to_string(signal_number) +
                              " after " + std::to_string(delay) + " s" + (with_earlier ? ", earlier result" : "");
    if (signal_number != SIGKILL) {
      EXPECT_TRUE(ended_as_documented(status, signal_number)) << where << ", wait status " << status;
      for (const char* kind : {".tmp-", ".old-"})
        EXPECT_FALSE(fs::exists(box.root() / ("results" + std::string(kind) + std::to_string(run))))
            << where << ": SIGINT/SIGTERM remove the staging folder";
    }
    finished_first += WIFEXITED(status) && WEXITSTATUS(status) == 0;

    if (!fs::exists(destination)) {
      EXPECT_FALSE(with_earlier) << where << ": the earlier result was lost (swap supported on this file system)";
      ++absent;
      continue;
    }
    const std::string as_new = testing::incomplete_against(destination, box.root() / "reference-new");
    const std::string as_old = testing::incomplete_against(destination, box.root() / "reference-old");
    EXPECT_TRUE(as_new.empty() || as_old.empty()) << where << ": neither result whole: " << as_new << " / " << as_old;
    renewed += as_new.empty();
    earlier += as_old.empty();
    if (!with_earlier) {
      EXPECT_EQ(as_new, "") << where << ": without an earlier result only the new one may appear";
    }
  }
  // Some kill point must stop a run before its results are in place, else the test shows nothing.
  EXPECT_GT(absent + earlier, 0) << "no kill point stopped a run before its results were in place";
  RecordProperty("outcomes", "absent " + std::to_string(absent) + ", earlier " + std::to_string(earlier) + ", new " +
                                 std::to_string(renewed) + ", finished before the signal " + std::to_string(finished_first));

  // The next run completes and clears what the SIGKILLs left.
  ASSERT_EQ(box.hvstress(std::string("run '") + kRingCase + "' -o results --quiet").exit_code, 0);
  EXPECT_EQ(testing::incomplete_against(destination, box.root() / "reference-new"), "");
  EXPECT_EQ(testing::staging_leftovers(box.root()), "");
}


// Why some variant folder of `sweep` is not complete, or "". The variants differ only in R, so each
// is compared with a reference run of its own R (read from its summary.json), kept in `references`.
std::string incomplete_variant(const fs::path& sweep, Sandbox& box) {
  for (const auto& entry : fs::directory_iterator(sweep / "variants")) {
    const std::string name = entry.path().filename().string();
    if (!entry.is_directory() || name.find(".tmp-") != std::string::npos || name.find(".old-") != std::string::npos)
      continue;
    if (!fs::exists(entry.path() / "summary.json")) return name + ": no summary.json";
    // The value exactly as the variant had it, in metres: the reference reads back the same double.
    const std::string R = round_trip_number(read_summary((entry.path() / "summary.json").string()).parameter("R"));
    const fs::path reference = box.root() / ("reference-R" + R);
    if (!fs::exists(reference) &&
        box.hvstress("run sphere.yaml --set 'R=" + R + " m' -o " + reference.filename().string() + " --quiet").exit_code != 0)
      return "the reference run for R = " + R + " m failed";
    const std::string why = testing::incomplete_against(entry.path(), reference);
    if (!why.empty()) return name + ": " + why;
  }
  return "";
}

// `sweep` stopped at 20 random moments, alternately by SIGINT (it stops its variants and cleans up)
// and SIGKILL (its variants run on; every other time the whole process group is killed with it), from
// scratch or resuming the folder the stop before left. This process adopts the orphaned variants
// (PR_SET_CHILD_SUBREAPER), so it can wait for them.
TEST(SweepKillTest, EveryVariantFolderIsCompleteAndTheSweepResumes) {
  Sandbox box;
  box.write("sphere.yaml", testing::kSphereWithOnsetCase);
  ASSERT_EQ(::prctl(PR_SET_CHILD_SUBREAPER, 1), 0);
  const std::vector<std::string> args = {"sweep", "sphere.yaml", "--vary", "R=20mm:50mm:4", "-o", "study", "--jobs", "2", "--quiet"};
  const double sweep_seconds = longest_of_three(box, args);

  std::mt19937 random(20261203);
  std::uniform_real_distribution<double> moment(0.0, 1.15 * sweep_seconds);
  int interrupted = 0;
  for (int k = 0; k < 20; ++k) {
    if (k % 2 == 0) fs::remove_all(box.root() / "study");
    const int signal_number = k % 4 < 2 ? SIGINT : SIGKILL;
    const double delay = moment(random);
    const pid_t sweep = testing::start_hvstress(box.root(), args);
    std::this_thread::sleep_for(std::chrono::duration<double>(delay));
    ::kill(sweep, signal_number);
    if (signal_number == SIGKILL && k % 8 >= 6) ::kill(-sweep, SIGKILL);  // the whole group, variants too
    const int status = wait_status(sweep);
    wait_for_group(sweep);  // variants that outlived a killed sweep
    interrupted += WIFSIGNALED(status) || (WIFEXITED(status) && WEXITSTATUS(status) == 130);
    const std::string where = "kill point " + std::to_string(k) + ": signal " + std::to_string(signal_number) +
                              " after " + std::to_string(delay) + " s";
    if (signal_number == SIGINT) {
      EXPECT_TRUE((WIFEXITED(status) && (WEXITSTATUS(status) == 130 || WEXITSTATUS(status) == 0)) ||
                  (WIFSIGNALED(status) && WTERMSIG(status) == SIGINT))
          << where << ", wait status " << status;
      if (fs::exists(box.root() / "study")) {
        EXPECT_EQ(testing::staging_leftovers(box.root() / "study"), "") << where;
      }
    }
    if (fs::exists(box.root() / "study" / "variants")) {
      EXPECT_EQ(incomplete_variant(box.root() / "study", box), "") << where;
    }
  }
  EXPECT_GT(interrupted, 0) << "no kill point stopped a sweep before it ended";

  const pid_t resumed = testing::start_hvstress(box.root(), args);
  const int status = wait_status(resumed);
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << "wait status " << status;
  EXPECT_EQ(testing::staging_leftovers(box.root() / "study"), "");
  EXPECT_TRUE(fs::exists(box.root() / "study" / "sweep.json"));
  int variants = 0;
  for (const auto& entry : fs::directory_iterator(box.root() / "study" / "variants")) variants += entry.is_directory();
  EXPECT_EQ(variants, 4);
  EXPECT_EQ(incomplete_variant(box.root() / "study", box), "");
}

// ---- stale staging folders ----

// The pid of a process that has ended (and been reaped).
pid_t ended_process_id() {
  const pid_t pid = ::fork();
  if (pid == 0) ::_exit(0);
  wait_status(pid);
  return pid;
}

void write_file(const fs::path& path, const std::string& text) {
  fs::create_directories(path.parent_path());
  std::ofstream(path) << text;
}

TEST(StaleStaging, OnlyOurFoldersOfEndedProcessesGo) {
  Sandbox box;
  const fs::path destination = box.root() / "results";
  const std::string dead = std::to_string(ended_process_id());
  const std::string alive = std::to_string(::getppid());  // the process that started this test
  const fs::path ours_dead = box.root() / ("results.tmp-" + dead);
  const fs::path old_dead = box.root() / ("results.old-" + dead);
  const fs::path ours_alive = box.root() / ("results.tmp-" + alive);
  const fs::path reused_id = box.root() / ("results.tmp-" + std::to_string(::getpid()));
  const fs::path users = box.root() / ("results.tmp-" + std::to_string(ended_process_id()));
  const fs::path other_name = box.root() / ("other.tmp-" + dead);
  write_file(ours_dead / "summary.json", "{}");
  write_file(ours_dead / ("field.vtu.tmp-" + dead), "half");
  write_file(old_dead / "best" / "summary.json", "{}");
  write_file(ours_alive / "summary.json", "{}");
  write_file(reused_id / "report.md", "#");
  write_file(users / "summary.json", "{}");
  write_file(users / "thesis.tex", "the user's own file");
  write_file(other_name / "summary.json", "{}");

  remove_stale_staging(destination.string());

  EXPECT_FALSE(fs::exists(ours_dead)) << "our files, process ended";
  EXPECT_FALSE(fs::exists(old_dead)) << "our files, process ended";
  EXPECT_TRUE(fs::exists(ours_alive)) << "its process is still running";
  EXPECT_FALSE(fs::exists(reused_id)) << "named with the caller's own id: left by an ended process";
  EXPECT_TRUE(fs::exists(users / "thesis.tex")) << "a file that is not ours";
  EXPECT_TRUE(fs::exists(other_name)) << "beside another destination";
}

}  // namespace
}  // namespace hv
