// src/mitigate_yaml.h — plant elements written back as format-1 YAML for option files (internal).
//
// An element that `extends` replaces keeps none of the inherited keys (docs/plant-format.md,
// "Variants"), so each writer gives every key that differs from the format's default.
#ifndef OVERTONE_INTERNAL_MITIGATE_YAML_H_
#define OVERTONE_INTERNAL_MITIGATE_YAML_H_

#include <string>

#include "overtone/plant.h"

namespace overtone::internal {

// A YAML double-quoted scalar.
std::string YamlQuoted(const std::string& text);

// One list item (`  - name: ...`, two-space indent) of the `drives`, `capacitors` or `filters`
// section, ending with a line break.
std::string DriveYaml(const Drive& drive);
std::string CapacitorYaml(const Capacitor& capacitor);
std::string FilterYaml(const Filter& filter);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_MITIGATE_YAML_H_
