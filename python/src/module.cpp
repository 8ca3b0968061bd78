// lagsieve._core: the C++ side of the Python module. Every call runs the library functions the
// CLI runs (src/cli's fit, search and folder writers included), on data that arrive as the table
// the CSV reader produces (table.h). Results cross as JSON text or plain arrays; the Pythonic
// layer (python/lagsieve) turns them into DataFrames.
#include <fmt/format.h>
#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>
#include <stdlib.h>
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "backtest/backtest.h"
#include "cli/common.h"
#include "cli/fit_run.h"
#include "cli/search_run.h"
#include "core/error.h"
#include "data/load.h"
#include "data/transform.h"
#include "forecast/forecast.h"
#include "forecast/model_file.h"
#include "io/config.h"
#include "model/past.h"
#include "model/spec_from_config.h"
#include "outliers/json.h"
#include "report/report.h"
#include "revalidate/revalidate.h"
#include "screen/screen.h"
#include "search/ranking.h"
#include "search/run_dir.h"
#include "search/run_folder.h"
#include "search/search_outliers.h"
#include "interrupt.h"
#include "objects.h"
#include "panel.h"
#include "table.h"

namespace py = pybind11;
namespace fs = std::filesystem;

namespace lagsieve::python {
namespace {

// Placeholder data.file of a config whose data come from a DataFrame: the config must name a
// file to be valid for the CLI (a model file keeps the config text), but nothing reads it.
constexpr const char* kFrameSource = "<DataFrame>";

// The config text with data.file set when it has none (the DataFrame stands in for it). Text
// that does not parse is returned unchanged, so parse_config reports the error in its words.
std::string with_data_file(const std::string& text) {
  YAML::Node root;
  try {
    root = YAML::Load(text);
  } catch (const YAML::Exception&) {
    return text;
  }
  if (!root.IsMap()) return text;
  YAML::Node data = root["data"];
  if (data && data.IsMap() && data["file"]) return text;
  if (data && !data.IsNull() && !data.IsMap()) return text;
  if (!data || data.IsNull()) root["data"] = YAML::Node(YAML::NodeType::Map);
  root["data"]["file"] = kFrameSource;
  YAML::Emitter out;
  out << root;
  return std::string(out.c_str()) + "\n";
}


RunConfig read_config(const std::string& text, const std::string& name, bool data_in_memory) {
  return parse_config(data_in_memory ? with_data_file(text) : text, name);
}

// The handle every call takes: the config read once per call of the package. A dict config
// comes with data.file already set when its data are a DataFrame (the package sets it), so its
// text is parsed once; YAML text without data.file is given one here.
ConfigPtr config_handle(const std::string& text, const std::string& name, bool data_in_memory) {
  auto c = std::make_shared<Config>();
  c->config = read_config(text, name, data_in_memory);
  return c;
}

RunPtr load_from_file(const ConfigPtr& c) {
  auto run = std::make_shared<Run>();
  run->loaded.config = c->config;
  run->loaded.series = load_series(run->loaded.config);
  apply_seasonal_default(run->loaded.config, run->loaded.series.front());
  return run;
}

RunPtr load_from_table(const ConfigPtr& c, const std::optional<std::string>& time_column,
                       const std::vector<std::string>& header, const py::list& columns,
                       bool one_series) {
  auto run = std::make_shared<Run>();
  RunConfig config = c->config;
  if (one_series) config.data.series_key.clear();  // one series' rows of a panel, key dropped
  if (!config.data.series_key.empty())
    throw InputError(fmt::format(
        "{}: data.series_key: a long-format panel is searched by lagsieve.search (a PanelRun); "
        "to fit, screen or backtest one series, pass its rows (frame[frame['{}'] == key]) with "
        "a config without data.series_key",
        config.config_file.string(), config.data.series_key));
  if (time_column && config.data.time.empty()) config.data.time = *time_column;
  const FrameTable frame = table_from_columns(kFrameSource, header, columns);
  for (const auto& column : config.target.columns)
    run->loaded.series.push_back(series_from_table(config, frame.table, column, frame.numbers));
  apply_seasonal_default(config, run->loaded.series.front());
  run->loaded.config = std::move(config);
  return run;
}


ModelPtr model_with_config(FittedModel fitted) {
  if (fitted.training.config_text.empty())
    throw InputError("the model file holds no config text to read data with");
  auto m = std::make_shared<Model>();
  m->config = parse_config(fitted.training.config_text, fitted.training.config_file);
  m->fitted = std::move(fitted);
  return m;
}

std::vector<InputFuture> futures_from(const py::dict& future) {
  std::vector<InputFuture> out;
  for (const auto& [name, values] : future) {
    const auto a = py::array_t<double, py::array::c_style | py::array::forcecast>::ensure(values);
    if (!a || a.ndim() != 1)
      throw InputError(fmt::format("future input '{}': give a one-dimensional numeric column",
                                   py::str(name).cast<std::string>()));
    const auto v = a.unchecked<1>();
    InputFuture f{name.cast<std::string>(), {}};
    for (py::ssize_t i = 0; i < v.shape(0); ++i) {
      if (!std::isfinite(v(i)))
        throw InputError(fmt::format("future input '{}': value {} (row {}) is not a finite number",
                                     f.name, v(i), i + 1));
      f.values.push_back(v(i));
    }
    out.push_back(std::move(f));
  }
  return out;
}

std::string forecast_json(const Model& m, const SeriesData& history, int horizon,
                          const py::dict& future, const std::vector<double>& levels,
                          bool parameter_uncertainty) {
  if (horizon < 1 || horizon > kMaxHorizon)
    throw InputError(fmt::format("horizon {}: must be between 1 and {}", horizon, kMaxHorizon));
  ForecastOptions options;
  options.horizon = horizon;
  if (!levels.empty()) options.levels = levels;
  options.parameter_uncertainty = parameter_uncertainty && m.config.forecast.parameter_uncertainty;
  const auto futures = futures_from(future);
  ForecastResult r;
  {
    py::gil_scoped_release unlocked;
    r = forecast(m.fitted, history, futures, options);
  }
  auto j = forecast_to_json(r);
  j["target"] = m.fitted.training.target_column;
  return j.dump();
}

// The fitted values and residuals of the fit on the rows of its likelihood sample, as past.csv
// has them: the one-step predictions on the model's scale (after the target's transform), NaN
// where the target is missing; and the standardised innovations on the rows that have one.
py::tuple residual_rows(const Fit& f) {
  const FitResult& fit = f.result.fit;
  std::vector<std::string> times, resid_times;
  std::vector<double> fitted;
  std::string scale;
  if (fit.usable()) {
    const PastFit past = explain_past(f.data(), fit.spec, fit.params, fit.start);
    scale = past.scale;
    for (size_t t = 0; t < past.rows.size(); ++t) {
      const std::string time =
          past.time.empty() || past.time[t].empty() ? std::to_string(past.rows[t] + 1) : past.time[t];
      times.push_back(time);
      fitted.push_back(past.fitted[t]);
      if (std::isfinite(past.actual[t])) resid_times.push_back(time);
    }
    resid_times.resize(std::min(resid_times.size(), fit.residuals.size()));
  }
  std::vector<double> resid(fit.residuals.begin(),
                            fit.residuals.begin() + static_cast<long>(resid_times.size()));
  return py::make_tuple(resid_times, resid, times, fitted, scale);
}

std::shared_ptr<Fit> fit_loaded(const RunPtr& run, const std::string& series) {
  auto f = std::make_shared<Fit>();
  f->run = run;
  const auto& all = run->loaded.series;
  f->series = all.size();
  for (size_t k = 0; k < all.size(); ++k)
    if (series.empty() || all[k].target_name == series) {
      f->series = k;
      break;
    }
  if (f->series == all.size())
    throw InputError(fmt::format("series '{}' is not a target of the config", series));
  {
    py::gil_scoped_release unlocked;
    f->result = cli::fit_single(run->loaded.config, all[f->series],
                                run->loaded.config.config_file.string());
  }
  return f;  // the model file's content is made when asked for (Fit::fitted)
}

std::shared_ptr<Search> search_loaded(const RunPtr& run, std::optional<int> threads,
                                      bool backtest) {
  auto s = std::make_shared<Search>();
  s->run = run;
  const RunConfig& config = run->loaded.config;
  SearchOptions options;
  options.threads = cli::checked_threads(threads, config.search.threads);
  s->scratch = std::make_unique<Scratch>();
  s->computed = run_interruptible([&](const std::atomic<bool>* cancel) {
    Journal journal(s->scratch->path() / run_files::kJournal,
                    run_fingerprint(config, run->loaded.series), false);
    options.journal = &journal;
    options.cancel = cancel;
    return cli::compute_search(run->loaded, options, backtest, true);
  });
  return s;
}

// The run folder `lagsieve search` writes, from the computed search: locked, staged, swapped in.
std::string write_search(const Search& s, const std::string& out) {
  const RunConfig& config = s.run->loaded.config;
  py::gil_scoped_release unlocked;
  RunDir dir(out, {"search", run_fingerprint(config, s.run->loaded.series), false, "write(dir)"});
  fs::copy_file(s.scratch->path() / run_files::kJournal, dir.staging() / run_files::kJournal,
                fs::copy_options::overwrite_existing);
  const auto without_model = cli::write_search_files(dir.staging(), s.run->loaded, s.computed);
  ReportOptions report_options;
  report_options.folder_name = dir.out().filename().string();
  write_report(dir.staging(), report_options);
  const std::string status = without_model.empty() ? "complete" : "no_usable_candidate";
  dir.commit(status);
  return status;
}

std::string search_summary(const Search& s) {
  nlohmann::json j = nlohmann::json::array();
  for (size_t k = 0; k < s.computed.results.size(); ++k) {
    const auto& r = s.computed.results[k];
    j.push_back({{"series", r.series},
                 {"candidates", r.rows.size()},
                 {"fitted", r.fitted},
                 {"seconds", r.seconds},
                 {"has_chosen", r.has_chosen()},
                 {"chosen", r.has_chosen() ? r.rows.front().key : ""},
                 {"sorted_by", r.sorted_by},
                 {"chosen_reason", r.chosen_reason},
                 {"warnings", warning_texts(r.warnings)},
                 {"warning_codes", warnings_json(r.warnings)},
                 {"backtest", s.computed.backtests[k].has_value()}});
  }
  return j.dump();
}

std::shared_ptr<Fit> search_chosen(const std::shared_ptr<Search>& s, size_t k) {
  if (k >= s->computed.results.size()) throw py::index_error("no such series");
  const auto& r = s->computed.results[k];
  if (!r.has_chosen()) return nullptr;
  auto f = std::make_shared<Fit>();
  f->run = s->run;
  f->series = k;
  f->result.fit = r.chosen;
  f->fitted_on = search_data(s->run->loaded.series[k], r);
  f->set_fitted(cli::chosen_model(s->run->loaded, s->computed, k));
  return f;
}

std::string backtest_table(const Search& s, size_t k, const std::string& which) {
  if (k >= s.computed.backtests.size() || !s.computed.backtests[k]) return "";
  const auto& bt = s.computed.backtests[k]->result;
  if (which == "accuracy") return accuracy_csv(bt);
  if (which == "comparisons") return comparisons_csv(bt);
  if (which == "input_value") return input_value_csv(bt);
  return backtest_csv(bt);
}

// `lagsieve backtest CONFIG --models ...` in memory: the rolling-origin backtest of model files
// (or of the config's one model) beside the seasonal naive benchmark; its tables as CSV text.
py::dict backtest_models(const RunPtr& run,
                         const std::vector<std::pair<std::string, ModelPtr>>& models,
                         std::optional<int> threads) {
  const RunConfig& config = run->loaded.config;
  if (!config.backtest.enabled)
    throw InputError(
        fmt::format("{}: the config has no `backtest:` section; add one (first_origin, "
                    "step, horizon, ...)",
                    config.config_file.string()));
  const SeriesData& data = run->loaded.series.front();
  BacktestOptions options = backtest_options(config, data.rows());
  options.threads = cli::checked_threads(threads, config.search.threads);
  std::vector<BacktestCandidate> candidates;
  for (const auto& [name, model] : models) {
    auto c = candidate_from_model(name + ": " + model_label(model->fitted.spec), model->fitted);
    if (options.refit > 0) c.fixed.reset();  // as the CLI: re-fitted at the origins
    candidates.push_back(std::move(c));
  }
  if (candidates.empty()) {
    const ModelSpec spec = single_spec(config);
    candidates.push_back(candidate_from_spec(model_label(spec), spec, config));
  }
  candidates.push_back(seasonal_naive_candidate(options.season));
  // Ctrl-C stops it before the next origin (BacktestOptions::cancel): KeyboardInterrupt.
  BacktestResult result = run_interruptible([&](const std::atomic<bool>* cancel) {
    BacktestOptions o = options;
    o.cancel = cancel;
    BacktestResult r = run_backtest(data, candidates, o);
    if (r.chosen >= 0)
      r.input_value = input_value(data, candidates[r.chosen], r.models[r.chosen], o);
    return r;
  });
  py::dict out;
  out["accuracy"] = accuracy_csv(result);
  out["backtest"] = backtest_csv(result);
  out["comparisons"] = comparisons_csv(result);
  out["input_value"] = input_value_csv(result);
  return out;
}

}  // namespace
}  // namespace lagsieve::python

