"""swingsim compare: the example sweep end to end, --resume, Dask, and the report in a browser."""

import base64
import csv
import io
import re
import shutil
import subprocess
import tempfile
from argparse import Namespace
from pathlib import Path

import numpy as np
import pytest

from swingsim.batch import engine as batch

from swingsim.cli import compare as compare_cli
from swingsim.errors import InputError
from swingsim.study import compare
from swingsim.study.variants import load_sweep

ROOT = Path(__file__).resolve().parent.parent
EXAMPLE = ROOT / "scenes" / "yard_gantry_sweep.toml"


def args(sweep, out, **kw):
    d = dict(sweep=str(sweep), out=str(out), resume=False, force=False, workers=None, cluster=None,
             engine="batch", chunk=None, no_sensitivity=False, quiet=True)
    d.update(kw)
    return Namespace(**d)


@pytest.fixture(scope="module")
def example_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("cmp") / "out"
    assert compare_cli.main(args(EXAMPLE, out)) == 0
    return out


def read_csv(p):
    return list(csv.DictReader(io.StringIO(Path(p).read_text())))


def test_example_sweep_end_to_end(example_run):
    sw = load_sweep(EXAMPLE)
    rows = read_csv(example_run / "comparison.csv")
    assert [int(r["variant"]) for r in rows] == list(range(len(sw.variants)))
    assert list(rows[0])[:5] == ["variant", "name", "rope.length_m", "moves.0.profile", "moves.0.accel_m_s2"]
    # the varied values are the sweep's, every summary number is filled in
    assert {r["moves.0.profile"] for r in rows} == {"trapezoid", "whole-period", "zv", "zvd", "ei"}
    assert all(r["peak_rope_angle_deg"] and r["residual_rope_angle_deg"] for r in rows)
    # ranking: by the objective, ranked rows first, limits respected
    rk = read_csv(example_run / "ranking.csv")
    ranked = [r for r in rk if r["rank"]]
    vals = [float(r["settled_at_s"]) for r in ranked]
    assert vals == sorted(vals) and len(ranked) >= 5
    assert all(float(r["peak_rope_angle_deg"]) <= 4.0 for r in ranked)
    # the shapers leave far less swing than the plain trapezoid at the mid rope length
    by = {(r["rope.length_m"], r["moves.0.profile"]): r for r in rows}
    plain = float(by[("10.0", "trapezoid")]["residual_rope_angle_deg"])
    for prof in ("zv", "zvd"):
        assert float(by[("10.0", prof)]["residual_rope_angle_deg"]) < 0.02 * plain
    # the sensitivity study: ZVD flatter than ZV away from the design length (Singer & Seering 1990)
    sens = read_csv(example_run / "sensitivity.csv")
    at = {(r["profile"], round(float(r["rope_length_error"]), 3)): float(r["residual_swing_deg"]) for r in sens}
    assert at[("zvd", 0.3)] < at[("zv", 0.3)] and at[("zvd", -0.3)] < at[("zv", -0.3)]
    assert at[("zv", 0.0)] < 0.05 * at[("trapezoid", 0.0)] + 1e-3


def test_resume_runs_only_the_rest(tmp_path, monkeypatch):
    sw_path = tmp_path / "s.toml"
    sw_path.write_text(f'base = "{(ROOT / "scenes" / "yard_gantry_travel.toml").as_posix()}"\n'
                       'sensitivity = false\n[vary]\n"rope.length_m" = [6.0, 8.0, 10.0, 12.0, 14.0]\n'
                       '"moves.0.accel_m_s2" = [0.2, 0.35]\n')
    full = tmp_path / "full"
    assert compare_cli.main(args(sw_path, full, chunk=3)) == 0
    want = (full / "comparison.csv").read_text()
    # an interrupted run: header, four finished rows, a fifth cut short
    part = tmp_path / "part"
    part.mkdir()
    lines = want.splitlines(keepends=True)
    (part / "comparison.csv").write_text("".join(lines[:5]) + lines[5][:40])
    seen = []
    real = batch.run_table_chunk

    def spy(table, rows=None, **kw):
        seen.append(table.n if rows is None else len(rows))
        return real(table, rows, **kw)

    monkeypatch.setattr(batch, "run_table_chunk", spy)
    assert compare_cli.main(args(sw_path, part, resume=True, chunk=3)) == 0
    assert sum(seen) == 10 - 4  # the four finished variants were not run again
    assert (part / "comparison.csv").read_text() == want
    # a resume into a folder of another sweep is refused, nothing changed
    other = tmp_path / "o.toml"
    other.write_text(sw_path.read_text().replace("14.0", "15.0"))
    with pytest.raises(InputError) as e:
        compare_cli.main(args(other, part, resume=True))
    assert "differ" in str(e.value)
    assert (part / "comparison.csv").read_text() == want


