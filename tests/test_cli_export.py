"""End to end: ``finfront report`` and ``finfront export`` on a small quickstart run.

The hand-off contract: the files a CAD user receives carry the same numbers as the run's
pareto.csv (the model's), and a bad request gets one line and exit code 2.
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
from pathlib import Path

import ezdxf
import pandas as pd
import pytest

ROOT = Path(__file__).resolve().parents[1]
QUICKSTART = ROOT / "studies" / "quickstart.yaml"


def _cli(*args: str) -> subprocess.CompletedProcess:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("FORCE_COLOR", None)
    return subprocess.run([sys.executable, "-m", "optim.cli", *args], cwd=ROOT, env=env,
                          capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def run_folder(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("cli_export") / "qs"
    r = _cli("run", str(QUICKSTART), "--out", str(out), "--population", "20",
             "--generations", "5", "--method", "nsga2", "--quiet", "--no-plots")
    assert r.returncode == 0, r.stderr
    return out


def test_report_subcommand_writes_a_self_contained_page(run_folder):
    r = _cli("report", str(run_folder))
    assert r.returncode == 0, r.stderr
    html = (run_folder / "report.html").read_text()
    assert "<script" in html
    # nothing is loaded from the network: no external script, style sheet or image
    assert not re.search(r'<(script|img|iframe)[^>]+src="https?:', html)
    assert not re.search(r'<link[^>]+href="https?:', html)


def test_export_subcommand_matches_the_pareto_row(run_folder, tmp_path):
    pareto = pd.read_csv(run_folder / "pareto.csv")
    row = pareto.iloc[0]
    r = _cli("export", str(run_folder), str(row["design_id"]), "--out", str(tmp_path),
             "--formats", "dxf,json,csv")
    assert r.returncode == 0, r.stderr
    files = sorted(p.name for p in tmp_path.iterdir())
    assert files == sorted(f"{row['design_id']}_{s}" for s in
                           ("profile.dxf", "parameters.json", "parameters.csv"))
    sheet = json.loads((tmp_path / f"{row['design_id']}_parameters.json").read_text())
    # the sheet's numbers are the model's numbers for this row
    for key in ("mass_kg", "sink_resistance_K_per_W", "pressure_drop_Pa", "flow_m3_per_s"):
        assert sheet[key] == pytest.approx(row[key], rel=1e-9), key
    doc = ezdxf.readfile(tmp_path / f"{row['design_id']}_profile.dxf")
    assert doc.header["$INSUNITS"] == 4  # millimetres


def test_export_of_an_unknown_design_is_one_line_and_exit_2(run_folder, tmp_path):
    r = _cli("export", str(run_folder), "D9999", "--out", str(tmp_path))
    assert r.returncode == 2
    assert r.stderr.count("\n") == 1 and r.stderr.startswith("error: ")
    assert "D9999" in r.stderr
    assert not any(tmp_path.iterdir())
