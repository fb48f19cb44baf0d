// src/loader.cc — reads a format-1 plant file (YAML) into the typed Plant, checking every value.
//
// Two stages. (1) ReadPlantFiles (plant_file_reader.h) reads each file (encoding, YAML syntax,
// format version) and merges it with the file it `extends` into a RawPlant, where every element
// keeps its YAML node and the file it was written in, so later messages point at the right file.
// (2) BuildPlant (plant_builder.h) converts the raw elements through one key table per section
// (plant_keys.h: units, physical ranges, required keys), checks references and names, then the
// whole plant (islands without a source). Problems are collected in Diagnostics and thrown
// together as one InputError.
#include "overtone/load.h"

#include <fmt/format.h>

#include "load_diagnostics.h"
#include "overtone/errors.h"
#include "plant_builder.h"
#include "plant_file_reader.h"
#include "plant_text.h"

namespace overtone {

using internal::Diagnostics;
using internal::RawPlant;

Plant LoadPlantFromString(const std::string& text, const std::string& file_name) {
  Diagnostics diagnostics;
  std::optional<RawPlant> raw = internal::ReadPlantFiles(file_name, text, &diagnostics);
  if (!raw) diagnostics.Throw();
  Plant plant = internal::BuildPlant(*raw, file_name, &diagnostics);
  if (!diagnostics.empty()) diagnostics.Throw();
  return plant;
}

Plant LoadPlant(const std::string& path) {
  std::string error;
  const std::optional<std::string> text = internal::ReadTextFile(path, &error);
  if (!text) throw InputError({path, 0, 0}, fmt::format("cannot read the plant file: {}", error));
  return LoadPlantFromString(*text, path);
}

std::string SuggestName(std::string_view word, const std::vector<std::string>& names) {
  return internal::DidYouMean(word, names);
}

}  // namespace overtone
