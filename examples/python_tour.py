#!/usr/bin/python3
"""A notebook-style tour of the Python module on R's Seatbelts and BJsales (as write.csv gives
them, in tests/reference). Run from the repository root after building:

    PYTHONPATH=build/python /usr/bin/python3 examples/python_tour.py
"""
# %% Seatbelts: monthly car drivers killed or seriously injured, with the petrol price and the
# seat-belt law of February 1983 as inputs; seasonal differencing at 12, log scale.
import pandas as pd

import lagsieve

seatbelts = pd.read_csv("tests/reference/calendar/seatbelts_monthly.csv")
config = {
    "data": {"time": "month"},
    "target": {"column": "drivers", "transform": "log"},
    "differencing": {"seasonal": 1, "period": 12},
    "inputs": [{"column": "PetrolPrice", "delay": 0, "future": "forecast"},
               {"column": "law", "delay": 0}],
    "noise": {"ar": 1, "seasonal_ma": 1, "constant": True},
}
fit = lagsieve.fit(config, seatbelts)
print(fit)
print(fit.params)
print("Ljung-Box:", fit.diagnostics["ljung_box"][-1])

# %% The law's effect on the log scale, as a percentage change of the level.
law = fit.params.set_index("name").loc[[n for n in fit.params["name"] if n.startswith("law")]]
print(law.assign(percent=100 * (law["value"].map(lambda v: __import__("math").exp(v)) - 1)))

# %% Forecasts need the law's future: it stays in force (known), the petrol price is forecast.
future = pd.DataFrame({"law": [1.0] * 12})
print(fit.forecast(12, future=future)[["time", "point", "lower_95", "upper_95"]])

# %% BJsales (Box & Jenkins Series M): a search over delays and denominators, then its run folder.
bjsales = pd.read_csv("tests/reference/data/bjsales.csv")
search_config = {
    "data": {"time": "t"},
    "target": {"column": "sales"},
    "differencing": {"regular": 1},
    "inputs": [{"column": "lead", "delay": [0, 4], "denominator": [0, 1], "future": "forecast"}],
    "noise": {"ma": [0, 1], "constant": True},
    "backtest": {"first_origin": 110, "step": 5, "horizon": 5, "shortlist": 5},
}
run = lagsieve.search(search_config, bjsales)
print(run.ranking[["rank", "model", "status", "aicc", "backtest_score"]].head(8))
print(run.chosen.params)
print(run.backtest.head())
print("run folder:", run.write("runs/bjsales_from_python"))

# %% In a notebook the fit and the run display as tables; the report's charts come as SVG
# (IPython.display.SVG(fit.chart("forecast")) shows one). Here they are written to files.
print("charts of the chosen model:", run.chosen.charts())
with open("runs/bjsales_chosen_forecast.svg", "w", encoding="utf-8") as f:
    f.write(run.chosen.chart("forecast"))
# One-step predictions (past.csv's `fitted`) and what each input contributed to them.
print(run.chosen.past.tail())

# %% Many series from one long-format frame: data.series_key makes the search a panel run, the
# run folder `lagsieve search` writes for it (Ctrl-C stops it cleanly, as any search).
panel = pd.read_csv("data/seatbelts_long.csv")
panel_config = {
    "data": {"time": "month", "series_key": "series"},
    "target": {"column": "casualties", "transform": "log"},
    "differencing": {"seasonal": 1, "period": 12},
    "inputs": [{"column": "law", "delay": [0, 1]}],
    "noise": {"ar": [0, 1], "seasonal_ar": [0, 1], "period": 12},
}
panel_run = lagsieve.search(panel_config, panel)
print(panel_run.summary[["series", "status", "reason"]])
print("panel run folder:", panel_run.write("runs/seatbelts_from_python"))
