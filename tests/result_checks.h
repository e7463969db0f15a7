// What the robustness tests (interrupts, determinism) ask of a finished run folder: the complete set of
// files, a summary.json that reads back, and the results apart from the clock readings.
#pragma once

#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <set>
#include <sstream>
#include <string>

#include "cli_fixture.h"
#include "tools/case/summary_reader.h"

namespace hv::testing {

// The names of the files in `folder` (not recursive).
inline std::set<std::string> file_names(const std::filesystem::path& folder) {
  std::set<std::string> names;
  for (const auto& entry : std::filesystem::directory_iterator(folder)) names.insert(entry.path().filename().string());
  return names;
}

// summary.json without the clock readings: the "timings_s" object and every "seconds..." member. The
// writer puts one member per line (postproc/json_writer.cpp), so whole lines go.
inline std::string without_timings(const std::string& json) {
  std::istringstream in(json);
  std::string kept;
  bool in_timings = false;
  for (std::string line; std::getline(in, line);) {
    if (line.find("\"timings_s\"") != std::string::npos) in_timings = true;
    const bool clock_line = in_timings || line.find("\"seconds") != std::string::npos;
    if (in_timings && line.find('}') != std::string::npos) in_timings = false;
    if (!clock_line) kept += line + "\n";
  }
  return kept;
}

// Why `folder` is not a complete run result like `reference` (same case and parameters), or "" when
// it is: the same file set, a summary.json that reads back (read_summary refuses anything else) and
// ends whole, the same results apart from the clock, and the same bytes in every CSV and VTK file.
inline std::string incomplete_against(const std::filesystem::path& folder, const std::filesystem::path& reference) {
  if (file_names(folder) != file_names(reference)) return "the file set differs from a complete run";
  try {
    read_summary((folder / "summary.json").string());
  } catch (const std::exception& error) {
    return std::string("summary.json does not read back: ") + error.what();
  }
  const std::string summary = read_text(folder / "summary.json");
  if (summary.size() < 2 || summary.compare(summary.size() - 2, 2, "}\n") != 0) return "summary.json ends early";
  if (without_timings(summary) != without_timings(read_text(reference / "summary.json")))
    return "summary.json differs from the reference run";
  for (const std::string& name : file_names(reference)) {
    const std::string extension = std::filesystem::path(name).extension().string();
    const bool exact = extension == ".csv" || extension == ".vtu" || extension == ".vtp";
    if (exact && read_text(folder / name) != read_text(reference / name)) return name + " differs from the reference run";
  }
  return "";
}

// Every "*.tmp-*" or "*.old-*" folder under `root`.
inline std::string staging_leftovers(const std::filesystem::path& root) {
  std::string found;
  for (const auto& entry : std::filesystem::recursive_directory_iterator(root)) {
    const std::string name = entry.path().filename().string();
    const bool staging = name.find(".tmp-") != std::string::npos || name.find(".old-") != std::string::npos;
    if (staging && entry.is_directory()) found += entry.path().string() + " ";
  }
  return found;
}

// Runs `hvstress ARGS` in `folder` with extra environment assignments ("NAME=VALUE ..."), unlike
// Sandbox::hvstress, which pins OpenBLAS to one thread. Returns the exit code.
inline int hvstress_with_environment(const std::filesystem::path& folder, const std::string& environment,
                                     const std::string& args) {
  const std::string command = "cd '" + folder.string() + "' && env " + environment + " '" HV_BINARY "' " + args +
                              " >/dev/null 2>&1";
  const int status = std::system(command.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace hv::testing
