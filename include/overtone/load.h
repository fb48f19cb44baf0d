// include/overtone/load.h — read a format-1 plant file into the typed model (public).
#ifndef OVERTONE_PUBLIC_LOAD_H_
#define OVERTONE_PUBLIC_LOAD_H_

#include <string>
#include <string_view>
#include <vector>

#include "overtone/plant.h"

namespace overtone {

// Reads, merges (`extends`, `remove`), checks and converts a plant file. Every problem found is
// collected and thrown together as one InputError (overtone/errors.h); nothing is returned half
// checked. Paths in `extends` are relative to the file that names them.
Plant LoadPlant(const std::string& path);

// The same for text held in memory; `file_name` is used in messages and to resolve `extends`.
Plant LoadPlantFromString(const std::string& text, const std::string& file_name);

// Reads the limit profile the plant names (`study.limits`: built-in or a file) and throws
// InputError with file, line and column for its problems; RunStudy does the same first.
void CheckLimitProfile(const Plant& plant);

// "; did you mean `P-101`?" when one of `names` is a likely slip for `word` (a few letters off,
// or the only name `word` begins), else empty: the hint every "unknown name" message carries.
std::string SuggestName(std::string_view word, const std::vector<std::string>& names);

}  // namespace overtone

#endif  // OVERTONE_PUBLIC_LOAD_H_
