// The YAML config reader: defaults, accepted forms, and the messages for bad configs.
#include <gtest/gtest.h>

#include <string>

#include "core/error.h"
#include "core/names.h"
#include "io/config.h"

namespace lagsieve {
namespace {

const std::filesystem::path kFile = "/cfg/dir/config.yaml";

std::string error_of(const std::string& yaml) {
  try {
    parse_config(yaml, kFile);
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

constexpr const char* kHead = "data: {file: d.csv}\ntarget: {column: y}\n";

TEST(Config, FullExampleParses) {
  const auto c = parse_config(R"(
data:    {file: heat.csv, time: date, missing: interpolate}
target:  {column: heat_mwh, transform: boxcox, lambda: 0.5}
differencing: {regular: 1, seasonal: 1, period: 7}
inputs:
  - column: outdoor_temp
    delay: [0, 4]
    numerator: [0, 2]
    denominator: [0, 1]
    optional: true
    future: forecast
    known_steps: 2
    model: {ar: 1, ma: 0}
  - event: tariff_change
    shape: step
    at: 2024-03-01
    delay: 0
    numerator: [0, 1]
    denominator: [0, 1]
noise:   {ar: [0, 2], ma: [0, 2], seasonal_ar: 0, seasonal_ma: [0, 1], constant: auto}
search:  {strategy: guided, criterion: aicc, budget: 500, threads: 2}
backtest: {first_origin: 400, step: 7, horizon: 14, window: sliding, window_length: 300, refit: 0, shortlist: 20, levels: [0.95, 0.8], score: rmse}
forecast: {horizon: 28, levels: [0.5]}
output:  {dir: ../runs/demo}
)",
                              kFile);
  EXPECT_EQ(c.config_file, kFile);
  EXPECT_EQ(c.data.file, std::filesystem::path("/cfg/dir/heat.csv"));
  EXPECT_EQ(c.data.time, "date");
  EXPECT_EQ(c.data.missing, MissingPolicy::interpolate);
  EXPECT_EQ(c.target.columns, std::vector<std::string>{"heat_mwh"});
  EXPECT_EQ(c.target.transform.kind, TransformKind::boxcox);
  EXPECT_EQ(c.target.transform.lambda, 0.5);
  EXPECT_EQ(c.differencing.regular, 1);
  EXPECT_EQ(c.differencing.seasonal, 1);
  EXPECT_EQ(c.differencing.period, 7);
  ASSERT_EQ(c.inputs.size(), 2u);
  const auto& a = c.inputs[0];
  EXPECT_EQ(a.name, "outdoor_temp");
  EXPECT_FALSE(a.is_event);
  EXPECT_EQ(a.delay, (IntRange{0, 4}));
  EXPECT_EQ(a.numerator, (IntRange{0, 2}));
  EXPECT_EQ(a.denominator, (IntRange{0, 1}));
  EXPECT_TRUE(a.optional);
  EXPECT_EQ(a.future, FutureMode::forecast);
  EXPECT_EQ(a.known_steps, 2);
  EXPECT_EQ(a.own_model.p, 1);
  EXPECT_EQ(a.own_model.q, 0);
  EXPECT_EQ(a.line, 6);
  const auto& e = c.inputs[1];
  EXPECT_TRUE(e.is_event);
  EXPECT_EQ(e.name, "tariff_change");
  EXPECT_EQ(e.shape, EventShape::step);
  EXPECT_EQ(e.at, "2024-03-01");
  EXPECT_EQ(e.delay, (IntRange{0, 0}));
  EXPECT_EQ(e.line, 14);
  EXPECT_EQ(c.noise.ar, (IntRange{0, 2}));
  EXPECT_EQ(c.noise.seasonal_ma, (IntRange{0, 1}));
  EXPECT_EQ(c.noise.period, 7);  // from differencing.period
  EXPECT_EQ(c.noise.constant, ConstantMode::automatic);
  EXPECT_EQ(c.search.strategy, Strategy::guided);
  EXPECT_EQ(c.search.criterion, Criterion::aicc);
  EXPECT_EQ(c.search.budget, 500);
  EXPECT_EQ(c.search.threads, 2);
  EXPECT_TRUE(c.backtest.enabled);
  EXPECT_EQ(c.backtest.first_origin, 400);
  EXPECT_EQ(c.backtest.window, WindowKind::sliding);
  EXPECT_EQ(c.backtest.window_length, 300);
  EXPECT_EQ(c.backtest.refit, 0);
  EXPECT_EQ(c.backtest.levels, (std::vector<double>{0.8, 0.95}));  // sorted
  EXPECT_EQ(c.backtest.score, "rmse");
  EXPECT_EQ(c.forecast.horizon, 28);
  EXPECT_EQ(c.forecast.levels, std::vector<double>{0.5});
  EXPECT_EQ(c.output.dir, std::filesystem::path("/cfg/runs/demo"));
  // |b| x |s| x |r| + 1 = 31 and 1 x 2 x 2 = 4 for the inputs; 3 x 3 x 1 x 2 x 2 for the noise.
  EXPECT_EQ(candidate_grid_size(c), 31LL * 4 * 3 * 3 * 1 * 2 * 2);
}

TEST(Config, MinimalConfigTakesDefaults) {
  const auto c = parse_config(kHead, kFile);
  EXPECT_EQ(c.data.time, "");
  EXPECT_EQ(c.data.missing, MissingPolicy::skip);
  EXPECT_EQ(c.data.input_policy(), MissingPolicy::error);
  EXPECT_EQ(c.data.gaps, GapPolicy::insert);
  EXPECT_EQ(c.target.transform.kind, TransformKind::none);
  EXPECT_TRUE(c.inputs.empty());
  EXPECT_EQ(c.noise.period, 1);
  EXPECT_EQ(c.noise.constant, ConstantMode::automatic);
  EXPECT_FALSE(c.backtest.enabled);
  EXPECT_EQ(c.search.criterion, Criterion::bic);
  EXPECT_EQ(c.output.dir, std::filesystem::path("/cfg/dir/runs/out"));
  EXPECT_EQ(candidate_grid_size(c), 2);
  EXPECT_EQ(c.fit.filter_start, FilterStart::estimated);
  EXPECT_EQ(parse_config(kHead + std::string("fit: {filter_start: zero}\n"), kFile).fit.filter_start,
            FilterStart::zero);
  EXPECT_EQ(c.fit.estimation, Estimation::ml);
  EXPECT_EQ(parse_config(kHead + std::string("fit: {estimation: restricted}\n"), kFile)
                .fit.estimation,
            Estimation::restricted);
  EXPECT_THROW(parse_config(kHead + std::string("fit: {estimation: reml}\n"), kFile), InputError);
}

TEST(Config, PanelTargetsBareBacktestConstantSpellingsAndNoisePeriod) {
  auto c = parse_config(
      "data: {file: /abs/d.csv}\ntarget: {columns: [a, b]}\nbacktest:\n"
      "differencing: {period: 12}\nnoise: {constant: false, period: 4, seasonal_ar: 1}\n",
      kFile);
  EXPECT_EQ(c.data.file, std::filesystem::path("/abs/d.csv"));
  EXPECT_EQ(c.target.columns, (std::vector<std::string>{"a", "b"}));
  EXPECT_TRUE(c.backtest.enabled);
  EXPECT_EQ(c.backtest.horizon, 1);
  EXPECT_EQ(c.noise.constant, ConstantMode::no);
  EXPECT_EQ(c.noise.period, 4);
  c = parse_config(std::string(kHead) + "noise: {constant: true}\n", kFile);
  EXPECT_EQ(c.noise.constant, ConstantMode::yes);
}

TEST(Config, LegacyStatusesKeyIsStillRead) {
  // Configs written before the rename name the statuses that may be chosen `leader_statuses`.
  const std::string h = kHead;
  const auto c = parse_config(h + "backtest: {leader_statuses: [ok, boundary]}\n", kFile);  // legacy
  EXPECT_EQ(c.backtest.chosen_statuses, (std::vector<std::string>{"ok", "boundary"}));
  EXPECT_EQ(parse_config(h + "backtest: {chosen_statuses: [ok]}\n", kFile).backtest.chosen_statuses,
            (std::vector<std::string>{"ok"}));
  EXPECT_NE(error_of(h + "backtest: {chosen_statuses: [ok], leader_statuses: [ok]}\n")  // legacy
                .find("give only chosen_statuses"),
            std::string::npos);
  EXPECT_NE(error_of(h + "backtest: {leader_statuses: [best]}\n").find("backtest.leader_statuses"),  // legacy
            std::string::npos);
}

TEST(Config, Messages) {
  const std::string h = kHead;
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    dela: 3\n"),
            "/cfg/dir/config.yaml:5: inputs[0].dela: unknown key; did you mean `delay`? (valid "
            "keys here: column, event, shape, at, delay, numerator, denominator, optional, "
            "future, known_steps, model)");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    delay: soon\n"),
            "/cfg/dir/config.yaml:5: inputs[0].delay: expected an integer or a range [min, max], "
            "got 'soon'");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    numerator: [3, 1]\n"),
            "/cfg/dir/config.yaml:5: inputs[0].numerator: range [3, 1] has min > max; write it "
            "as [1, 3]");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    delay: -1\n"),
            "/cfg/dir/config.yaml:5: inputs[0].delay: must be at least 0, got -1");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    denominator: [0, 9]\n"),
            "/cfg/dir/config.yaml:5: inputs[0].denominator: 9 is above the limit of 4; orders "
            "this large are not identifiable (check for a typo)");
  EXPECT_EQ(error_of(h + "search: {criterion: bci}\n"),
            "/cfg/dir/config.yaml:3: search.criterion: unknown value 'bci'; did you mean 'bic'? "
            "choose one of: aic, aicc, bic");
  EXPECT_EQ(error_of(h + "backtest: {levels: [0.8, 95]}\n"),
            "/cfg/dir/config.yaml:3: backtest.levels: level 95 is outside (0, 1); write "
            "coverage as a fraction, e.g. 0.95");
  EXPECT_EQ(error_of(h + "nois: {ar: 1}\n"),
            "/cfg/dir/config.yaml:3: nois: unknown key; did you mean `noise`? (valid keys here: "
            "data, target, differencing, inputs, events, noise, search, backtest, fit, "
            "forecast, outliers, revalidate, output)");
  EXPECT_EQ(error_of(h + "fit: {filter_start: zeros}\n"),
            "/cfg/dir/config.yaml:3: fit.filter_start: unknown value 'zeros'; did you mean "
            "'zero'? choose one of: estimated, zero");
  EXPECT_EQ(error_of("data: {file: d.csv}\n"), "/cfg/dir/config.yaml:1: missing section `target`");
  EXPECT_EQ(error_of("data: {file: d.csv}\ntarget: {column: y, columns: [a]}\n"),
            "/cfg/dir/config.yaml:2: target: give either `column` (one series) or `columns` (a "
            "panel), not both");
  EXPECT_EQ(error_of("data: {file: d.csv}\ntarget: {column: y, transform: boxcox}\n"),
            "/cfg/dir/config.yaml:2: target.lambda: `transform: boxcox` needs `lambda` (e.g. 0.5 "
            "for a square root; 0 is the log)");
  // Seasonal terms without a period: the period comes from the data's frequency (load.h).
  EXPECT_TRUE(parse_config(h + "differencing: {seasonal: 1}\n", kFile).differencing_period_from_data);
  EXPECT_TRUE(parse_config(h + "noise: {seasonal_ma: 1}\n", kFile).noise_period_from_data);
  EXPECT_EQ(error_of(h + "differencing: {seasonal: 1, period: 1}\n"),
            "/cfg/dir/config.yaml:3: differencing.period: a seasonal difference needs `period` "
            "of at least 2 (e.g. 7 for daily data with a weekly cycle, 12 for monthly data)");
  EXPECT_EQ(error_of(h + "noise: {seasonal_ma: 1, period: 1}\n"),
            "/cfg/dir/config.yaml:3: noise.period: seasonal AR/MA terms need a period of at "
            "least 2; set `noise.period` or `differencing.period`");
  EXPECT_EQ(error_of(h + "search: {budget: 0}\n"),
            "/cfg/dir/config.yaml:3: search.budget: must be at least 1, got 0");
  EXPECT_EQ(error_of(h + "inputs:\n  - event: e\n    shape: step\n"),
            "/cfg/dir/config.yaml:4: inputs[0]: an event needs `at`: a time stamp of the data or "
            "a row index (from 0)");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: y\n"),
            "/cfg/dir/config.yaml:4: inputs[0].column: 'y' is the target; a series cannot "
            "explain itself");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n  - column: x\n"),
            "/cfg/dir/config.yaml:5: inputs[1]: input 'x' is listed twice");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    optional: maybe\n"),
            "/cfg/dir/config.yaml:5: inputs[0].optional: expected true or false, got 'maybe'");
  EXPECT_EQ(error_of(h + "inputs:\n  - column: x\n    model: {ar: 1}\n"),
            "/cfg/dir/config.yaml:5: inputs[0].model: an input's own model is only used with "
            "`future: forecast`");
  EXPECT_EQ(error_of(h + "data: {file: e.csv}\n"),
            "/cfg/dir/config.yaml:3: data: key given twice; keep one");
  EXPECT_EQ(error_of(h + "inputs: {column: x}\n"),
            "/cfg/dir/config.yaml:3: inputs: expected a list of inputs (each `- column: ...` or "
            "`- event: ...`), got a mapping");
  EXPECT_EQ(error_of(""),
            "/cfg/dir/config.yaml: the config is empty; it needs at least `data` and `target`");
  EXPECT_NE(error_of("data: {file: [d.csv}\n").find("/cfg/dir/config.yaml:1: YAML syntax error"),
            std::string::npos);
}