def test_refuses_non_empty_out_without_force(tmp_path):
    out = tmp_path / "o"
    out.mkdir()
    (out / "keep.txt").write_text("x")
    with pytest.raises(InputError):
        compare_cli.main(args(EXAMPLE, out, no_sensitivity=True))
    assert sorted(p.name for p in out.iterdir()) == ["keep.txt"]


def test_dask_local_cluster_identical_to_in_process(tmp_path):
    # two worker processes on loopback (dask.distributed LocalCluster); same chunks, same numbers
    pytest.importorskip("dask.distributed")
    sw = load_sweep(EXAMPLE)
    scenes = sw.scenes
    ranges = [list(r) for r in batch.chunks(len(scenes), 5)]
    here, there = {}, {}
    compare.run_chunks(scenes, ranges, on_result=lambda r, res: here.update(zip(r, res)))
    compare.run_chunks(scenes, ranges, workers=2, on_result=lambda r, res: there.update(zip(r, res)))
    assert len(there) == len(scenes)
    assert [there[i] for i in range(len(scenes))] == [here[i] for i in range(len(scenes))]


def _chromium():
    for name in ("chromium", "chromium-browser"):
        p = shutil.which(name)
        if p:
            return p
    return None


@pytest.mark.skipif(_chromium() is None, reason="needs Debian's chromium (installed by .ci/run)")
def test_report_in_headless_chromium(example_run, tmp_path):
    html_path = example_run / "report.html"
    text = html_path.read_text()
    assert "http://" not in text and "https://" not in text and "<script" not in text  # self-contained
    profile = tempfile.mkdtemp(prefix="chromium-", dir=tmp_path)
    cmd = [_chromium(), "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
           "--disable-component-update", "--disable-sync", "--no-first-run", f"--user-data-dir={profile}",
           "--dump-dom", html_path.as_uri()]
    r = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    dom = r.stdout
    assert r.returncode == 0 and "</html>" in dom
    sw = load_sweep(EXAMPLE)
    table = re.search(r'<table id="ranking">(.*?)</table>', dom, re.S).group(1)
    assert table.count("<tr") == len(sw.variants) + 1  # header + one row per variant
    imgs = re.findall(r'<img[^>]*src="data:image/png;base64,([^"]+)"', dom)
    assert len(imgs) == len(sw.keys) + 1  # one per varied key + the sensitivity plot
    import matplotlib.image as mpimg

    for b in imgs:
        im = mpimg.imread(io.BytesIO(base64.b64decode(b)), format="png")
        assert im.shape[0] > 200 and im.shape[1] > 400
        assert float(np.std(im[..., :3])) > 0.05  # drawn, not blank
    assert "CAUTION" in dom and "competent person" in dom
    # and it renders: a screenshot with more than background in it
    shot = tmp_path / "shot.png"
    r = subprocess.run(cmd[:-2] + ["--window-size=1200,1600", f"--screenshot={shot}", html_path.as_uri()],
                       capture_output=True, text=True, timeout=120)
    assert r.returncode == 0 and shot.exists()
    im = mpimg.imread(shot)
    assert float(np.std(im[..., :3])) > 0.05


# ---------------------------------------------------------------------------
# worst-case and per-group rankings, number formatting, the columnar table on Dask, streaming


def _mini_sweep(tmp_path, objective=""):
    (tmp_path / "m.toml").write_text(
        f'base = "{(ROOT / "scenes" / "yard_gantry_travel.toml").as_posix()}"\nsensitivity = false\n'
        f'[objective]\nminimize = "residual_rope_angle_deg"\n{objective}\n'
        '[vary]\n"rope.length_m" = [6.0, 9.0, 12.0]\n"moves.0.profile" = ["trapezoid", "zv"]\n'
        '"moves.0.accel_m_s2" = [0.2, 0.35]\n')
    return load_sweep(tmp_path / "m.toml")


