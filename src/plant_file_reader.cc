// src/plant_file_reader.cc — files, `extends` and `remove`, merged into a RawPlant.
#include "plant_file_reader.h"

#include <filesystem>


#include "plant_text.h"

namespace overtone::internal {
namespace {

namespace fs = std::filesystem;


std::string_view ElementName(const YamlNode& node) { return node["name"].Scalar(); }

fs::path Canonical(const std::string& path) {
  std::error_code code;
  fs::path canonical = fs::weakly_canonical(path, code);
  return code ? fs::absolute(path).lexically_normal() : canonical;
}

class PlantFileReader {
 public:
  explicit PlantFileReader(Diagnostics* diagnostics) : diagnostics_(diagnostics) {}

  // The content of `file` merged over the files it extends; nothing when a file cannot be used
  // at all (unreadable, not YAML, wrong version, cyclic `extends`).
  std::optional<RawPlant> Read(const std::string& file, const std::string& text) {
    chain_.push_back({file, Canonical(file)});
    std::optional<RawPlant> plant = ReadOne(file, text);
    chain_.pop_back();
    return plant;
  }

 private:
  struct ChainLink {
    std::string name;  // as written (resolved against the naming file)
    fs::path canonical;
  };

  std::optional<RawPlant> ReadOne(const std::string& file, const std::string& text) {
    std::optional<YamlDocument> document =
        ParseYamlText(file, text, {"plant", "overtone: 1"}, diagnostics_);
    if (!document) return std::nullopt;
    // Entries and elements keep a pointer to the name; the plant takes it over below.
    auto stable_file = std::make_unique<const std::string>(file);
    const YamlNode root = document->documents()[0];
    MappingReader top(MapEntries(root, *stable_file, diagnostics_), root, *stable_file,
                      "the plant file", kTopKeys, diagnostics_);
    if (!CheckVersion(top)) return std::nullopt;
    top.CheckKeys();
    RawPlant plant;
    if (top.Has("extends")) {
      std::optional<RawPlant> base = ReadBase(top);
      if (!base) return std::nullopt;
      plant = std::move(*base);
    }
    plant.top_where = top.where();
    plant.documents.push_back(std::move(*document));
    plant.files.push_back(std::move(stable_file));
    RemoveInherited(top, &plant);
    MergeStudy(top, &plant);
    MergeSections(top, &plant);
    return plant;
  }

  bool CheckVersion(MappingReader& top) {
    if (!top.Has("overtone")) {
      diagnostics_->Error(top.where(),
                          "missing `overtone: 1` (the format version) at the top of the file");
      return false;
    }
    const std::optional<int> version = top.Integer("overtone");
    if (!version) return false;
    if (*version != 1) {
      top.Error(
          "overtone",
          fmt::format("format version {} is not supported; this build reads format 1", *version));
      return false;
    }
    return true;
  }

  std::optional<RawPlant> ReadBase(MappingReader& top) {
    const std::optional<std::string_view> written = top.Text("extends");
    if (!written) return std::nullopt;
    const std::string path = ResolvePath(top.FileOf("extends"), std::string(*written));
    const fs::path canonical = Canonical(path);
    const auto repeat = std::ranges::find(chain_, canonical, &ChainLink::canonical);
    if (repeat != chain_.end()) {
      std::vector<std::string> cycle;
      for (auto link = repeat; link != chain_.end(); ++link) cycle.push_back(link->name);
      cycle.push_back(path);
      std::string arrows;
      for (const std::string& name : cycle) arrows += (arrows.empty() ? "" : " -> ") + name;
      top.Error("extends", fmt::format("`extends` makes a cycle: {}", arrows));
      return std::nullopt;
    }
    std::string error;
    const std::optional<std::string> text = ReadTextFile(path, &error);
    if (!text) {
      top.Error("extends", fmt::format("cannot read `{}`: {}", path, error));
      return std::nullopt;
    }
    return Read(path, *text);
  }

  void RemoveInherited(MappingReader& top, RawPlant* plant) {
    const YamlNode names = top.List("remove");
    if (names.size() == 0) return;
    if (!top.Has("extends")) {
      top.Error("remove", "`remove` drops inherited elements, but this file has no `extends`");
      return;
    }
    const std::string& file = top.FileOf("remove");
    for (const YamlNode& item : names) {
      if (!item.IsScalar()) {
        diagnostics_->Error(Locate(item, file), "each entry of `remove` must be a name");
        continue;
      }
      if (!EraseInherited(item.Scalar(), plant)) {
        diagnostics_->Error(Locate(item, file),
                            fmt::format("`{}` is not inherited, so it cannot be removed{}",
                                        item.Scalar(), DidYouMean(item.Scalar(), Names(*plant))));
      }
    }
  }

  static bool EraseInherited(std::string_view name, RawPlant* plant) {
    for (std::vector<RawElement>& elements : plant->sections) {
      const auto found = std::ranges::find(elements, name, &RawElement::name);
      if (found != elements.end()) {
        elements.erase(found);
        return true;
      }
    }
    return false;
  }

  static std::vector<std::string_view> Names(const RawPlant& plant) {
    std::vector<std::string_view> names;
    for (const std::vector<RawElement>& elements : plant.sections) {
      for (const RawElement& element : elements) names.push_back(element.name);
    }
    return names;
  }

  // `study` merges key by key: a key written here replaces the inherited one.
  void MergeStudy(MappingReader& top, RawPlant* plant) {
    const YamlNode study = top.Mapping("study");
    if (!study.IsMap()) return;
    const std::string& file = top.FileOf("study");
    plant->study_node = study;
    plant->study_file = &file;
    for (Entry& entry : MapEntries(study, file, diagnostics_)) {
      const auto inherited = std::ranges::find(plant->study, entry.key, &Entry::key);
      if (inherited != plant->study.end()) {
        *inherited = std::move(entry);
      } else {
        plant->study.push_back(std::move(entry));
      }
    }
  }

  // An element whose name matches an inherited element of its section replaces it in place; the
  // rest are appended. A name written twice in this file is left for the duplicate-name check.
  void MergeSections(MappingReader& top, RawPlant* plant) {
    for (size_t section = 0; section < kSectionCount; ++section) {
      const std::string_view key = kSections[section].key;
      const YamlNode list = top.List(key);
      std::vector<RawElement>& elements = plant->sections[section];
      const size_t inherited = elements.size();
      std::vector<bool> replaced(inherited, false);
      elements.reserve(inherited + list.size());
      const std::string* file = &top.FileOf(key);
      for (const YamlNode& node : list) {
        RawElement element{ElementName(node), node, file};
        size_t slot = 0;
        while (slot < inherited &&
               (replaced[slot] || element.name.empty() || elements[slot].name != element.name)) {
          ++slot;
        }
        if (slot < inherited) {
          elements[slot] = std::move(element);
          replaced[slot] = true;
        } else {
          elements.push_back(std::move(element));
        }
      }
    }
  }

  Diagnostics* diagnostics_;
  std::vector<ChainLink> chain_;  // files being read, outermost first, for cycle detection
};

// ---------------------------------------------------------------------------------------------

}  // namespace

std::optional<RawPlant> ReadPlantFiles(const std::string& file, const std::string& text,
                                       Diagnostics* diagnostics) {
  return PlantFileReader(diagnostics).Read(file, text);
}

}  // namespace overtone::internal
