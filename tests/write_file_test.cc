// tests/write_file_test.cc — WriteFileAtomically: an interrupted write leaves the old file intact.
//
// Issue 8 and DEVELOPERS.md "Nothing half-written": outputs go to a temporary name and are
// renamed into place, so a failure midway leaves the previous result and no stray file.
#include <filesystem>
#include <fstream>
#include <iterator>
#include <stdexcept>
#include <string>

#include <unistd.h>

#include <catch2/catch.hpp>

#include "overtone/report.h"

using namespace overtone;
namespace fs = std::filesystem;

namespace {

std::string Read(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

// A fresh, empty folder under the system's temporary folder.
fs::path FreshDir(const std::string& name) {
  const fs::path dir = fs::temp_directory_path() / ("overtone-" + name + "-" +
                                                    std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

size_t FilesIn(const fs::path& dir) {
  return static_cast<size_t>(std::distance(fs::directory_iterator(dir), fs::directory_iterator()));
}

}  // namespace

TEST_CASE("a writer that fails midway leaves the previous file and no temporary", "[write_file]") {
  const fs::path dir = FreshDir("atomic");
  const fs::path target = dir / "study.json";
  WriteFileAtomically(target.string(), [](std::ostream& out) { out << "{\"previous\": 1}\n"; });
  REQUIRE(Read(target) == "{\"previous\": 1}\n");

  // Half a document written (and flushed to the temporary file), then the run is interrupted.
  const auto interrupted = [](std::ostream& out) {
    out << "{\"buses\": [" << std::string(1 << 20, ' ');
    out.flush();
    throw std::runtime_error("interrupted");
  };
  CHECK_THROWS_WITH(WriteFileAtomically(target.string(), interrupted), "interrupted");
  CHECK(Read(target) == "{\"previous\": 1}\n");
  CHECK(FilesIn(dir) == 1);  // no temporary left beside it

  // Without a previous file, a failed write leaves nothing at all.
  const fs::path fresh = dir / "fresh.csv";
  CHECK_THROWS(WriteFileAtomically(fresh.string(), interrupted));
  CHECK_FALSE(fs::exists(fresh));
  CHECK(FilesIn(dir) == 1);

  // A complete write replaces the file whole.
  WriteFileAtomically(target.string(), [](std::ostream& out) { out << "{\"next\": 2}\n"; });
  CHECK(Read(target) == "{\"next\": 2}\n");
  CHECK(FilesIn(dir) == 1);
  fs::remove_all(dir);
}

TEST_CASE("a folder that cannot be written is an error, not a half file", "[write_file]") {
  const fs::path dir = FreshDir("blocked");
  const fs::path blocker = dir / "not-a-dir";
  WriteFileAtomically(blocker.string(), [](std::ostream& out) { out << "x"; });
  // The parent of the target is a regular file: creating the folder must fail.
  CHECK_THROWS(WriteFileAtomically((blocker / "out.json").string(),
                                   [](std::ostream& out) { out << "{}"; }));
  CHECK(Read(blocker) == "x");
  fs::remove_all(dir);
}
