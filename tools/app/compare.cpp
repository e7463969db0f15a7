#include "tools/app/compare.h"

#include <cstdio>
#include <filesystem>

#include "mesh/base.h"
#include "tools/app/compare_files.h"
#include "tools/app/compare_report.h"
#include "tools/app/compare_runs.h"
#include "tools/case/summary_reader.h"

namespace hv {

namespace fs = std::filesystem;

namespace {

// "R=40 mm, U=100 kV"
std::string settings_label(const std::vector<std::pair<std::string, std::string>>& settings) {
  std::string label;
  for (const auto& [name, value] : settings) label += (label.empty() ? "" : ", ") + name + "=" + value;
  return label;
}

// The folder as the user gave it, without a trailing separator.
std::string folder_label(const std::string& folder) {
  std::string label = folder;
  while (label.size() > 1 && label.back() == '/') label.pop_back();
  return label;
}

// The variants of a sweep folder, labelled as the sweep labels them ("v3 R=40mm, U=100kV"), prefixed
// with the sweep folder when several folders are compared.
std::vector<ComparedRun> sweep_runs(const std::string& folder, bool prefix) {
  const SweepIndex sweep = read_sweep_index((fs::path(folder) / "sweep.json").string());
  std::vector<ComparedRun> runs;
  for (const SweepVariant& variant : sweep.variants) {
    ComparedRun run;
    run.folder = (fs::path(folder) / variant.folder).string();
    const std::string name = "v" + std::to_string(variant.index) + " " + settings_label(variant.settings);
    run.label = prefix ? folder_label(folder) + ": " + name : name;
    run.varied = variant.settings;
    run.finished = variant.finished;
    run.message = variant.message;
    runs.push_back(run);
  }
  return runs;
}

// The comparison folder may be new, empty, or an earlier comparison (it holds sweep.csv); anything
// else is the user's and stays untouched.
void require_replaceable_comparison(const fs::path& destination) {
  std::error_code error;
  if (!fs::exists(destination, error)) return;
  const SourceLocation where{"", 0, 0, "output folder " + destination.string()};
  if (!fs::is_directory(destination, error))
    throw InputError(where, "exists and is not a folder", "choose another output folder with -o");
  if (!fs::exists(destination / "sweep.csv", error) && !fs::is_empty(destination, error))
    throw InputError(where, "exists and does not hold an earlier comparison (no sweep.csv), so it is left alone",
                     "choose another output folder with -o, or remove it yourself");
}

}  // namespace

std::vector<ComparedRun> find_runs(const std::vector<std::string>& folders) {
  std::vector<ComparedRun> runs;
  for (const std::string& folder : folders) {
    const fs::path path(folder);
    if (fs::exists(path / "summary.json")) {
      read_summary((path / "summary.json").string());  // refuses a summary that is not a run's, naming it
      runs.push_back({folder, folder_label(folder), {}, true, ""});
    } else if (fs::exists(path / "sweep.json")) {
      const std::vector<ComparedRun> variants = sweep_runs(folder, folders.size() > 1);
      runs.insert(runs.end(), variants.begin(), variants.end());
    } else {
      throw InputError(SourceLocation{"", 0, 0, folder},
                       "is neither a run folder (summary.json) nor a sweep folder (sweep.json)",
                       "Give folders written by `hvstress run` or `hvstress sweep`");
    }
  }
  return runs;
}

void write_comparison(const std::vector<ComparedRun>& runs, const std::vector<std::string>& varied_names,
                      const std::string& output_dir) {
  const std::vector<LoadedRun> loaded = load_runs(runs);
  const std::vector<std::string> varied = varied_names.empty() ? varying_parameters(loaded) : varied_names;
  const fs::path folder(output_dir);
  write_file_atomically((folder / "sweep.csv").string(), sweep_csv(loaded, varied));
  write_file_atomically((folder / "sweep.pvd").string(), sweep_pvd(loaded, output_dir));
  write_file_atomically((folder / "report.html").string(), comparison_html(loaded, varied));
}

int compare_command(const std::vector<std::string>& folders, const std::string& output_dir, bool quiet) {
  const std::string destination = output_dir.empty() ? "comparison" : output_dir;
  const std::vector<ComparedRun> runs = find_runs(folders);
  require_replaceable_comparison(fs::absolute(destination));
  std::error_code error;
  fs::create_directories(destination, error);
  if (error) throw RunError("cannot create the folder " + destination + ": " + error.message());
  if (!quiet) std::fprintf(stderr, "comparing %zu runs\n", runs.size());
  write_comparison(runs, {}, destination);
  const fs::path report = fs::path(destination) / "report.html";
  std::printf("Compared %zu runs.\nReport:   %s\nTable:    %s\nParaView: %s\n", runs.size(), report.string().c_str(),
              (fs::path(destination) / "sweep.csv").string().c_str(),
              (fs::path(destination) / "sweep.pvd").string().c_str());
  return 0;
}

}  // namespace hv
