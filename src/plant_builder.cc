// src/plant_builder.cc — RawPlant to Plant through the key tables.
#include "plant_builder.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <numeric>
#include <optional>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include <fmt/format.h>

#include "plant_text.h"

namespace overtone::internal {
namespace {

namespace fs = std::filesystem;

// Vector groups (IEC 60076-1 notation): high-voltage winding in capitals, low-voltage winding in
// small letters, N/n for an accessible neutral, then the clock number.

struct Winding {
  char letter = 0;  // 'D', 'Y' or 'Z' (upper case here)
  bool neutral = false;
};

// Reads "D", "YN", "zn" ... at the front of `code`, in the case `upper` asks for.
std::optional<Winding> TakeWinding(std::string_view* code, bool upper) {
  const std::string_view letters = upper ? "DYZ" : "dyz";
  if (code->empty() || letters.find(code->front()) == std::string_view::npos) return std::nullopt;
  Winding winding{static_cast<char>(upper ? code->front() : code->front() - 'a' + 'A'), false};
  code->remove_prefix(1);
  const char neutral = upper ? 'N' : 'n';
  if (winding.letter != 'D' && !code->empty() && code->front() == neutral) {
    winding.neutral = true;
    code->remove_prefix(1);
  }
  return winding;
}

std::optional<VectorGroup> ParseVectorGroup(std::string_view code, std::string* error) {
  std::string_view rest = code;
  const std::optional<Winding> from = TakeWinding(&rest, true);
  const std::optional<Winding> to = TakeWinding(&rest, false);
  const bool digits = !rest.empty() && rest.size() <= 2 &&
                      std::ranges::all_of(rest, [](char c) { return c >= '0' && c <= '9'; }) &&
                      !(rest.size() == 2 && rest[0] == '0');
  if (!from || !to || !digits) {
    *error = fmt::format(
        "`{}` is not a vector group: write the high-voltage winding (D, Y, YN, Z, ZN), the "
        "low-voltage winding (d, y, yn, z, zn) and the clock number, e.g. `Dyn11`",
        code);
    return std::nullopt;
  }
  const int clock = std::stoi(std::string(rest));
  if (clock > 11) {
    *error = fmt::format("`{}`: the clock number must be 0 to 11", code);
    return std::nullopt;
  }
  // A wye winding against a delta or zigzag winding shifts by an odd multiple of 30 deg; equal
  // kinds by an even multiple (IEC 60076-1 vector groups: Dyn11, Yd1, Yzn11 odd; Dd0, Yy0, Dz0).
  const bool odd_shift = (from->letter == 'Y') != (to->letter == 'Y');
  if ((clock % 2 == 1) != odd_shift) {
    *error = fmt::format("`{}` is not a possible vector group: {}", code,
                         odd_shift ? "a wye winding against a delta or zigzag winding shifts "
                                     "by an odd clock number (1, 5, 7, 11)"
                                   : "wye against wye, or delta/zigzag against delta/zigzag, "
                                     "shifts by an even clock number (0, 2, 4, 6, 8, 10)");
    return std::nullopt;
  }
  VectorGroup group;
  group.code = std::string(code);
  group.clock = clock;
  group.from_grounded_wye = from->letter == 'Y' && from->neutral;
  group.to_grounded_wye = to->letter == 'Y' && to->neutral;
  group.from_delta = from->letter == 'D';
  group.to_delta = to->letter == 'D';
  return group;
}

// ---------------------------------------------------------------------------------------------
// Stage 2: RawPlant -> Plant.

class PlantBuilder {
 public:
  PlantBuilder(std::string file_name, Diagnostics* diagnostics)
      : file_name_(std::move(file_name)), diagnostics_(diagnostics) {}

