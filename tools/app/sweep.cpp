#include "tools/app/sweep.h"

#include <signal.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cinttypes>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <exception>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <thread>

#include "mesh/base.h"
#include "postproc/text_format.h"
#include "tools/app/compare.h"
#include "tools/app/output_folder.h"
#include "tools/app/sweep_processes.h"
#include "tools/case/case.h"

namespace hv {

namespace {

namespace fs = std::filesystem;

enum class Status { Pending, Finished, Failed };

// One variant of this sweep and what became of it.
struct VariantRun {
  Variant variant;
  std::vector<std::string> overrides;  // the sweep's --set, then the variant's settings
  std::string key;                     // 16 hex digits
  Status status = Status::Pending;
  bool reused = false;                 // finished in an earlier sweep with the same resolved case
  std::string message;                 // why it failed
  std::exception_ptr bad_input;        // the InputError of a variant whose case is bad input

  std::string name() const { return "v" + std::to_string(variant.index) + "-" + key; }
  std::string folder() const { return "variants/" + name(); }
  std::string log() const { return folder() + ".log"; }
};

// ---- the key of a variant ----

// FNV-1a, 64 bits (Fowler, Noll and Vo; IETF draft-eastlake-fnv, 2019): a fast hash that is plenty
// for telling resolved cases apart; it is not meant to resist deliberate collisions.
std::uint64_t fnv1a_64(const std::string& text) {
  std::uint64_t hash = 0xcbf29ce484222325ULL;
  for (const char c : text) {
    hash ^= static_cast<unsigned char>(c);
    hash *= 0x100000001b3ULL;
  }
  return hash;
}

std::string hex16(std::uint64_t value) {
  char text[17];
  std::snprintf(text, sizeof text, "%016" PRIx64, value);
  return text;
}

// What makes a variant's results what they are: the case file, every parameter as resolved (sorted by
// name, 17 significant digits, so equal values written differently give the same key) and the
// program version. `resolved` is empty for a variant whose case is bad; its raw settings stand in.
std::string variant_key(const std::string& case_text, const std::vector<Parameter>& resolved,
                        const std::vector<std::string>& overrides) {
  std::vector<std::string> lines;
  for (const Parameter& parameter : resolved)
    lines.push_back(parameter.name + "=" + significant(parameter.value, 17) + " " + parameter.unit);
  if (resolved.empty()) lines = overrides;
  std::sort(lines.begin(), lines.end());
  std::string text = case_text + "\n";
  for (const std::string& line : lines) text += line + "\n";
  return hex16(fnv1a_64(text + "hvstress " + HV_VERSION));
}

// ---- planning ----

std::string setting_name(const std::string& assignment) {
  std::string name = assignment.substr(0, assignment.find('='));
  name.erase(0, name.find_first_not_of(" \t"));
  name.erase(name.find_last_not_of(" \t") + 1);
  return name;
}

// Every varied name must be a parameter of the case, and not also fixed by --set.
void require_variable_parameters(const std::vector<VaryArg>& varies, const Case& base,
                                 const std::vector<std::string>& overrides) {
  std::string known;
  for (const Parameter& parameter : base.parameters) known += (known.empty() ? "`" : ", `") + parameter.name + "`";
  for (const VaryArg& vary : varies) {
    const SourceLocation where{"", 0, 0, "--vary " + vary.name};
    const bool in_case = std::any_of(base.parameters.begin(), base.parameters.end(),
                                     [&](const Parameter& parameter) { return parameter.name == vary.name; });
    if (!in_case)
      throw InputError(where, "the case has no parameter `" + vary.name + "`",
                       known.empty() ? "This case declares no `parameters:`" : "Its parameters: " + known);
    for (const std::string& assignment : overrides) {
      if (setting_name(assignment) == vary.name)
        throw InputError(where, "`" + vary.name + "` is both varied and fixed with --set", "Drop one of the two");
    }
  }
}

std::vector<Variant> variants_of(const SweepOptions& options, const Case& base) {
  std::vector<VaryArg> varies;
  for (const std::string& text : options.varies) varies.push_back(parse_vary(text));
  require_variable_parameters(varies, base, options.overrides);
  const std::vector<Variant> all = expand_variants(varies, options.zip);
  return options.shard.empty() ? all : select_shard(all, options.shard);
}

// Resolves the variant's case in-process: a value that makes the case bad input fails the variant
// here, without a process; a variant whose folder holds a result of the same key is reused.
VariantRun plan_variant(const Variant& variant, const SweepOptions& options, const Case& base,
                        const fs::path& sweep_folder) {
  VariantRun run;
  run.variant = variant;
  run.overrides = options.overrides;
  for (const auto& [name, value] : variant.settings) run.overrides.push_back(name + "=" + value);
  try {
    const Case resolved = read_case(options.case_path, run.overrides);
    run.key = variant_key(base.text, resolved.parameters, run.overrides);
  } catch (const InputError& error) {
    run.key = variant_key(base.text, {}, run.overrides);
    run.status = Status::Failed;
    run.message = error.what();
    run.bad_input = std::current_exception();
    return run;
  }
  if (fs::exists(sweep_folder / run.folder() / "summary.json")) {
    run.status = Status::Finished;
    run.reused = true;
  }
  return run;
}

// ---- the sweep folder ----

std::string sweep_folder_for(const SweepOptions& options, const Case& base) {
  return options.output_dir.empty() ? base.output.dir + "-sweep" : options.output_dir;
}

// Creates the folder, or accepts an empty one or an earlier sweep's (it holds sweep.json, or, when
// that sweep was stopped before it wrote sweep.json, variants/); refuses anything else, so the user's
// files are never mixed with ours.
void prepare_sweep_folder(const fs::path& folder) {
  std::error_code error;
  const SourceLocation where{"", 0, 0, "sweep folder " + folder.string()};
  if (fs::exists(folder, error)) {
    if (!fs::is_directory(folder, error))
      throw InputError(where, "exists and is not a folder", "choose another sweep folder with -o");
    const bool earlier_sweep = fs::exists(folder / "sweep.json", error) || fs::is_directory(folder / "variants", error);
    if (!earlier_sweep && !fs::is_empty(folder, error))
      throw InputError(where, "exists and does not hold an earlier sweep (no sweep.json), so it is left alone",
                       "choose another sweep folder with -o, or remove it yourself");
  }
  fs::create_directories(folder / "variants", error);
  if (error) throw RunError("cannot create the sweep folder " + folder.string() + ": " + error.message());
}

// ---- sweep.json (format documented in sweep.h) ----


std::string json_list(const std::vector<std::string>& items) {
  std::string out = "[";
  for (std::size_t i = 0; i < items.size(); ++i) out += (i ? ", " : "") + json_string(items[i]);
  return out + "]";
}

// The status of a variant that has ended.
const char* status_text(Status status) { return status == Status::Finished ? "finished" : "failed"; }

std::string sweep_json(const SweepOptions& options, const std::vector<std::string>& varied,
                       const std::vector<VariantRun>& runs) {
  std::ostringstream out;
  out << "{\n  \"format\": \"hvstress-sweep/1\",\n  \"version\": " << json_string(HV_VERSION)
      << ",\n  \"case\": " << json_string(options.case_path) << ",\n  \"overrides\": " << json_list(options.overrides)
      << ",\n  \"varied\": " << json_list(varied) << ",\n  \"variants\": [";
  for (std::size_t i = 0; i < runs.size(); ++i) {
    const VariantRun& run = runs[i];
    out << (i ? ",\n" : "\n") << "    {\"index\": " << run.variant.index << ", \"label\": " << json_string(run.variant.label)
        << ", \"settings\": {";
    for (std::size_t s = 0; s < run.variant.settings.size(); ++s)
      out << (s ? ", " : "") << json_string(run.variant.settings[s].first) << ": "
          << json_string(run.variant.settings[s].second);
    out << "}, \"key\": " << json_string(run.key) << ", \"folder\": " << json_string(run.folder())
        << ", \"status\": " << json_string(status_text(run.status)) << ", \"reused\": " << (run.reused ? "true" : "false")
        << ", \"message\": " << json_string(run.message) << "}";
  }
  out << "\n  ]\n}\n";
  return out.str();
}

// ---- progress ----

// Progress on stderr: on a terminal one updating line with an estimate of the time left, otherwise
// a plain line per variant that ends. Silent when quiet.
class SweepProgress {
 public:
  SweepProgress(bool quiet, const std::vector<VariantRun>& runs)
      : quiet_(quiet), terminal_(::isatty(STDERR_FILENO) != 0), runs_(runs), started_(Clock::now()) {
    int reused = 0;
    for (const VariantRun& run : runs) {
      ended_before_ += run.status != Status::Pending;
      reused += run.reused;
    }
    if (!quiet_)
      std::fprintf(stderr, "sweep: %zu variants, %d reused from an earlier sweep, %d with bad input, %d to run\n",
                   runs.size(), reused, ended_before_ - reused, static_cast<int>(runs.size()) - ended_before_);
  }

