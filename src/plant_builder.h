// src/plant_builder.h — stage 2 of loading: raw elements to the typed Plant, every value checked (internal).
#ifndef OVERTONE_INTERNAL_PLANT_BUILDER_H_
#define OVERTONE_INTERNAL_PLANT_BUILDER_H_

#include <string>

#include "load_diagnostics.h"
#include "overtone/plant.h"
#include "plant_file_reader.h"

namespace overtone::internal {

// Converts every element through its key table (units, physical ranges, required keys), checks
// references and names, then the whole plant (islands without a source). Problems go to
// `diagnostics`; the plant returned is complete only when none were added.
Plant BuildPlant(const RawPlant& raw, const std::string& file_name, Diagnostics* diagnostics);

}  // namespace overtone::internal

#endif  // OVERTONE_INTERNAL_PLANT_BUILDER_H_