  Plant Build(const RawPlant& raw) {
    plant_.source_file = file_name_;
    std::size_t elements = 0;
    for (const std::vector<RawElement>& section : raw.sections) elements += section.size();
    names_.reserve(elements);
    buses_.reserve(raw.sections[kBuses].size());
    for (const RawElement& bus : raw.sections[kBuses]) {
      if (!bus.name.empty()) buses_.try_emplace(bus.name);
    }
    ReadStudy(raw);
    ReadSection(raw, kSupplies, &plant_.supplies, &PlantBuilder::ReadSupply);
    ReadSection(raw, kGenerators, &plant_.generators, &PlantBuilder::ReadGenerator);
    ReadSection(raw, kBuses, &plant_.buses, &PlantBuilder::ReadBus);
    ReadSection(raw, kTransformers, &plant_.transformers, &PlantBuilder::ReadTransformer);
    ReadSection(raw, kCables, &plant_.cables, &PlantBuilder::ReadCable);
    ReadSection(raw, kCapacitors, &plant_.capacitors, &PlantBuilder::ReadCapacitor);
    ReadSection(raw, kFilters, &plant_.filters, &PlantBuilder::ReadFilter);
    ReadSection(raw, kMotors, &plant_.motors, &PlantBuilder::ReadMotor);
    ReadSection(raw, kLoads, &plant_.loads, &PlantBuilder::ReadLoad);
    ReadSection(raw, kDrives, &plant_.drives, &PlantBuilder::ReadDrive);
    CheckSources(raw.top_where);
    return std::move(plant_);
  }

 private:
  // The element that took a name; its place is built only for a message.
  struct NameUse {
    YamlNode node;
    const std::string* file;
    std::string_view noun;
  };

  // A bus written in the plant; its voltage and place in plant_.buses are known once it is read.
  struct BusEntry {
    double volts = 0.0;
    std::optional<size_t> index;
  };

  template <typename T>
  void ReadSection(const RawPlant& raw, Section section, std::vector<T>* out,
                   T (PlantBuilder::*read)(MappingReader&)) {
    const SectionInfo& info = kSections[section];
    out->reserve(raw.sections[section].size());
    for (const RawElement& element : raw.sections[section]) {
      std::optional<MappingReader> reader =
          ReadMapping(element.node, *element.file, info.noun, info.keys, diagnostics_);
      if (reader) {
        out->push_back((this->*read)(*reader));
      } else {
        topology_unsure_ = true;
      }
    }
  }

  void ReadStudy(const RawPlant& raw) {
    StudySettings& study = plant_.study;
    // Without `study` in any file, messages point at the root file (line 0: no place in it).
    const std::string* file = raw.study_file ? raw.study_file : &file_name_;
    MappingReader r(raw.study, raw.study_node, *file, "study", kStudyKeys, diagnostics_);
    study.where = r.where();
    r.CheckKeys();
    study.name = fs::path(file_name_).stem().string();
    r.Read("name", &study.name);
    r.Read("frequency", &study.frequency_hz);
    r.Read("max_order", &study.max_order);
    if (r.Has("pcc")) study.pcc = ReadBusName(r, "pcc");
    r.Read("demand_current", &study.demand_current_a);
    ReadLimits(r);
    r.Read("summation", SummationChoices(), &study.summation);
  }

  // A built-in profile name, or a profile file (relative to the file naming it) that must exist.
  void ReadLimits(MappingReader& r) {
    const std::optional<std::string_view> limits = r.Text("limits");
    if (!limits) return;
    if (std::ranges::find(kLimitProfiles, *limits) != std::end(kLimitProfiles)) {
      plant_.study.limits = *limits;
      return;
    }
    const std::string path = ResolvePath(r.FileOf("limits"), std::string(*limits));
    std::error_code code;
    if (fs::is_regular_file(path, code)) {
      plant_.study.limits = path;
      return;
    }
    r.Error(
        "limits",
        fmt::format("limits `{}` is neither a built-in profile ({}) nor an existing file "
                    "(looked for `{}`){}",
                    *limits, JoinNames(kLimitProfiles), path, DidYouMean(*limits, kLimitProfiles)));
  }

