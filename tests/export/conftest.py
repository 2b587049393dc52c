"""Sheets for the export tests (scenarios of our own) and their runs, shared per session.

A run starts an evaluation worker, so each sheet is run once and the run is shared.
"""

from __future__ import annotations

import pytest

from worksheet.runner import SheetRun, run_text

BURST = """\
---
title: Burst budget for a light black hole
constants: CODATA2018
digits: 4
---

# Setting

A hole of *half a trillion* kilograms, radiating photons only; `T_H` is its temperature.

```calc
M = 5e11 [kg] +- 20%
r_s = 2*G*M/c^2
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
check T_H ~ 1e11 [K]
check r_s < 1 [m]
check T_H == 1 [K] within 2%
```

Notes on the `check` lines:

- the first two hold,
- the third is meant to fail.

```calc
sigma_SB
d_sun = 1 [au]
x : [m]
diff(x^3, x)
bad = 1 [m] + 1 [s]
```
"""
"""Holding and failing claims, an error, a verb, and a unit taken from the dataset."""

HOSTILE = """\
---
title: Odd <b>title</b> & 100% No.#1
constants: CODATA2022
---

Costs 100% of T_H & #1 {braces} $dollars$ ~tilde ^caret \\backslash <script>alert(1)</script>.

- a list item with `code_span & <tag>`
- [a link](javascript:alert(1)) and ![an image](https://example.invalid/a.png)

```calc
E_x = 2 [J]
check E_x < 3 [J]
```
"""
"""Notes and a title full of characters that are special in LaTeX, HTML or Markdown."""


@pytest.fixture(scope="session")
def burst_run() -> SheetRun:
    return run_text(BURST)


@pytest.fixture(scope="session")
def hostile_run() -> SheetRun:
    return run_text(HOSTILE)


@pytest.fixture(scope="session")
def burst_text() -> str:
    return BURST


PLOTS = """\
---
title: Sweeps of a light hole
constants: CODATA2022
digits: 4
---

```calc
M = 5e11 [kg]
T_H = hbar*c^3/(8*pi*G*M*k_B) in [K]
t_ev = 5120*pi*G^2*M^3/(hbar*c^4)
plot T_H in [K], t_ev in [yr] over M = 1e9 [kg] .. 1e15 [kg] log 25
plot T_H in [K] over M = 1e9 [kg] .. 1e10 [kg] lin 5 y lin
table M = 1e9 [kg] .. 1e15 [kg] log 4: T_H in [K], t_ev in [yr]
x = 1e-9 [rad]
w = 1 - cos(x)
```
"""
"""Two plots (log-log, linear), a table, and a result the precision guard marks (line 15)."""


@pytest.fixture(scope="session")
def plot_run() -> SheetRun:
    return run_text(PLOTS)


@pytest.fixture(scope="session")
def plot_text() -> str:
    return PLOTS
