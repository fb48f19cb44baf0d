// src/plant_file_reader.h — stage 1 of loading: a plant file and the files it `extends`, merged into raw elements (internal).
#ifndef OVERTONE_INTERNAL_PLANT_FILE_READER_H_
#define OVERTONE_INTERNAL_PLANT_FILE_READER_H_

#include <array>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "load_diagnostics.h"
#include "mapping_reader.h"

namespace overtone::internal {

// Stage 1: files, `extends` and `remove`, merged into a RawPlant.

enum Section {
  kSupplies,
  kGenerators,
  kBuses,
  kTransformers,
  kCables,
  kCapacitors,
  kFilters,
  kMotors,
  kLoads,
  kDrives,
  kSectionCount
};

struct SectionInfo {
  std::string_view key;
  std::string_view noun;
  std::span<const KeySpec> keys;
};

// In the order of PLANT-FORMAT.md; buses come before everything that needs their voltage.
// clang-format off
constexpr SectionInfo kSections[kSectionCount] = {
    {"supplies", "supply", kSupplyKeys},
    {"generators", "generator", kGeneratorKeys},
    {"buses", "bus", kBusKeys},
    {"transformers", "transformer", kTransformerKeys},
    {"cables", "cable", kCableKeys},
    {"capacitors", "capacitor", kCapacitorKeys},
    {"filters", "filter", kFilterKeys},
    {"motors", "motor", kMotorKeys},
    {"loads", "load", kLoadKeys},
    {"drives", "drive", kDriveKeys},
};
// clang-format on

// Names and nodes point into the RawPlant's documents and files.
struct RawElement {
  std::string_view name;  // empty when missing or malformed (reported when the element is read)
  YamlNode node;
  const std::string* file;
};

struct RawPlant {
  std::vector<YamlDocument> documents;  // the files read; the elements' nodes live in them
  // The names of the files read, each at a fixed address for the entries and elements naming it.
  std::vector<std::unique_ptr<const std::string>> files;
  SourceLocation top_where;  // the root file's top-level mapping
  std::vector<Entry> study;  // merged key by key; each entry keeps its own file
  YamlNode study_node;       // undefined when no file has `study`
  const std::string* study_file = nullptr;
  std::array<std::vector<RawElement>, kSectionCount> sections;
};

// The content of `file` (whose text is `text`) merged over the files it extends; nothing when a
// file cannot be used at all (unreadable, not YAML, wrong version, cyclic `extends`).
std::optional<RawPlant> ReadPlantFiles(const std::string& file, const std::string& text,
                                       Diagnostics* diagnostics);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_PLANT_FILE_READER_H_