  // The element's name (in the YAML tree), which must be unique across the whole plant, buses
  // included; empty when unreadable.
  std::string_view ReadName(MappingReader& r) {
    const std::optional<std::string_view> name = r.Text("name");
    if (!name) return "";
    const auto [first, fresh] =
        names_.try_emplace(*name, NameUse{r.node(), &r.file(), r.noun()});
    if (!fresh) {
      const NameUse& use = first->second;
      r.Error("name", fmt::format("name `{}` is already used by the {} at {}", *name, use.noun,
                                  FormatPlace(Locate(use.node, *use.file))));
    }
    return *name;
  }

  std::string ReadBusName(MappingReader& r, std::string_view key) {
    const std::optional<std::string_view> bus = r.Text(key);
    if (!bus) {
      topology_unsure_ = true;
      return "";
    }
    if (!buses_.contains(*bus)) {
      r.Error(key, fmt::format("unknown bus `{}`{}", *bus, DidYouMean(*bus, SortedBusNames())));
      topology_unsure_ = true;
    }
    return std::string(*bus);
  }

  // Every bus name written, sorted: the candidates of a hint, gathered at the first unknown bus.
  const std::vector<std::string_view>& SortedBusNames() {
    if (sorted_bus_names_.empty()) {
      for (const auto& [name, bus] : buses_) {
        if (!name.empty()) sorted_bus_names_.push_back(name);
      }
      std::ranges::sort(sorted_bus_names_);
    }
    return sorted_bus_names_;
  }

  // 0 for a bus not read (yet).
  double BusVolts(std::string_view bus) const {
    const auto found = buses_.find(bus);
    return found == buses_.end() ? 0.0 : found->second.volts;
  }

  // Where the first bus named `bus` is in plant_.buses; nothing when no such bus was read.
  std::optional<size_t> BusIndex(std::string_view bus) const {
    const auto found = buses_.find(bus);
    return found == buses_.end() ? std::nullopt : found->second.index;
  }

  // `kv` of equipment at a bus: the bus kv by default. A rated voltage beyond 0.5..2 times the
  // bus voltage is almost always a V/kV slip, so it is an error.
  double RatedVolts(MappingReader& r, std::string_view bus) {
    const double bus_volts = BusVolts(bus);
    const std::optional<double> rated = r.Number("kv");
    if (!rated) return bus_volts;
    if (bus_volts > 0 && (*rated < 0.5 * bus_volts || *rated > 2.0 * bus_volts)) {
      r.Error("kv", fmt::format("kv {:g} kV is far from the {:g} kV of bus `{}`; a rated voltage "
                                "lies within 0.5 to 2 times its bus voltage",
                                *rated / 1e3, bus_volts / 1e3, bus));
    }
    return *rated;
  }

  std::vector<HarmonicEntry> ReadHarmonics(MappingReader& r, std::string_view key) {
    std::vector<HarmonicEntry> table;
    const YamlNode rows = r.List(key);
    const std::string& file = r.FileOf(key);
    for (const YamlNode& node : rows) {
      std::optional<MappingReader> row =
          ReadMapping(node, file, "harmonic entry", kHarmonicKeys, diagnostics_);
      if (!row) continue;
      HarmonicEntry entry;
      entry.where = row->where();
      row->Read("order", &entry.order);
      if (const std::optional<double> fraction = row->Number("percent")) {
        entry.percent = *fraction * 100.0;
      }
      row->Read("angle", &entry.angle_deg);
      CheckOrder(*row, entry, table);
      table.push_back(entry);
    }
    return table;
  }

  void CheckOrder(MappingReader& row, const HarmonicEntry& entry,
                  const std::vector<HarmonicEntry>& earlier) {
    const auto same = std::ranges::find(earlier, entry.order, &HarmonicEntry::order);
    if (entry.order > 0 && same != earlier.end()) {
      row.Error("order", fmt::format("order {} is listed twice; first at line {}", entry.order,
                                     same->where.line));
    }
  }

  Supply ReadSupply(MappingReader& r) {
    Supply supply;
    supply.where = r.where();
    supply.name = ReadName(r);
    supply.bus = ReadBusName(r, "bus");
    r.Read("short_circuit", &supply.short_circuit_va);
    r.Read("x_over_r", &supply.x_over_r);
    r.Read("voltage", &supply.voltage_pu);
    r.Read("angle", &supply.angle_deg);
    supply.background = ReadHarmonics(r, "background");
    return supply;
  }

