// tests/fuzz/loader_fuzz.cc — libFuzzer target: any text either loads or fails with InputError.
//
// Run by tools/fuzz. Anything else (a crash, a sanitizer finding, another exception, a hang) is a
// loader bug: PLANT-FORMAT.md "Errors" allows only located input errors.
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <string>

#include "overtone/errors.h"
#include "overtone/load.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  // Relative `extends` resolve in an empty folder, so the input reaches no project file.
  static const std::string kFile =
      (std::filesystem::temp_directory_path() / "overtone-fuzz-empty" / "plant.yaml").string();
  try {
    overtone::LoadPlantFromString(std::string(reinterpret_cast<const char*>(data), size), kFile);
  } catch (const overtone::InputError&) {
  }
  return 0;
}
