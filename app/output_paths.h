// app/output_paths.h — output paths checked before any work, so a bad one writes nothing.
#ifndef OVERTONE_APP_OUTPUT_PATHS_H_
#define OVERTONE_APP_OUTPUT_PATHS_H_

#include <filesystem>
#include <string>

#include "overtone/errors.h"

namespace overtone::app {

// A file option (`--json FILE`, `-` for standard output): its folder must exist. Throws
// InputError (exit status 2) naming the option.
inline void CheckOutputFile(const std::string& option, const std::string& path) {
  if (path.empty() || path == "-") return;
  const std::filesystem::path folder = std::filesystem::path(path).parent_path();
  if (!folder.empty() && !std::filesystem::is_directory(folder)) {
    throw InputError(SourceLocation{}, option + " " + path + ": the folder does not exist");
  }
}

// A folder option (`-o DIR`): created when needed, so it must not be an existing file.
inline void CheckOutputFolder(const std::string& option, const std::string& path) {
  if (std::filesystem::exists(path) && !std::filesystem::is_directory(path)) {
    throw InputError(SourceLocation{}, option + " " + path + ": exists and is not a folder");
  }
}

}  // namespace overtone::app

#endif  // OVERTONE_APP_OUTPUT_PATHS_H_