  Generator ReadGenerator(MappingReader& r) {
    Generator generator;
    generator.where = r.where();
    generator.name = ReadName(r);
    generator.bus = ReadBusName(r, "bus");
    r.Read("rating", &generator.rating_va);
    r.Read("x2", &generator.x2_pu);
    r.Read("x_over_r", &generator.x_over_r);
    r.Read("voltage", &generator.voltage_pu);
    r.Read("angle", &generator.angle_deg);
    return generator;
  }

  Bus ReadBus(MappingReader& r) {
    Bus bus;
    bus.where = r.where();
    const std::string_view name = ReadName(r);
    bus.name = name;
    r.Read("kv", &bus.nominal_v);
    BusEntry& entry = buses_[name];  // the first bus of a name counts; a repeat is reported
    if (!entry.index) entry = {bus.nominal_v, plant_.buses.size()};  // pushed next
    return bus;
  }

  void CheckBranchEnds(MappingReader& r, const std::string& from, const std::string& to) {
    if (!from.empty() && from == to) {
      r.Error("to", fmt::format("{} connects bus `{}` to itself", r.title(), from));
    }
  }

  Transformer ReadTransformer(MappingReader& r) {
    Transformer transformer;
    transformer.where = r.where();
    transformer.name = ReadName(r);
    transformer.from = ReadBusName(r, "from");
    transformer.to = ReadBusName(r, "to");
    r.Read("rating", &transformer.rating_va);
    r.Read("impedance", &transformer.impedance);
    r.Read("x_over_r", &transformer.x_over_r);
    if (const std::optional<std::string_view> code = r.Text("connection")) {
      std::string error;
      if (std::optional<VectorGroup> group = ParseVectorGroup(*code, &error)) {
        transformer.connection = std::move(*group);
      } else {
        r.Error("connection", fmt::format("connection: {}", error));
      }
    }
    r.Read("tap", &transformer.tap);
    r.Read("eddy_loss", &transformer.eddy_loss);
    CheckBranchEnds(r, transformer.from, transformer.to);
    CheckHighVoltageSide(r, transformer);
    return transformer;
  }

  void CheckHighVoltageSide(MappingReader& r, const Transformer& transformer) {
    const double from_volts = BusVolts(transformer.from);
    const double to_volts = BusVolts(transformer.to);
    if (from_volts > 0 && to_volts > 0 && from_volts < to_volts) {
      r.Error("from", fmt::format("transformer `{}` is upside down: `from` bus `{}` ({:g} kV) is "
                                  "below `to` bus `{}` ({:g} kV); `from` is the high-voltage side",
                                  transformer.name, transformer.from, from_volts / 1e3,
                                  transformer.to, to_volts / 1e3));
    }
  }

  Cable ReadCable(MappingReader& r) {
    Cable cable;
    cable.where = r.where();
    cable.name = ReadName(r);
    cable.from = ReadBusName(r, "from");
    cable.to = ReadBusName(r, "to");
    r.Read("length", &cable.length_m);
    r.Read("r", &cable.r_ohm_per_m);
    r.Read("x", &cable.x_ohm_per_m);
    r.Read("c", &cable.c_f_per_m);
    r.Read("runs", &cable.runs);
    CheckBranchEnds(r, cable.from, cable.to);
    return cable;
  }

  Capacitor ReadCapacitor(MappingReader& r) {
    Capacitor capacitor;
    capacitor.where = r.where();
    capacitor.name = ReadName(r);
    capacitor.bus = ReadBusName(r, "bus");
    r.Read("rating", &capacitor.rating_var);
    capacitor.rated_v = RatedVolts(r, capacitor.bus);
    r.Read("steps", &capacitor.steps);
    capacitor.steps_on = capacitor.steps;
    r.Read("steps_on", &capacitor.steps_on);
    if (capacitor.steps_on > capacitor.steps) {
      r.Error("steps_on", fmt::format("steps_on {} is more than the {} steps of the bank",
                                      capacitor.steps_on, capacitor.steps));
    }
    ReadDetuning(r, &capacitor.detuning);
    r.Read("x_over_r", &capacitor.x_over_r);
    return capacitor;
  }