  void variant_ended(const VariantRun& run) {
    ++ended_now_;
    if (quiet_ || terminal_) return;
    std::fprintf(stderr, "sweep: v%d (%s) %s%s%s (%s)\n", run.variant.index, run.variant.label.c_str(),
                 status_text(run.status), run.message.empty() ? "" : ": ", run.message.c_str(), counts().c_str());
  }

  // Redraws the terminal line.
  void tick() {
    if (quiet_ || !terminal_) return;
    std::string line = "sweep: " + counts();
    const int left = static_cast<int>(runs_.size()) - ended_before_ - ended_now_;
    if (ended_now_ > 0 && left > 0) {
      const double seconds = std::chrono::duration<double>(Clock::now() - started_).count() / ended_now_ * left;
      line += ", about " + std::to_string(static_cast<long>(seconds + 0.5)) + " s left";
    }
    if (line == shown_) return;
    shown_ = line;
    std::fprintf(stderr, "\r\033[K%s", line.c_str());
    std::fflush(stderr);
  }

  ~SweepProgress() {
    if (!quiet_ && terminal_) std::fprintf(stderr, "\n");
  }
  SweepProgress(const SweepProgress&) = delete;
  SweepProgress& operator=(const SweepProgress&) = delete;

 private:
  using Clock = std::chrono::steady_clock;