def test_robust_ranking_against_a_hand_computation(tmp_path):
    sw = _mini_sweep(tmp_path, 'robust_over = "rope.length_m"\nmax = { peak_rope_angle_deg = 50.0 }')
    rng = np.random.default_rng(3)
    sums = [{"valid": True, "residual_rope_angle_deg": float(x), "peak_rope_angle_deg": 1.0}
            for x in rng.uniform(0.0, 2.0, sw.table.n)]
    sums[5]["peak_rope_angle_deg"] = 60.0  # outside the limit: its whole combination is not ranked
    rk = compare.rank(sw, sums)
    # by hand: group the variants by (profile, acceleration), worst = max over the rope lengths
    combos = {}
    for i in range(sw.table.n):
        c = (sw.table.value(i, "moves.0.profile"), sw.table.value(i, "moves.0.accel_m_s2"))
        combos.setdefault(c, []).append(i)
    bad = next(c for c, rows in combos.items() if 5 in rows)
    hand = sorted(((max(sums[i]["residual_rope_angle_deg"] for i in rows), c) for c, rows in combos.items()
                   if c != bad))
    got = []
    for e in rk.ranked():
        i = int(rk.first[e])
        got.append((float(rk.worst[e]), (sw.table.value(i, "moves.0.profile"),
                                          sw.table.value(i, "moves.0.accel_m_s2"))))
    assert got == hand
    assert [int(rk.rank[e]) for e in rk.ranked()] == [1, 2, 3]
    for e in rk.ranked():  # the spread: best and mean over the rope lengths, and where the worst is
        rows = [i for i in range(sw.table.n) if rk.entry[i] == e]
        vals = [sums[i]["residual_rope_angle_deg"] for i in rows]
        assert len(rows) == 3 and rk.best[e] == min(vals) and rk.mean[e] == pytest.approx(sum(vals) / 3, rel=1e-12)
        assert sums[int(rk.worst_at[e])]["residual_rope_angle_deg"] == max(vals)
    unranked = [e for e in rk.order if not rk.rank[e]]
    assert len(unranked) == 1 and "peak_rope_angle_deg" in rk.note[unranked[0]]
    assert "worst" in rk.rule and "rope.length_m" in rk.rule


def test_per_group_ranking_restarts_in_each_group(tmp_path):
    sw = _mini_sweep(tmp_path, 'group_by = "moves.0.profile"')
    sums = [{"valid": True, "residual_rope_angle_deg": float(sw.table.n - i)} for i in range(sw.table.n)]
    rk = compare.rank(sw, sums)
    for prof in ("trapezoid", "zv"):
        mine = [e for e in rk.order if sw.table.value(int(rk.first[e]), "moves.0.profile") == prof]
        assert [int(rk.rank[e]) for e in mine] == [1, 2, 3, 4, 5, 6]
        vals = [sums[int(rk.first[e])]["residual_rope_angle_deg"] for e in mine]
        assert vals == sorted(vals)


@pytest.mark.parametrize("x, key, text", [
    (7.21e-06, "residual_rope_angle_deg", "< 0.01"),   # below what a plan resolves: never 7.21e-06
    (0.0123, "residual_rope_angle_deg", "0.0123"),      # 3 significant digits
    (12.345, "settled_at_s", "12.3"),
    (0.5, "moves.0.accel_m_s2", "0.5"),                 # no trailing zeros
    (2.5e7, "peak_rope_tension_kN", "25×10^6"),         # engineering notation: exponent a multiple of 3
    (3.2e-5, "dynamic_factor", "32×10^-6"),             # (common practice)
    (None, "settled_at_s", "–"),
    (True, "valid", "yes"),
])
def test_report_number_formatting(x, key, text):
    from swingsim.report.plots_compare import format_number

    assert format_number(x, key) == text