using namespace lagsieve;
using namespace lagsieve::python;

PYBIND11_MODULE(_core, m) {
  m.doc() = "lagsieve's C++ core (use the package `lagsieve`, not this module)";
  // Bad input: the CLI's messages (exit code 2 there); a ValueError for Python callers.
  static py::exception<InputError> input_error(m, "InputError", PyExc_ValueError);
  static py::exception<NumericalError> numerical_error(m, "NumericalError", PyExc_ArithmeticError);
  py::register_exception_translator([](std::exception_ptr p) {
    try {
      if (p) std::rethrow_exception(p);
    } catch (const InputError& e) {
      input_error(e.what());
    } catch (const NumericalError& e) {
      numerical_error(e.what());
    } catch (const Cancelled&) {
      PyErr_SetNone(PyExc_KeyboardInterrupt);
    }
  });

  py::class_<Run, std::shared_ptr<Run>>(m, "Run")
      .def_property_readonly("targets",
                             [](const Run& r) {
                               std::vector<std::string> names;
                               for (const auto& s : r.loaded.series) names.push_back(s.target_name);
                               return names;
                             })
      .def_property_readonly("config_text", [](const Run& r) { return r.loaded.config.text; })
      .def_property_readonly("output_dir",
                             [](const Run& r) { return r.loaded.config.output.dir.string(); })
      .def("screen_json", [](const Run& r, size_t k) {
        if (k >= r.loaded.series.size()) throw py::index_error("no such series");
        ScreenResult s;
        {
          py::gil_scoped_release unlocked;
          s = screen_series(r.loaded.series[k], r.loaded.config);
        }
        return to_json(s).dump();
      });

  py::class_<Config, std::shared_ptr<Config>>(m, "Config")
      .def_property_readonly("time_column", [](const Config& c) { return c.config.data.time; })
      .def_property_readonly("series_key",
                             [](const Config& c) { return c.config.data.series_key; });
  m.def("config", &config_handle, py::arg("text"), py::arg("name"), py::arg("data_in_memory"));
  m.def("config_time_column", [](const std::string& text, const std::string& name) {
    return read_config(text, name, true).data.time;
  });
  m.def("load_file", &load_from_file, py::arg("config"));
  m.def("load_table", &load_from_table, py::arg("config"), py::arg("time_column"),
        py::arg("header"), py::arg("columns"), py::arg("one_series") = false);

  py::class_<Model, std::shared_ptr<Model>>(m, "Model")
      .def("json", [](const Model& mo) { return to_json(mo.fitted).dump(); })
      .def("save", [](const Model& mo, const std::string& path) { save_model(path, mo.fitted); })
      .def_property_readonly("target",
                             [](const Model& mo) { return mo.fitted.training.target_column; })
      .def_property_readonly("time_column", [](const Model& mo) { return mo.config.data.time; })
      .def("forecast_table",
           [](const Model& mo, const std::optional<std::string>& time_column,
              const std::vector<std::string>& header, const py::list& columns, int horizon,
              const py::dict& future, const std::vector<double>& levels, bool uncertainty) {
             RunConfig config = mo.config;
             if (time_column && config.data.time.empty()) config.data.time = *time_column;
             const FrameTable frame = table_from_columns(kFrameSource, header, columns);
             const SeriesData history = series_from_table(
                 config, frame.table, mo.fitted.training.target_column, frame.numbers);
             return forecast_json(mo, history, horizon, future, levels, uncertainty);
           })
      .def("revalidate_json",
           [](const Model& mo, const RunPtr& run, std::optional<int> threads, double alpha) {
             const SeriesData* data = nullptr;
             for (const auto& s : run->loaded.series)
               if (s.target_name == mo.fitted.training.target_column) data = &s;
             if (!data)
               throw InputError(fmt::format("the data have no target column '{}' (the model's)",
                                            mo.fitted.training.target_column));
             RevalidateOptions options;
             options.alpha = alpha;
             options.threads = cli::checked_threads(threads, run->loaded.config.search.threads);
             options.validate();
             RevalidationResult r;
             {
               py::gil_scoped_release unlocked;
               r = revalidate(mo.fitted, *data, run->loaded.config, options);
             }
             return to_json(r).dump();
           });
  m.def("load_model", [](const std::string& path) { return model_with_config(load_model(path)); });

  py::class_<Fit, std::shared_ptr<Fit>>(m, "Fit")
      .def("json", &fit_json, py::arg("with_past") = false)
      .def("residual_rows", &residual_rows)
      .def("chart_dir",
           [](Fit& f) {
             py::gil_scoped_release unlocked;
             return fit_charts(f).string();
           })
      .def_property_readonly("usable", [](const Fit& f) { return f.result.fit.usable(); })
      .def("model",
           [](const Fit& f) -> ModelPtr {
             if (!f.fitted())
               throw InputError("the fit is not usable (see .status); no model to use");
             auto mo = std::make_shared<Model>();
             mo->fitted = *f.fitted();
             mo->config = f.run->loaded.config;
             return mo;
           })
      .def("forecast", [](const Fit& f, int horizon, const py::dict& future,
                          const std::vector<double>& levels, bool uncertainty) {
        if (!f.fitted()) throw InputError("the fit is not usable (see .status); no forecast");
        Model mo{*f.fitted(), f.run->loaded.config};
        return forecast_json(mo, f.run->loaded.series[f.series], horizon, future, levels,
                             uncertainty);
      });
  m.def("fit", &fit_loaded, py::arg("run"), py::arg("series") = "");

  py::class_<Search, std::shared_ptr<Search>>(m, "Search")
      .def("ranking_csv",
           [](const Search& s) {
             return ranking_csv(s.computed.all_rows, s.run->loaded.config);
           })
      .def("summary_json", &search_summary)
      .def("backtest_csv", &backtest_table)
      .def("chosen", &search_chosen)
      .def("write", &write_search)
      .def("chart_dir", [](Search& s) {
        if (!s.folder) {
          auto scratch = std::make_unique<Scratch>();
          write_search(s, (scratch->path() / "run").string());
          s.folder = std::move(scratch);
        }
        return (s.folder->path() / "run" / run_files::kCharts).string();
      });
  m.def("backtest", &backtest_models, py::arg("run"), py::arg("models"), py::arg("threads"));
  py::class_<PanelSearch, std::shared_ptr<PanelSearch>>(m, "PanelSearch")
      .def_property_readonly("keys",
                             [](const PanelSearch& p) {
                               std::vector<std::string> out;
                               for (const auto& s : p.series) out.push_back(s.series);
                               return out;
                             })
      .def_property_readonly("folders",
                             [](const PanelSearch& p) {
                               std::vector<std::string> out;
                               for (const auto& s : p.series) out.push_back(s.folder);
                               return out;
                             })
      .def_property_readonly("status", &panel_status)
      .def("file", &panel_file)
      .def("write", [](const PanelSearch& p, const std::string& out) {
        py::gil_scoped_release unlocked;
        return write_panel(p, out);
      });
  m.def("config_series_key", [](const std::string& text, const std::string& name) {
    return read_config(text, name, true).data.series_key;
  });
  m.def(
      "search_panel_file",
      [](const ConfigPtr& c, std::optional<int> threads, bool backtest) {
        return search_panel_file(c->config, threads, backtest);
      },
      py::arg("config"), py::arg("threads"), py::arg("backtest"));
  m.def(
      "search_panel_table",
      [](const ConfigPtr& c, const std::optional<std::string>& time_column,
         const std::vector<std::string>& header, const py::list& columns,
         std::optional<int> threads, bool backtest) {
        RunConfig config = c->config;
        if (time_column && config.data.time.empty()) config.data.time = *time_column;
        // As text: the panel is split by key and copied, and its cells fingerprinted.
        const FrameTable frame = table_from_columns(kFrameSource, header, columns, true);
        return search_panel_table(std::move(config), frame.table, threads, backtest);
      },
      py::arg("config"), py::arg("time_column"), py::arg("header"), py::arg("columns"),
      py::arg("threads"), py::arg("backtest"));
  m.def("search", &search_loaded, py::arg("run"), py::arg("threads"), py::arg("backtest") = true);
}
