// Runs the hvstress binary as a user would, in a fresh temporary folder, and captures what it says.
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <csignal>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

namespace hv::testing {

// An isolated sphere with discharge onset in air: every kind of output, about 0.2 s a run. The
// tests of interrupted runs, sweeps, determinism and finite outputs share it.
inline const char* const kSphereWithOnsetCase = R"(hvstress: 1
title: isolated sphere with onset
units: {length: mm, voltage: kV}
parameters:
  U: 100 kV
  R: 50 mm
electrodes:
  sphere: {potential: U}
shapes:
  - name: ball
    circle: {center: [0, 0], radius: R}
    electrode: sphere
domain: {outer: open, radius: 10*R}
gas: {name: air, pressure: 101.325 kPa, temperature: 20 degC}
onset: {criterion: streamer, polarity: both, operating: U}
)";

struct Invocation {
  int exit_code = -1;
  std::string out;
  std::string err;
};

inline std::string read_text(const std::filesystem::path& path) {
  std::ifstream in(path);
  std::stringstream text;
  text << in.rdbuf();
  return text.str();
}

// A temporary working folder, removed with everything in it at the end of the test.
class Sandbox {
 public:
  Sandbox() {
    std::string pattern = (std::filesystem::temp_directory_path() / "hvstress-test-XXXXXX").string();
    root_ = ::mkdtemp(pattern.data());
  }
  ~Sandbox() {
    std::error_code ignored;
    std::filesystem::remove_all(root_, ignored);
  }
  const std::filesystem::path& root() const { return root_; }

  std::filesystem::path write(const std::string& name, const std::string& text) const {
    std::ofstream(root_ / name) << text;
    return root_ / name;
  }

  // Runs `hvstress ARGS` with the sandbox as the current folder.
  Invocation hvstress(const std::string& args) const {
    const std::string command = "cd '" + root_.string() + "' && OPENBLAS_NUM_THREADS=1 '" HV_BINARY "' " + args +
                                " >stdout.txt 2>stderr.txt";
    Invocation result;
    const int status = std::system(command.c_str());
    result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    result.out = read_text(root_ / "stdout.txt");
    result.err = read_text(root_ / "stderr.txt");
    return result;
  }

  // True when nothing but the captured output and `keep` lives in the sandbox.
  bool holds_only(const std::string& keep) const {
    for (const auto& entry : std::filesystem::directory_iterator(root_)) {
      const std::string name = entry.path().filename().string();
      if (name != keep && name != "stdout.txt" && name != "stderr.txt") return false;
    }
    return true;
  }

 private:
  std::filesystem::path root_;
};

// Starts `hvstress ARGS...` in `folder` in a process group of its own (so that the variants of a sweep
// can be stopped with it), output discarded, OpenBLAS on one thread as in Sandbox::hvstress.
inline pid_t start_hvstress(const std::filesystem::path& folder, const std::vector<std::string>& args) {
  std::vector<std::string> texts = {HV_BINARY};
  texts.insert(texts.end(), args.begin(), args.end());
  std::vector<char*> argv;
  for (std::string& text : texts) argv.push_back(text.data());
  argv.push_back(nullptr);
  const pid_t pid = ::fork();
  if (pid == 0) {
    ::setpgid(0, 0);
    if (::chdir(folder.c_str()) != 0) ::_exit(126);
    if (!::freopen("/dev/null", "w", stdout) || !::freopen("/dev/null", "w", stderr)) ::_exit(126);
    ::setenv("OPENBLAS_NUM_THREADS", "1", 1);
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  ::setpgid(pid, pid);  // also here, so that it holds before the child runs
  return pid;
}

}  // namespace hv::testing