  // `detuning` p or `tuned_order` h_t, stored as p = 1 / h_t^2 (X_L = X_C / h_t^2 at the
  // fundamental puts the series resonance at h_t).
  void ReadDetuning(MappingReader& r, double* detuning) {
    if (r.Has("detuning") && r.Has("tuned_order")) {
      r.Error("tuned_order",
              "give `detuning` or `tuned_order`, not both (one follows from the "
              "other: detuning = 1 / tuned_order^2)");
      return;
    }
    r.Read("detuning", detuning);
    if (const std::optional<double> order = r.Number("tuned_order")) {
      *detuning = 1.0 / (*order * *order);
    }
  }

  Filter ReadFilter(MappingReader& r) {
    Filter filter;
    filter.where = r.where();
    filter.name = ReadName(r);
    filter.bus = ReadBusName(r, "bus");
    r.Read("type", FilterTypeChoices(), &filter.type);
    r.Read("rating", &filter.rating_var);
    filter.rated_v = RatedVolts(r, filter.bus);
    r.Read("tuned_order", &filter.tuned_order);
    filter.quality = filter.type == FilterType::kHighPass ? 1.0 : 40.0;
    r.Read("quality", &filter.quality);
    return filter;
  }

  Motor ReadMotor(MappingReader& r) {
    Motor motor;
    motor.where = r.where();
    motor.name = ReadName(r);
    motor.bus = ReadBusName(r, "bus");
    if (const std::optional<Quantity> rating = r.QuantityOf("rating")) {
      motor.rating = rating->value;
      motor.rating_is_kva = rating->kind == QuantityKind::kApparentPower;
    }
    motor.rated_v = RatedVolts(r, motor.bus);
    r.Read("count", &motor.count);
    r.Read("loading", &motor.loading);
    r.Read("locked_rotor_reactance", &motor.locked_rotor_reactance_pu);
    r.Read("x_over_r", &motor.x_over_r);
    r.Read("efficiency", &motor.efficiency);
    r.Read("power_factor", &motor.power_factor);
    return motor;
  }

  Load ReadLoad(MappingReader& r) {
    Load load;
    load.where = r.where();
    load.name = ReadName(r);
    load.bus = ReadBusName(r, "bus");
    r.Read("p", &load.p_w);
    r.Read("q", &load.q_var);
    r.Read("count", &load.count);
    r.Read("model", LoadModelChoices(), &load.model);
    return load;
  }

  Drive ReadDrive(MappingReader& r) {
    Drive drive;
    drive.where = r.where();
    drive.name = ReadName(r);
    drive.bus = ReadBusName(r, "bus");
    r.Read("count", &drive.count);
    r.Read("power", &drive.power_w);
    r.Read("loading", &drive.loading);
    if (const std::optional<FrontEnd> front_end = r.Choose("front_end", FrontEndChoices())) {
      drive.front_end = *front_end;
      CheckFrontEndKeys(r, *front_end);
    }
    if (const std::optional<int> pulses = r.Integer("pulses")) {
      if (*pulses % 6 != 0) {
        r.Error("pulses", fmt::format("pulses must be 12, 18 or 24; got {}", *pulses));
      }
      drive.pulses = *pulses;
    }
    drive.line_reactor = ReadReactor(r, "line_reactor");
    drive.dc_choke = ReadReactor(r, "dc_choke");
    r.Read("dc_capacitance", &drive.dc_capacitance_f);
    r.Read("imbalance", &drive.imbalance);
    r.Read("firing_angle", &drive.firing_angle_deg);
    drive.harmonics = ReadHarmonics(r, "harmonics");
    r.Read("displacement_pf", &drive.displacement_pf);
    return drive;
  }

  static ReactorSpec ReadReactor(MappingReader& r, std::string_view key) {
    ReactorSpec reactor;
    if (const std::optional<Quantity> value = r.QuantityOf(key)) {
      reactor.kind = value->kind == QuantityKind::kInductance ? ReactorSpec::Kind::kHenry
                                                              : ReactorSpec::Kind::kFraction;
      reactor.value = value->value;
    }
    return reactor;
  }