def test_dask_on_the_columnar_table_identical_to_in_process(tmp_path):
    # column slices of the table go to the workers (an in-process Dask client, as the existing test's cluster)
    distributed = pytest.importorskip("dask.distributed")
    sw = _mini_sweep(tmp_path)
    ranges = [list(r) for r in batch.chunks(sw.table.n, 5)]
    here, there = {}, {}
    compare.run_chunks(sw.table, ranges, on_result=lambda r, res: here.update(zip(r, res)))
    with distributed.Client(processes=False, n_workers=1, threads_per_worker=2, dashboard_address=None) as c:
        compare.run_chunks(sw.table, ranges, cluster=c, on_result=lambda r, res: there.update(zip(r, res)))
    assert [there[i] for i in range(sw.table.n)] == [here[i] for i in range(sw.table.n)]
    # and the slice a worker gets holds only its rows' values
    part = sw.table.take(ranges[1])
    assert part.n == len(ranges[1])
    assert [part.value(j, "rope.length_m") for j in range(part.n)] == \
        [sw.table.value(i, "rope.length_m") for i in ranges[1]]


def test_table_is_written_as_chunks_finish(tmp_path, monkeypatch):
    sw_path = tmp_path / "s.toml"
    sw_path.write_text(f'base = "{(ROOT / "scenes" / "yard_gantry_travel.toml").as_posix()}"\n'
                       'sensitivity = false\n[vary]\n"rope.length_m" = [6.0, 8.0, 10.0, 12.0]\n'
                       '"moves.0.accel_m_s2" = [0.2, 0.35]\n')
    out = tmp_path / "out"
    seen_rows = []
    real = batch.run_table_chunk

    def spy(table, rows=None, **kw):
        seen_rows.append(len((out / "comparison.csv").read_text().splitlines()) - 1)
        return real(table, rows, **kw)

    monkeypatch.setattr(batch, "run_table_chunk", spy)
    assert compare_cli.main(args(sw_path, out, chunk=3)) == 0
    assert seen_rows == [0, 3, 6]  # each chunk's rows are on disk before the next chunk runs
    assert len(read_csv(out / "comparison.csv")) == 8


def test_report_reads_at_size(tmp_path):
    # the bundled mixed sweep: no None in legends or cells, no exponent notation, the rule at the top
    out = tmp_path / "mixed"
    assert compare_cli.main(args(ROOT / "scenes" / "yard_gantry_mixed_sweep.toml", out, no_sensitivity=True)) == 0
    text = (out / "report.html").read_text()
    body = re.sub(r'src="data:image/png;base64,[^"]+"', "", text)
    assert "None" not in body
    assert not re.search(r"<td>[^<]*\de[-+]\d", body)  # e.g. 7.21e-06 never printed in a cell
    assert body.index('id="rule"') < body.index('id="ranking"')
    assert "worst" in body and "rope.length_m" in body.split('id="rule"')[1][:400]
    assert 'id="ignored"' in body and "jerk_m_s3" in body and "position:sticky" in body
    rk = read_csv(out / "ranking.csv")
    assert "worst_settled_at_s" in rk[0] and all(r["variants"] == "5" for r in rk)


# ---------------------------------------------------------------------------
# the CSV rows written without csv.writer when no cell needs quoting


def test_csv_rows_are_what_csv_writer_writes():
    # reference: Python's csv module (csv.writer, QUOTE_MINIMAL, "\n" line ends), the writer
    # comparison.csv is read back with; cells with commas, quotes, line breaks, empty cells and
    # lone cells take the same text, and the checksum cell is the CRC-32 of the row before it
    import random
    import zlib

    def reference(cells):
        buf = io.StringIO()
        csv.writer(buf, lineterminator="\n").writerow(cells)
        return buf.getvalue()

    rnd = random.Random(20261202)
    pieces = ["a", ",", '"', "\n", "\r", " ", "", "1.5", "'", ";", "é", "\t", "-0.0", "1e-300"]
    for _ in range(5000):
        cells = ["".join(rnd.choice(pieces) for _ in range(rnd.randint(0, 3))) for _ in range(rnd.randint(0, 6))]
        assert compare._csv_line(cells) == reference(cells), cells
        line = compare._checked_line(cells)
        assert line == reference([*cells, compare.row_checksum(cells)]), cells
        assert line.rstrip("\n").rsplit(",", 1)[-1] == f"{zlib.crc32(reference(cells)[:-1].encode('utf-8')):08x}"
