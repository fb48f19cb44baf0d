// src/write_file.cc — write through a temporary name, then rename into place.
#include <filesystem>
#include <fstream>
#include <stdexcept>

#include <unistd.h>

#include "overtone/report.h"

namespace overtone {

void WriteFileAtomically(const std::string& path, const std::function<void(std::ostream&)>& write) {
  namespace fs = std::filesystem;
  const fs::path target(path);
  if (target.has_parent_path()) fs::create_directories(target.parent_path());
  const fs::path temp = target.string() + ".tmp-" + std::to_string(::getpid());
  {
    std::ofstream out(temp, std::ios::binary | std::ios::trunc);
    if (!out) throw std::runtime_error("cannot write " + temp.string());
    try {
      write(out);
    } catch (...) {
      out.close();
      fs::remove(temp);
      throw;
    }
    out.flush();
    if (!out) {
      fs::remove(temp);
      throw std::runtime_error("cannot write " + temp.string());
    }
  }
  fs::rename(temp, target);
}

}  // namespace overtone
