#include "mesh/base.h"

#include <cctype>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <unistd.h>

namespace hv {

namespace {
std::string format_input_error(const SourceLocation& where, const std::string& problem,
                               const std::string& hint) {
  std::ostringstream out;
  if (!where.file.empty()) {
    out << where.file;
    if (where.line > 0) out << ':' << where.line << ':' << where.column;
    out << ": ";
  }
  if (!where.key_path.empty()) out << where.key_path << ": ";
  out << problem;
  if (!hint.empty()) {
    // The hint is a sentence of its own.
    std::string sentence = hint;
    sentence[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(sentence[0])));
    out << ". " << sentence;
  }
  return out.str();
}
}  // namespace

InputError::InputError(const SourceLocation& where, const std::string& problem, const std::string& hint)
    : std::runtime_error(format_input_error(where, problem, hint)),
      where_(where),
      problem_(problem),
      hint_(hint) {}

void write_file_atomically(const std::string& path, const std::string& contents) {
  const std::string temporary = path + ".tmp-" + std::to_string(::getpid());
  {
    std::ofstream out(temporary, std::ios::binary | std::ios::trunc);
    out << contents;
    out.flush();
    if (!out) {
      std::remove(temporary.c_str());
      throw RunError("cannot write " + temporary);
    }
  }
  if (std::rename(temporary.c_str(), path.c_str()) != 0) {
    std::remove(temporary.c_str());
    throw RunError("cannot rename " + temporary + " to " + path);
  }
}

}  // namespace hv