  std::string counts() const {
    const long failed = std::count_if(runs_.begin(), runs_.end(), [](const VariantRun& run) { return run.status == Status::Failed; });
    return std::to_string(ended_before_ + ended_now_) + "/" + std::to_string(runs_.size()) + " done, " +
           std::to_string(failed) + " failed";
  }

  bool quiet_;
  bool terminal_;
  const std::vector<VariantRun>& runs_;
  Clock::time_point started_;
  int ended_before_ = 0;  // failed at planning or reused
  int ended_now_ = 0;     // ran in this sweep
  std::string shown_;     // the terminal line as last drawn
};

// ---- running the variants ----

// The hvstress program to run the variants with: the program of this process (argv[0] may be a bare
// name found on PATH, or anything the caller chose), else the one it was started as.
std::string hvstress_program(const std::string& started_as) {
  std::error_code error;
  const fs::path self = fs::read_symlink("/proc/self/exe", error);
  return error ? started_as : self.string();
}

// Why a variant's process failed, from its log: the message main() printed ("error: ..."), else how the
// process ended (a crash prints no message of ours), else the last line it printed.
std::string failure_message(const fs::path& log, const ProcessEnd& end) {
  const std::string prefix = "error: ";
  std::ifstream in(log);
  std::string last;
  std::string error;
  for (std::string line; std::getline(in, line);) {
    if (!line.empty()) last = line;
    if (line.compare(0, prefix.size(), prefix) == 0) error = line.substr(prefix.size());
  }
  if (!error.empty()) return error;
  if (end.signal != 0) return "ended by signal " + std::to_string(end.signal) + " (" + strsignal(end.signal) + ")";
  return !last.empty() ? last : "ended with exit code " + std::to_string(end.exit_code);
}

// Settles a variant from how its process ended: exit 0, or 3 (margin missed, results complete), is a
// finished run (spec/cli.md).
void settle(VariantRun& run, const ProcessEnd& end, const fs::path& sweep_folder) {
  constexpr int kMarginMissed = 3;
  if (end.exit_code == 0 || end.exit_code == kMarginMissed) {
    run.status = Status::Finished;
    return;
  }
  run.status = Status::Failed;
  run.message = failure_message(sweep_folder / run.log(), end);
}

// `hvstress run CASE --set ... -o <variant folder> --quiet`
std::vector<std::string> run_arguments(const std::string& program, const std::string& case_path, const VariantRun& run,
                                       const fs::path& sweep_folder) {
  std::vector<std::string> arguments = {program, "run", case_path};
  for (const std::string& assignment : run.overrides) arguments.insert(arguments.end(), {"--set", assignment});
  arguments.insert(arguments.end(), {"-o", (sweep_folder / run.folder()).string(), "--quiet"});
  return arguments;
}

struct Child {
  pid_t pid;
  VariantRun* run;
};

// Runs every pending variant, `jobs` at a time. On SIGINT/SIGTERM it starts no more, passes the
// signal on to the running ones and waits for them; a variant stopped that way stays pending.
// Returns the signal, or 0 when every variant ran.
int run_pending(std::vector<VariantRun>& runs, const SweepOptions& options, int jobs, const fs::path& sweep_folder,
                SweepProgress& progress) {
  const std::string program = hvstress_program(options.binary);
  // One BLAS/OpenMP thread per variant when several run at once: the variants are the parallelism.
  const std::vector<std::string> environment =
      jobs > 1 ? environment_with({"OPENBLAS_NUM_THREADS=1", "OMP_NUM_THREADS=1"}) : environment_with({});
  std::vector<VariantRun*> queue;
  for (VariantRun& run : runs)
    if (run.status == Status::Pending) queue.push_back(&run);

  const InterruptCatcher interrupts;
  std::vector<Child> running;
  std::size_t next = 0;
  int stopped_by = 0;
  while (next < queue.size() || !running.empty()) {
    if (stopped_by == 0 && interrupts.received() != 0) {
      stopped_by = interrupts.received();
      for (const Child& child : running) ::kill(child.pid, stopped_by);
    }
    while (stopped_by == 0 && static_cast<int>(running.size()) < jobs && next < queue.size()) {
      VariantRun& run = *queue[next++];
      const std::vector<std::string> arguments = run_arguments(program, options.case_path, run, sweep_folder);
      running.push_back({start_process(arguments, environment, (sweep_folder / run.log()).string()), &run});
    }
    for (auto child = running.begin(); child != running.end();) {
      const std::optional<ProcessEnd> end = poll_process(child->pid);
      if (!end) {
        ++child;
        continue;
      }
      // On a terminal, Ctrl-C reaches the children too, perhaps before this loop saw it.
      const bool stopped_with_us = interrupts.received() != 0 && (end->signal == SIGINT || end->signal == SIGTERM);
      if (!stopped_with_us) {
        settle(*child->run, *end, sweep_folder);
        progress.variant_ended(*child->run);
      }
      child = running.erase(child);
    }
    if (stopped_by != 0 && running.empty()) break;
    progress.tick();
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
  }
  return stopped_by;
}

// After a stop: the staging folders (*.tmp-*) that the stopped runs left and their logs go, so the
// sweep folder holds only whole variants.
void remove_partial_outputs(const std::vector<VariantRun>& runs, const fs::path& sweep_folder) {
  std::error_code error;
  for (const auto& entry : fs::directory_iterator(sweep_folder / "variants", error)) {
    if (entry.path().filename().string().find(".tmp-") != std::string::npos) fs::remove_all(entry.path(), error);
  }
  for (const VariantRun& run : runs)
    if (run.status == Status::Pending) fs::remove(sweep_folder / run.log(), error);
}

std::vector<ComparedRun> compared_runs(const std::vector<VariantRun>& runs, const fs::path& sweep_folder) {
  std::vector<ComparedRun> compared;
  for (const VariantRun& run : runs) {
    compared.push_back({(sweep_folder / run.folder()).string(), "v" + std::to_string(run.variant.index) + " " + run.variant.label,
                        run.variant.settings, run.status == Status::Finished, run.message});
  }
  return compared;
}

std::vector<std::string> varied_names(const std::vector<Variant>& variants) {
  std::vector<std::string> names;
  if (!variants.empty())
    for (const auto& setting : variants.front().settings) names.push_back(setting.first);
  return names;
}

// The lines on stdout: failed variants, then the counts and where the comparison is.
void print_outcome(const std::vector<VariantRun>& runs, const fs::path& sweep_folder) {
  int finished = 0;
  int reused = 0;
  int failed = 0;
  for (const VariantRun& run : runs) {
    finished += run.status == Status::Finished;
    reused += run.reused;
    failed += run.status == Status::Failed;
    if (run.status == Status::Failed)
      std::printf("v%d (%s) failed: %s\n", run.variant.index, run.variant.label.c_str(), run.message.c_str());
  }
  std::printf("sweep of %zu variants: %d finished (%d reused from an earlier sweep), %d failed; comparison in %s/\n",
              runs.size(), finished, reused, failed, sweep_folder.string().c_str());
}

}  // namespace

int sweep_command(const SweepOptions& options) {
  const Case base = read_case(options.case_path, options.overrides);  // bad input stops here, before any file
  const std::vector<Variant> variants = variants_of(options, base);
  const fs::path sweep_folder = sweep_folder_for(options, base);
  std::vector<VariantRun> runs;
  for (const Variant& variant : variants) runs.push_back(plan_variant(variant, options, base, sweep_folder));
  // When no variant is a valid design the sweep itself is bad input (e.g. a voltage given for a
  // length): say why, before anything is created.
  if (std::all_of(runs.begin(), runs.end(), [](const VariantRun& run) { return run.bad_input != nullptr; }))
    std::rethrow_exception(runs.front().bad_input);
  prepare_sweep_folder(sweep_folder);
  // A killed sweep's variants may have left staging folders beside finished (reused) variants too.
  for (const VariantRun& run : runs) remove_stale_staging((sweep_folder / run.folder()).string());

  const int jobs = options.jobs > 0 ? options.jobs : std::max(1, static_cast<int>(std::thread::hardware_concurrency()));
  int stopped_by = 0;
  {
    SweepProgress progress(options.quiet, runs);
    stopped_by = run_pending(runs, options, jobs, sweep_folder, progress);
  }
  if (stopped_by != 0) {
    remove_partial_outputs(runs, sweep_folder);
    std::fprintf(stderr, "sweep stopped by signal %d; run the same command again to resume\n", stopped_by);
    constexpr int kInterrupted = 130;  // 128 + SIGINT, as shells report a Ctrl-C
    return kInterrupted;
  }
  const std::vector<std::string> varied = varied_names(variants);
  write_file_atomically((sweep_folder / "sweep.json").string(), sweep_json(options, varied, runs));
  write_comparison(compared_runs(runs, sweep_folder), varied, sweep_folder.string());
  print_outcome(runs, sweep_folder);
  const bool all_finished =
      std::all_of(runs.begin(), runs.end(), [](const VariantRun& run) { return run.status == Status::Finished; });
  return all_finished ? 0 : 1;
}

}  // namespace hv
