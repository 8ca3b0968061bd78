#include "io/simulation_spec.h"

#include <fmt/format.h>
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <charconv>
#include <chrono>
#include <cmath>
#include <fstream>
#include <limits>
#include <optional>
#include <set>
#include <sstream>

#include "core/error.h"
#include "core/names.h"
#include "io/yaml_reader.h"

namespace lagsieve {
namespace {

// Days since 1970-01-01 of a YYYY-MM-DD date that exists; std::nullopt otherwise.
std::optional<long long> parse_date(const std::string& s) {
  if (s.size() != 10 || s[4] != '-' || s[7] != '-') return std::nullopt;
  int parts[3] = {0, 0, 0};
  const size_t starts[3] = {0, 5, 8}, widths[3] = {4, 2, 2};
  for (int k = 0; k < 3; ++k) {
    const char* b = s.data() + starts[k];
    const auto [p, ec] = std::from_chars(b, b + widths[k], parts[k]);
    if (ec != std::errc() || p != b + widths[k]) return std::nullopt;
  }
  const std::chrono::year_month_day ymd{std::chrono::year{parts[0]},
                                        std::chrono::month{static_cast<unsigned>(parts[1])},
                                        std::chrono::day{static_cast<unsigned>(parts[2])}};
  if (!ymd.ok()) return std::nullopt;
  return std::chrono::sys_days{ymd}.time_since_epoch().count();
}

using Reader = YamlReader;

const std::vector<std::string> kTopKeys{"target",    "n",           "seed",      "start_date",
                                        "frequency", "time_column", "decimals",  "burn_in",
                                        "constant",  "noise",       "integrate", "inputs"};
const std::vector<std::string> kNoiseKeys{"ar",          "ma",     "seasonal_ar",
                                          "seasonal_ma", "period", "sigma"};
const std::vector<std::string> kIntegrateKeys{"regular", "seasonal", "period"};
const std::vector<std::string> kInputKeys{"name",  "event", "at", "delay", "omega",
                                          "delta", "mean",  "ar", "sd",    "cycle"};
const std::vector<std::string> kCycleKeys{"amplitude", "period", "peak"};

// Limits that catch typos (delay: 400 for 4) before they turn into a huge or silly simulation.
constexpr int kMaxRows = 10'000'000;
constexpr int kMaxDelay = 500;
constexpr size_t kMaxCoefficients = 25;

void read_noise(const Reader& rd, const YAML::Node& node, SimulationSpec& spec) {
  rd.check_map(node, "noise", kNoiseKeys);
  auto coefficients = [&](const char* key, std::vector<double>& out) {
    if (const auto n = node[key]) {
      out = rd.get_list(n, key_path("noise", key));
      if (out.size() > kMaxCoefficients)
        rd.fail(n, key_path("noise", key),
                fmt::format("{} coefficients; at most {}", out.size(), kMaxCoefficients));
    }
  };
  coefficients("ar", spec.phi);
  coefficients("ma", spec.theta);
  coefficients("seasonal_ar", spec.seasonal_phi);
  coefficients("seasonal_ma", spec.seasonal_theta);
  if (const auto n = node["period"]) spec.noise.period = rd.get_int(n, "noise.period", 1, 10000);
  if (const auto n = node["sigma"]) {
    spec.sigma = rd.get_double(n, "noise.sigma");
    if (spec.sigma < 0.0) rd.fail(n, "noise.sigma", "must be >= 0 (a standard deviation)");
  }
  if ((!spec.seasonal_phi.empty() || !spec.seasonal_theta.empty()) && spec.noise.period < 2)
    rd.fail(node, "noise.period",
            "seasonal AR/MA terms need `period` of at least 2 (e.g. 7 for a weekly pattern in "
            "daily data)");
  spec.noise.p = static_cast<int>(spec.phi.size());
  spec.noise.q = static_cast<int>(spec.theta.size());
  spec.noise.seasonal_p = static_cast<int>(spec.seasonal_phi.size());
  spec.noise.seasonal_q = static_cast<int>(spec.seasonal_theta.size());
}

void read_integrate(const Reader& rd, const YAML::Node& node, Differencing& diff) {
  rd.check_map(node, "integrate", kIntegrateKeys);
  if (const auto n = node["regular"]) diff.regular = rd.get_int(n, "integrate.regular", 0, 2);
  if (const auto n = node["seasonal"]) diff.seasonal = rd.get_int(n, "integrate.seasonal", 0, 2);
  if (const auto n = node["period"]) diff.period = rd.get_int(n, "integrate.period", 1, 10000);
  if (diff.seasonal > 0 && diff.period < 2)
    rd.fail(node, "integrate.period", "a seasonal integration needs `period` of at least 2");
}

// `at` of an event: a 0-based row, or (with start_date) a date, mapped to the first row at or
// after it, as a run config maps it.
int event_row(const Reader& rd, const YAML::Node& node, const std::string& path,
              const SimulationSpec& spec, const YAML::Node& start_node) {
  rd.require_scalar(node, path, "a row index or a date");
  const auto& text = node.Scalar();
  if (const auto day = parse_date(text)) {
    if (spec.start_date.empty())
      rd.fail(node, path, "a date needs `start_date` at the top level; or give a 0-based row");
    const long long first = *parse_date(spec.start_date);
    const long long step = spec.frequency == SimulatedFrequency::weekly ? 7 : 1;
    if (*day < first)
      rd.fail(node, path,
              fmt::format("{} is before start_date {} (line {})", text, spec.start_date,
                          start_node.Mark().line + 1));
    return static_cast<int>((*day - first + step - 1) / step);
  }
  if (text.size() == 10 && text[4] == '-')
    rd.fail(node, path, fmt::format("'{}' is not a date that exists", text));
  return rd.get_int(node, path, 0);
}

SimulatedInput read_input(const Reader& rd, const YAML::Node& node, const std::string& path,
                          const SimulationSpec& spec, const YAML::Node& start_node) {
  rd.check_map(node, path, kInputKeys);
  SimulatedInput in;
  if (!node["name"]) rd.fail(node, path, "missing key `name` (the column or event name)");
  in.name = rd.get_string(node["name"], key_path(path, "name"));
  if (in.name == spec.target)
    rd.fail(node["name"], key_path(path, "name"),
            fmt::format("'{}' is the target's name; give the input another", in.name));
  if (const auto ev = node["event"]) {
    in.is_event = true;
    const auto choices = enum_choices<EventShape>();
    rd.require_scalar(ev, key_path(path, "event"), "one of " + join_comma(choices));
    const auto shape = parse_enum<EventShape>(ev.Scalar());
    if (!shape) {
      const auto guess = closest_match(ev.Scalar(), choices);
      rd.fail(ev, key_path(path, "event"),
              fmt::format("unknown shape '{}'; {}choose one of: {}", ev.Scalar(),
                          guess.empty() ? "" : fmt::format("did you mean '{}'? ", guess),
                          join_comma(choices)));
    }
    in.shape = *shape;
    if (!node["at"])
      rd.fail(node, path, "an event needs `at`: a 0-based row, or a date with start_date");
    in.at_row = event_row(rd, node["at"], key_path(path, "at"), spec, start_node);
    if (in.at_row >= spec.n)
      rd.fail(node["at"], key_path(path, "at"),
              fmt::format("row {} is not inside the {} simulated rows (0..{})", in.at_row, spec.n,
                          spec.n - 1));
    for (const char* key : {"mean", "ar", "sd", "cycle"})
      if (node[key])
        rd.fail(node[key], key_path(path, key),
                "only for random inputs; an event has fixed values (remove it)");
  } else {
    if (node["at"])
      rd.fail(node["at"], key_path(path, "at"), "only for events (add `event: step|pulse|ramp`)");
    if (const auto n = node["mean"]) in.mean = rd.get_double(n, key_path(path, "mean"));
    if (const auto n = node["ar"]) {
      in.ar = rd.get_double(n, key_path(path, "ar"));
      if (!(std::abs(in.ar) < 1.0))
        rd.fail(n, key_path(path, "ar"), fmt::format("{} must lie strictly between -1 and 1", in.ar));
    }
    if (const auto n = node["sd"]) {
      in.sd = rd.get_double(n, key_path(path, "sd"));
      if (in.sd < 0.0) rd.fail(n, key_path(path, "sd"), "must be >= 0 (a standard deviation)");
    }
    if (const auto c = node["cycle"]) {
      const auto cpath = key_path(path, "cycle");
      rd.check_map(c, cpath, kCycleKeys);
      if (!c["amplitude"] || !c["period"])
        rd.fail(c, cpath, "a cycle needs `amplitude` and `period` (rows per cycle)");
      in.cycle_amplitude = rd.get_double(c["amplitude"], key_path(cpath, "amplitude"));
      in.cycle_period = rd.get_double(c["period"], key_path(cpath, "period"));
      if (!(in.cycle_period > 0.0))
        rd.fail(c["period"], key_path(cpath, "period"), "must be > 0 (rows per cycle)");
      if (const auto n = c["peak"]) in.cycle_peak = rd.get_double(n, key_path(cpath, "peak"));
    }
  }
  if (const auto n = node["delay"])
    in.order.delay = rd.get_int(n, key_path(path, "delay"), 0, kMaxDelay);
  if (const auto n = node["omega"]) in.params.omega = rd.get_list(n, key_path(path, "omega"));
  if (in.params.omega.empty()) in.params.omega = {0.0};  // no omega: an irrelevant input
  if (const auto n = node["delta"]) in.params.delta = rd.get_list(n, key_path(path, "delta"));
  if (in.params.omega.size() > kMaxCoefficients || in.params.delta.size() > 4)
    rd.fail(node, path, fmt::format("at most {} omega and 4 delta values", kMaxCoefficients));
  in.order.numerator = static_cast<int>(in.params.omega.size()) - 1;
  in.order.denominator = static_cast<int>(in.params.delta.size());
  return in;
}

}  // namespace

SimulationFile parse_simulation_spec(std::string_view yaml_text, const std::string& source) {
  const Reader rd(source);
  YAML::Node root;
  try {
    root = YAML::Load(std::string(yaml_text));
  } catch (const YAML::Exception& e) {
    throw InputError(fmt::format("{}:{}: YAML syntax error: {}; check indentation and quoting",
                                 source, e.mark.is_null() ? 0 : e.mark.line + 1, e.msg));
  }
  if (!root || root.IsNull())
    throw InputError(
        fmt::format("{}: the simulation spec is empty; it needs at least `inputs` "
                    "or `noise`",
                    source));
  rd.check_map(root, "", kTopKeys);

  SimulationFile file;
  SimulationSpec& spec = file.spec;
  if (const auto n = root["target"]) spec.target = rd.get_string(n, "target");
  if (const auto n = root["n"]) spec.n = rd.get_int(n, "n", 1, kMaxRows);
  if (const auto n = root["seed"])
    spec.seed = static_cast<std::uint64_t>(
        rd.get_integer(n, "seed", 0, std::numeric_limits<long long>::max()));
  if (const auto n = root["start_date"]) {
    spec.start_date = rd.get_string(n, "start_date");
    if (!parse_date(spec.start_date))
      rd.fail(
          n, "start_date",
          fmt::format("'{}' is not a date; write YYYY-MM-DD (e.g. 2022-01-01)", spec.start_date));
  }
  if (const auto n = root["frequency"]) {
    const auto text = rd.get_string(n, "frequency");
    if (text == "daily") {
      spec.frequency = SimulatedFrequency::daily;
    } else if (text == "weekly") {
      spec.frequency = SimulatedFrequency::weekly;
    } else {
      const auto guess = closest_match(text, {"daily", "weekly"});
      rd.fail(n, "frequency",
              fmt::format("unknown value '{}'; {}choose daily or weekly", text,
                          guess.empty() ? "" : fmt::format("did you mean '{}'? ", guess)));
    }
    if (spec.start_date.empty())
      rd.fail(n, "frequency", "only used with `start_date`; add one or remove this");
  }
  file.time_column = spec.start_date.empty() ? "t" : "date";
  if (const auto n = root["time_column"]) file.time_column = rd.get_string(n, "time_column");
  if (file.time_column == spec.target)
    rd.fail(root["time_column"] ? root["time_column"] : root, "time_column",
            fmt::format("'{}' is also the target's name", file.time_column));
  if (const auto n = root["decimals"]) file.decimals = rd.get_int(n, "decimals", 0, 17);
  if (const auto n = root["burn_in"]) spec.burn_in = rd.get_int(n, "burn_in", 0, kMaxRows);
  if (const auto n = root["constant"]) spec.constant = rd.get_double(n, "constant");
  if (const auto n = root["noise"]) read_noise(rd, n, spec);
  if (const auto n = root["integrate"]) read_integrate(rd, n, spec.integrate);
  if (spec.burn_in < spec.integrate.lost())
    rd.fail(root["burn_in"] ? root["burn_in"] : root, "burn_in",
            fmt::format("must be at least {} (the rows the integration consumes)",
                        spec.integrate.lost()));

  if (const auto n = root["inputs"]; n && !n.IsNull()) {
    if (!n.IsSequence())
      rd.fail(n, "inputs",
              fmt::format("expected a list of inputs (each `- name: ...`), got {}",
                          Reader::describe(n)));
    std::set<std::string> names;
    for (size_t i = 0; i < n.size(); ++i) {
      const auto path = fmt::format("inputs[{}]", i);
      auto in = read_input(rd, n[i], path, spec, root["start_date"]);
      if (in.name == file.time_column)
        rd.fail(n[i], path, fmt::format("'{}' is the time column's name", in.name));
      if (!names.insert(in.name).second)
        rd.fail(n[i], path, fmt::format("input '{}' is listed twice", in.name));
      spec.inputs.push_back(std::move(in));
    }
  }
  return file;
}

SimulationFile load_simulation_spec(const std::filesystem::path& file) {
  std::error_code ec;
  if (!std::filesystem::exists(file, ec))
    throw InputError(
        fmt::format("simulation spec '{}' does not exist; check the path", file.string()));
  if (std::filesystem::is_directory(file, ec))
    throw InputError(
        fmt::format("simulation spec '{}' is a folder; give the YAML file", file.string()));
  std::ifstream in(file, std::ios::binary);
  if (!in)
    throw InputError(
        fmt::format("cannot read simulation spec '{}'; check its permissions", file.string()));
  std::ostringstream buffer;
  buffer << in.rdbuf();
  return parse_simulation_spec(buffer.str(), file.string());
}

std::string simulated_csv(const SimulationFile& file, const SeriesData& data) {
  const auto& inputs = file.spec.inputs;
  if (data.inputs.size() != inputs.size())
    throw InputError(fmt::format("simulated data hold {} inputs but the spec names {}",
                                 data.inputs.size(), inputs.size()));
  std::vector<size_t> columns;  // event inputs are regenerated by a run config, not stored
  for (size_t i = 0; i < inputs.size(); ++i)
    if (!inputs[i].is_event) columns.push_back(i);

  std::string out = file.time_column + "," + data.target_name;
  for (size_t i : columns) out += "," + data.input_names[i];
  out += '\n';
  auto number = [&](double v) {
    std::string s = fmt::format("{:.{}f}", v, file.decimals);
    // "-0.000" reads back as 0 anyway; write it as such so the file does not look odd.
    if (s.find_first_not_of("-0.") == std::string::npos && s[0] == '-') s.erase(0, 1);
    return s;
  };
  for (int r = 0; r < data.rows(); ++r) {
    out += data.time[static_cast<size_t>(r)];
    out += ',';
    out += number(data.target[static_cast<size_t>(r)]);
    for (size_t i : columns) {
      out += ',';
      out += number(data.inputs[i][static_cast<size_t>(r)]);
    }
    out += '\n';
  }
  return out;
}

}  // namespace lagsieve