TEST(Config, MissingConfigFile) {
  try {
    load_config("/nonexistent/lagsieve.yaml");
    FAIL() << "expected an InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()),
              "config file '/nonexistent/lagsieve.yaml' does not exist; check the path");
  }
}

TEST(Names, SpellingsRoundTripAndSuggestions) {
  EXPECT_EQ(to_string(ConstantMode::yes), "true");
  EXPECT_EQ(to_string(ConstantMode::no), "false");
  EXPECT_EQ(to_string(ConstantMode::automatic), "auto");
  EXPECT_EQ(to_string(TransformKind::boxcox), "boxcox");
  for (const auto& s : enum_choices<Strategy>()) EXPECT_EQ(to_string(*parse_enum<Strategy>(s)), s);
  for (const auto& s : enum_choices<WindowKind>())
    EXPECT_EQ(to_string(*parse_enum<WindowKind>(s)), s);
  EXPECT_EQ(enum_choices<EventShape>(), (std::vector<std::string>{"pulse", "step", "ramp"}));
  EXPECT_FALSE(parse_enum<Criterion>("BIC").has_value());
  EXPECT_EQ(closest_match("denominater", {"delay", "numerator", "denominator"}), "denominator");
  EXPECT_EQ(closest_match("Delay", {"delay", "numerator"}), "delay");
  EXPECT_EQ(closest_match("xyz", {"delay", "numerator"}), "");
}

}  // namespace
}  // namespace lagsieve