  void CheckFrontEndKeys(MappingReader& r, FrontEnd front_end) {
    const std::string name = ToString(front_end);
    for (const FrontEndRule& rule : kFrontEndRules) {
      if (r.Has(rule.key) && !(rule.allowed & Bit(front_end))) {
        r.Error(rule.key, fmt::format("`{}` does not apply to front_end `{}`{}", rule.key, name,
                                      rule.why_not));
      }
      if (!r.Has(rule.key) && (rule.required & Bit(front_end))) {
        r.Error("front_end", fmt::format("front_end `{}` needs `{}`", name, rule.key));
      }
    }
  }

  // Every bus must reach a supply or generator through transformers and cables. After a bad bus
  // reference the network is not known well enough to judge, and the check would only echo it.
  void CheckSources(const SourceLocation& top_where) {
    if (plant_.buses.empty()) {
      diagnostics_->Error(top_where, "the plant has no buses");
      return;
    }
    if (plant_.supplies.empty() && plant_.generators.empty()) {
      diagnostics_->Error(top_where, "the plant has no supply or generator");
      return;
    }
    if (!topology_unsure_) CheckIslands();
  }

  void CheckIslands() {
    std::vector<size_t> parent(plant_.buses.size());
    std::iota(parent.begin(), parent.end(), size_t{0});
    const auto root = [&parent](size_t i) {
      while (parent[i] != i) i = parent[i] = parent[parent[i]];
      return i;
    };
    const auto join = [&](const std::string& a, const std::string& b) {
      const std::optional<size_t> from = BusIndex(a);
      const std::optional<size_t> to = BusIndex(b);
      if (from && to) parent[root(*from)] = root(*to);
    };
    for (const Transformer& t : plant_.transformers) join(t.from, t.to);
    for (const Cable& c : plant_.cables) join(c.from, c.to);
    std::vector<bool> fed(parent.size(), false);
    const auto feed = [&](const std::string& bus) {
      if (const std::optional<size_t> i = BusIndex(bus)) fed[root(*i)] = true;
    };
    for (const Supply& s : plant_.supplies) feed(s.bus);
    for (const Generator& g : plant_.generators) feed(g.bus);
    std::unordered_map<size_t, std::vector<std::string>> islands;
    std::vector<size_t> first_bus;  // of each island, in the order buses were written
    for (size_t i = 0; i < parent.size(); ++i) {
      const size_t island = root(i);
      if (fed[island] || plant_.buses[i].name.empty()) continue;  // unnamed: reported already
      if (islands[island].empty()) first_bus.push_back(i);
      islands[island].push_back(plant_.buses[i].name);
    }
    for (size_t i : first_bus) ReportIsland(plant_.buses[i], islands[root(i)]);
  }

  void ReportIsland(const Bus& bus, const std::vector<std::string>& members) {
    std::string listed;
    for (size_t i = 0; i < members.size() && i < 4; ++i) {
      listed += (i ? ", " : "") + members[i];
    }
    if (members.size() > 4) listed += ", ...";
    diagnostics_->Error(
        bus.where, fmt::format("bus `{}` is in an island with no supply or generator ({} bus{}: "
                               "{}); connect it by a transformer or cable, or remove it",
                               bus.name, members.size(), members.size() == 1 ? "" : "es", listed));
  }

  std::string file_name_;
  Diagnostics* diagnostics_;
  Plant plant_;
  // Names are views into the YAML tree, which outlives the builder.
  std::unordered_map<std::string_view, BusEntry> buses_;
  std::vector<std::string_view> sorted_bus_names_;
  std::unordered_map<std::string_view, NameUse> names_;
  bool topology_unsure_ = false;  // a bus reference or element could not be read
};

}  // namespace

Plant BuildPlant(const RawPlant& raw, const std::string& file_name, Diagnostics* diagnostics) {
  return PlantBuilder(file_name, diagnostics).Build(raw);
}

}  // namespace overtone::internal
