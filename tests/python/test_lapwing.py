"""The Python module against the command line (README, "In Python").

The command line is the reference: every result the module returns must be what `lapwing run`,
`compare` and `trade` write for the same inputs, to the bit (both print numbers in their
shortest round-trip form, so a parsed value equals the double the solver produced). Run by ctest
(python.pytest) with
  PYTHONPATH   the build's python/ folder (the module)
  LAPWING_CLI  the command line binary
  LAPWING_SOURCE_DIR  the repository (cars/, tracks/, tests/data/)
"""
import csv
import json
import math
import os
import pathlib
import subprocess
import sys
import threading
import time

import numpy as np
import pytest

import lapwing

SOURCE = pathlib.Path(os.environ["LAPWING_SOURCE_DIR"])
CLI = os.environ["LAPWING_CLI"]
CARS = sorted(p.relative_to(SOURCE).as_posix() for p in (SOURCE / "cars").glob("*.yaml"))
TRACKS = sorted(p.relative_to(SOURCE).as_posix() for p in (SOURCE / "tracks").glob("*.yaml"))
CIRCUITS = ["tracks/brannock-park.yaml", "tracks/saltmere-flats.yaml", "tracks/cairnholt.yaml"]


@pytest.fixture(autouse=True)
def in_source_dir(monkeypatch):
    # Files are named relative to the repository, as the command line is given them: the error
    # texts then name the same paths.
    monkeypatch.chdir(SOURCE)


def cli(*args, expect=0):
    r = subprocess.run([CLI, *args], cwd=SOURCE, capture_output=True, text=True)
    assert r.returncode == expect, f"lapwing {' '.join(args)}: exit {r.returncode}: {r.stderr}"
    return r


def cases():
    """Every bundled car x track with the car's first config (what `run` laps by default), and
    every config of every car on every track laid out from segments (the survey's fitted
    centerline laps each config at about 0.5 s, its smoothing study included: the first
    config stands for the rest)."""
    out = []
    for car in CARS:
        configs = lapwing.load_car(str(SOURCE / car)).configs
        for track in TRACKS:
            survey = "survey" in track
            for config in configs[:1] if survey else configs:
                out.append((car, track, config))
    return out


CASES = cases()


def cli_run(tmp_path, car, track, config, *extra):
    out = tmp_path / "out"
    cli("run", "--car", car, "--track", track, "--config", config, *extra, "--out", str(out))
    summary = json.loads((out / "summary.json").read_text())
    (trace_file,) = out.glob("trace-*.csv")
    with open(trace_file, newline="") as f:
        rows = list(csv.reader(f))
    return summary, rows


def assert_trace_equal(trace, rows):
    header, body = rows[0], rows[1:]
    # Named as the trace CSV's columns, in its order, one entry per row (mesh point).
    assert list(trace) == header
    for j, name in enumerate(header):
        column = trace[name]
        assert len(column) == len(body), name
        if name == "phase":
            assert list(column) == [r[j] for r in body]
            continue
        # An empty field (aero_balance_eff without downforce) is NaN in the array; every other
        # field is the double itself (shortest round trip: exact, no tolerance).
        want = np.array([float(r[j]) if r[j] != "" else math.nan for r in body])
        got = column.astype(float)
        same = (got == want) | (np.isnan(got) & np.isnan(want))
        assert same.all(), f"{name}: first difference at row {int(np.argmin(same))}"


@pytest.mark.parametrize("car,track,config", CASES, ids=["-".join(
    pathlib.Path(x).stem for x in c) for c in CASES])
def test_run_gives_the_cli_lap_summary_and_trace(tmp_path, car, track, config):
    summary, rows = cli_run(tmp_path, car, track, config)
    t = lapwing.load_track(track)
    lap = lapwing.run(lapwing.load_car(car), t, config=config)
    want = summary["results"][0]
    assert lap.lap_time_s == want["lap_time_s"]
    assert lap.summary == want
    assert lap.corners == want["corners"]
    assert_trace_equal(lap.trace, rows)
    # One entry per mesh point: the length in whole steps of about `mesh` (README, "Track": the
    # step is adjusted to divide the length), ends included.
    points = max(2, round(t.length_m / t.mesh_m)) + 1
    assert len(lap.trace["distance_m"]) == points
    assert lap.trace["distance_m"][0] == 0.0
    assert lap.trace["distance_m"][-1] == pytest.approx(t.length_m, rel=1e-12)


def test_model_and_air_options_give_the_cli_lap(tmp_path):
    car, track = "cars/caldra-gt.yaml", "tracks/cairnholt.yaml"
    summary, rows = cli_run(tmp_path, car, track, "high_downforce", "--model", "point-mass",
                            "--temperature", "31 C", "--altitude", "450 m")
    lap = lapwing.run(lapwing.load_car(car), lapwing.load_track(track), config="high_downforce",
                      model="point-mass", air={"temperature": "31 C", "altitude": 450})
    assert lap.summary == summary["results"][0]
    assert_trace_equal(lap.trace, rows)
    # The options change the lap (a check that they were applied at all).
    default = lapwing.run(lapwing.load_car(car), lapwing.load_track(track), "high_downforce")
    assert default.lap_time_s != lap.lap_time_s


def test_compare_returns_compare_json(tmp_path):
    car = "cars/caldra-gt.yaml"
    tracks = ["tracks/brannock-park.yaml", "tracks/skidpad.yaml"]
    cli("compare", "--car", car, *[a for t in tracks for a in ("--track", t)], "--out",
        str(tmp_path / "cmp"))
    want = json.loads((tmp_path / "cmp" / "compare.json").read_text())
    got = lapwing.compare(lapwing.load_car(car), [lapwing.load_track(t) for t in tracks])
    assert got == want
    # A list of configs, as --config NAME ...
    one = lapwing.compare(lapwing.load_car(car), [lapwing.load_track(tracks[0])],
                          configs=["high_downforce"])
    assert [c["config"] for c in one["tracks"][0]["configs"]] == ["high_downforce"]


def test_trade_returns_trade_json(tmp_path):
    car, track = "cars/caldra-gt.yaml", "tracks/brannock-park.yaml"
    cli("trade", "--car", car, "--track", track, "--config", "low_drag", "--grid", "3",
        "--step", "3 %", "--out", str(tmp_path / "trd"))
    want = json.loads((tmp_path / "trd" / "trade.json").read_text())
    got = lapwing.trade(lapwing.load_car(car), [lapwing.load_track(track)], config="low_drag",
                        grid=3, step="3 %")
    assert got == want
    assert lapwing.trade(lapwing.load_car(car), [lapwing.load_track(track)], config="low_drag",
                         grid=3, step=0.03) == want


BAD = sorted(p.relative_to(SOURCE).as_posix() for p in (SOURCE / "tests/data/bad").glob("*.yaml"))


@pytest.mark.parametrize("bad", BAD, ids=[pathlib.Path(b).stem for b in BAD])
def test_bad_input_raises_input_error_with_the_cli_message(bad):
    # As tests/cli/cli_test.sh runs them: a bad car round Brannock Park, a bad track with the
    # Pellion FR-2.
    car, track = ((bad, "tracks/brannock-park.yaml") if pathlib.Path(bad).name.startswith("car-")
                  else ("cars/pellion-fr2.yaml", bad))
    expect = (SOURCE / bad).read_bytes().split(b"\n")[0].decode()
    assert expect.startswith("# expect: ")
    stderr = cli("run", "--car", car, "--track", track, expect=2).stderr.rstrip("\n")
    with pytest.raises(lapwing.InputError) as e:
        lapwing.run(lapwing.load_car(car), lapwing.load_track(track))
    assert str(e.value) == stderr
    assert expect[len("# expect: "):] in str(e.value)
    assert isinstance(e.value, ValueError)


def test_unknown_config_is_the_cli_error():
    stderr = cli("run", "--car", "cars/caldra-gt.yaml", "--track", "tracks/skidpad.yaml",
                 "--config", "high", expect=2).stderr.rstrip("\n")
    with pytest.raises(lapwing.InputError) as e:
        lapwing.run(lapwing.load_car("cars/caldra-gt.yaml"), lapwing.load_track(
            "tracks/skidpad.yaml"), config="high")
    assert str(e.value) == stderr


def test_a_car_that_cannot_move_raises_cannot_move():
    stderr = cli("run", "--car", "tests/data/cannot-move/weak-car.yaml", "--track",
                 "tracks/acceleration.yaml", expect=3).stderr
    with pytest.raises(lapwing.CannotMove) as e:
        lapwing.run(lapwing.load_car("tests/data/cannot-move/weak-car.yaml"),
                    lapwing.load_track("tracks/acceleration.yaml"))
    # The command line says "lapwing: error: " before the same sentence.
    assert stderr == "lapwing: error: " + str(e.value) + "\n"


def test_with_values_matches_a_car_file_edited_by_hand(tmp_path):
    text = (SOURCE / "cars/pellion-fr2.yaml").read_text()
    lines = text.split("\n")
    # By hand: the mass line, and medium's cla inside its one-line map.
    (m,) = [i for i, l in enumerate(lines) if l.startswith("mass:")]
    lines[m] = "mass: 650 kg"
    (c,) = [i for i, l in enumerate(lines) if l.strip().startswith("medium:")]
    assert "cla: 3.6" in lines[c]
    lines[c] = lines[c].replace("cla: 3.6", "cla: 3.8")
    edited = tmp_path / "pellion-fr2.yaml"
    edited.write_text("\n".join(lines))
    track = lapwing.load_track("tracks/cairnholt.yaml")
    by_hand = lapwing.run(lapwing.load_car(str(edited)), track, "medium")
    car = lapwing.load_car("cars/pellion-fr2.yaml")
    set_ = car.with_values({"mass": 650, "aero.configs.medium.cla": 3.8})
    assert set_.mass_kg == 650.0
    in_python = lapwing.run(set_, track, "medium")
    assert in_python.summary == by_hand.summary
    assert in_python.lap_time_s != lapwing.run(car, track, "medium").lap_time_s
    # Units in a string, as the file takes them: 650 kg = 1433.0047 lb (1 lb = 0.45359237 kg
    # exactly, the international pound of 1959); 1e-4 kg covers the 4 decimals of the pounds.
    lb = car.with_values({"mass": "1433.0047 lb"}).mass_kg
    assert lb == pytest.approx(650.0, abs=1e-4)


def test_with_values_refuses_what_the_file_refuses():
    car = lapwing.load_car("cars/pellion-fr2.yaml")
    # Named by the values set, as sweep --set names its point: the file's line holds another value.
    with pytest.raises(lapwing.InputError, match=r"^with_values mas = 650: unknown key 'mas'; "
                       r"did you mean 'mass'\?"):
        car.with_values({"mas": 650})
    with pytest.raises(lapwing.InputError, match=r"^with_values aero\.configs\.high_trim\."
                       r"straight_trim\.cla = -4\.31: straight_trim takes"):
        car.with_values({"aero.configs.high_trim.straight_trim.cla": -4.31})
    with pytest.raises(lapwing.InputError, match=r"out of range.*\(mass\)"):
        car.with_values({"mass": -1})
    with pytest.raises(lapwing.InputError, match=r"not a mass|unit"):
        car.with_values({"mass": "650 m"})
    with pytest.raises(TypeError):
        car.with_values({"mass": [650]})


def test_two_threads_give_the_answers_of_one():
    car = lapwing.load_car("cars/caldra-gt.yaml")
    tracks = [lapwing.load_track(t) for t in CIRCUITS]
    jobs = [(t, c) for t in tracks for c in car.configs]
    alone = [lapwing.run(car, t, c) for t, c in jobs]
    barrier = threading.Barrier(2)
    got = [None, None]

    def work(k):
        order = jobs if k == 0 else jobs[::-1]  # the two threads meet on different laps
        barrier.wait()
        laps = [lapwing.run(car, t, c) for t, c in order]
        got[k] = laps if k == 0 else laps[::-1]

    threads = [threading.Thread(target=work, args=(k,)) for k in (0, 1)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    for laps in got:
        assert laps is not None
        for a, b in zip(alone, laps):
            assert a.summary == b.summary
            for name in a.trace:
                x, y = a.trace[name], b.trace[name]
                assert (x == y).all() or (x.dtype.kind == "f" and np.array_equal(x, y, equal_nan=True))


def test_a_python_thread_runs_while_a_lap_is_solved():
    # The GIL is released while laps are solved: the main thread keeps running through the
    # worker's calls. It adds up the time it runs inside them, as the gaps under 1 ms between
    # its loop's turns (a turn takes well under a microsecond; a longer gap is time it waited,
    # for the GIL or for a core). Were the GIL held through the solves, the main thread could
    # run only at the switches between the worker's calls and around them, one switch interval
    # (set to 0.5 ms here) each: some (calls + 1) intervals. Measured on this 2-core machine
    # with a C loop that holds the GIL (`sum(range(...))`) in the solve's place: 0.5 to 3 ms
    # idle, 5 to 15 ms with both cores kept busy by other processes (the waits for a core
    # stretch each switch); with the solves, 80 to 100 ms of calls of 80 to 200 ms, idle or
    # loaded. The check asks for 20 ms, and four times the held bound where a faster machine's
    # more calls raise it: on a machine busier still a held GIL could pass, but a released one
    # does not fail. It does not ask for a share of the calls' time: on a loaded machine (CI
    # runs two tests at once on two cores) the main thread can wait tens of milliseconds for a
    # core. The worker calls `compare` at least three times and until 80 ms have passed, so
    # that a faster machine makes more calls, not shorter ones.
    car = lapwing.load_car("cars/pellion-fr2.yaml")
    tracks = [lapwing.load_track(t) for t in CIRCUITS]
    state = {"start": None, "end": None, "calls": 0}

    def work():
        state["start"] = time.perf_counter()
        while state["calls"] < 3 or time.perf_counter() - state["start"] < 0.08:
            lapwing.compare(car, tracks, configs=["low", "medium", "high"], threads=1)
            state["calls"] += 1
        state["end"] = time.perf_counter()

    interval = sys.getswitchinterval()
    sys.setswitchinterval(0.0005)
    try:
        ran = 0.0
        last = None
        worker = threading.Thread(target=work)
        worker.start()
        while state["end"] is None:
            if state["start"] is not None:
                now = time.perf_counter()
                if last is not None and now - last < 0.001:
                    ran += now - last
                last = now
        worker.join()
    finally:
        sys.setswitchinterval(interval)
    held_bound = (state["calls"] + 1) * 0.0005
    assert ran > max(0.02, 4 * held_bound), (ran, state)


def test_air_and_model_are_checked():
    car, track = lapwing.load_car("cars/caldra-gt.yaml"), lapwing.load_track("tracks/skidpad.yaml")
    with pytest.raises(lapwing.InputError, match=r"^air\[.altitude.\]: 7 km is out of range"):
        lapwing.run(car, track, air={"altitude": "7 km"})
    with pytest.raises(ValueError, match="unknown key 'altitud'"):
        lapwing.run(car, track, air={"altitud": 100})
    with pytest.raises(ValueError, match="not one of axle | point-mass"):
        lapwing.run(car, track, model="bicycle")


# The module's refusals against the command line's (README, "In Python": the same words, the
# Python argument named where the command line names its option). The reference is the command
# line's stderr for the same input, so each check fails when the two texts differ.
CAR, TRACK = "cars/pellion-fr2.yaml", "tracks/skidpad.yaml"


def cli_error(*args):
    r = cli(*args, expect=2)
    assert r.stderr.startswith("lapwing: error: "), r.stderr
    return r.stderr[len("lapwing: error: "):].rstrip("\n")


@pytest.mark.parametrize("load", [lapwing.load_car, lapwing.load_track])
def test_a_path_with_a_nul_character_is_refused(load):
    # Opened as given, the name would be cut at the NUL and another file read.
    path = (CAR if load is lapwing.load_car else TRACK) + "\0.ignored"
    with pytest.raises(lapwing.InputError, match=r"pellion-fr2\.yaml.*NUL|skidpad\.yaml.*NUL"):
        load(path)


@pytest.mark.parametrize("load", [lapwing.load_car, lapwing.load_track])
def test_a_path_may_be_a_pathlib_path_or_bytes_as_open_takes_it(load):
    # os.fsdecode's forms (Python's open() takes the same): the file read is the one named.
    import pathlib
    path = CAR if load is lapwing.load_car else TRACK
    assert repr(load(pathlib.Path(path))) == repr(load(path))
    assert repr(load(path.encode())) == repr(load(path))
    with pytest.raises(TypeError, match="os.PathLike"):
        load(3)
    # A path with no UTF-8 (a lone surrogate) is an InputError as any other text argument
    # (README, "In Python"), not pybind11's RuntimeError of a failed cast.
    for bad in ("\ud800", "cars/\udcff.yaml", pathlib.Path("\ud800.yaml")):
        with pytest.raises(lapwing.InputError, match=r"^path: .*lone surrogate"):
            load(bad)


def test_numbers_beyond_a_double_are_input_errors_not_cast_errors():
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    with pytest.raises(lapwing.InputError, match=r"^air\['altitude'\]: .*too large"):
        lapwing.run(car, track, air={"altitude": 10**400})
    with pytest.raises(lapwing.InputError, match=r"^step: .*too large"):
        lapwing.trade(car, [track], step=10**400)
    with pytest.raises(lapwing.InputError, match=r"^mass: .*too large"):
        car.with_values({"mass": 10**400})
    with pytest.raises(lapwing.InputError, match=r"^name: .*lone surrogate"):
        car.with_values({"name": "\ud800"})
    with pytest.raises(TypeError, match=r"^air\['altitude'\]: give a number"):
        lapwing.run(car, track, air={"altitude": [100]})
    with pytest.raises(TypeError, match=r"^air\['altitude'\]: give a number"):
        lapwing.run(car, track, air={"altitude": np.bool_(True)})
    for kw in ({"config": "\ud800"}, {"model": "\udcff"}):
        with pytest.raises(lapwing.InputError, match=r"lone surrogate"):
            lapwing.run(car, track, **kw)
    with pytest.raises(lapwing.InputError, match=r"^configs: .*lone surrogate"):
        lapwing.compare(car, [track], configs=["low", "\ud800"])
    with pytest.raises(TypeError, match=r"^configs: give a list of names, not str"):
        lapwing.compare(car, [track], configs="low")
    with pytest.raises(TypeError, match=r"^config: give a string, not int"):
        lapwing.trade(car, [track], config=1)
    # Not finite: the command line's words for --altitude nan, not an internal error.
    for x, text in ((float("nan"), "nan"), (np.float64("inf"), "inf"), (-math.inf, "-inf")):
        with pytest.raises(lapwing.InputError) as e:
            lapwing.run(car, track, air={"altitude": x})
        assert str(e.value) == cli_error("run", "--car", CAR, "--track", TRACK,
                                         f"--altitude={text}").replace("--altitude",
                                                                      "air['altitude']")
    with pytest.raises(lapwing.InputError):
        lapwing.trade(car, [track], step=math.nan)
    with pytest.raises(lapwing.InputError):
        car.with_values({"mass": math.inf})
    with pytest.raises(lapwing.InputError, match=r"^threads: Value \(a huge number\) not in"):
        lapwing.compare(car, [track], threads=10**5000)
    with pytest.raises(TypeError, match=r"^threads: give an integer"):
        lapwing.compare(car, [track], threads=2.0)


def test_any_real_number_type_is_a_number():
    # numpy.int64 and numpy.float64 are numbers.Real as int and float are: the same lap.
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    want = lapwing.run(car, track, air={"altitude": 800, "temperature": 31}).lap_time_s
    for kind in (np.int64, np.float64, np.int32, np.float32):
        got = lapwing.run(car, track, air={"altitude": kind(800), "temperature": kind(31)})
        assert got.lap_time_s == want, kind
    assert lapwing.trade(car, [track], step=np.float64(0.02), grid=np.int64(3)) == \
        lapwing.trade(car, [track], step=0.02, grid=3)


def test_what_the_command_line_refuses_the_module_refuses():
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    # --track is required (CLI11's words): an empty list laps nothing.
    assert "--track is required" in cli("compare", "--car", CAR, expect=2).stderr
    for study in (lapwing.compare, lapwing.trade):
        with pytest.raises(lapwing.InputError, match=r"^tracks is required"):
            study(car, [])
    # The same track twice, as the same object or loaded again.
    assert cli_error("compare", "--car", CAR, "--track", TRACK, "--track", TRACK) == \
        f"--track {TRACK} is given twice"
    for again in (track, lapwing.load_track(TRACK)):
        for study in (lapwing.compare, lapwing.trade):
            with pytest.raises(lapwing.InputError) as e:
                study(car, [track, again])
            assert str(e.value) == f"tracks: {TRACK} is given twice"
    # Loaded by its absolute path too: one file.
    with pytest.raises(lapwing.InputError, match=r"is given twice$"):
        lapwing.compare(car, [track, lapwing.load_track(str(SOURCE / TRACK))])
    # An empty config is not the first one.
    assert cli_error("run", "--car", CAR, "--track", TRACK, "--config", "") == \
        "--config is given an empty value"
    with pytest.raises(lapwing.InputError, match=r"^config is given an empty value$"):
        lapwing.run(car, track, config="")
    with pytest.raises(lapwing.InputError, match=r"^config is given an empty value$"):
        lapwing.trade(car, [track], config="")
    with pytest.raises(lapwing.InputError, match=r"^configs is given an empty value$"):
        lapwing.compare(car, [track], configs=[""])
    with pytest.raises(lapwing.InputError, match=r"^configs is empty"):
        lapwing.compare(car, [track], configs=[])
    # threads in 0..256, as --threads.
    for threads in (257, 2**32 - 1, 2**70, -1):
        expect = cli_error("compare", "--car", CAR, "--track", TRACK, "--threads",
                           str(threads)).removesuffix(" (see lapwing --help)")
        for study in (lapwing.compare, lapwing.trade):
            with pytest.raises(lapwing.InputError) as e:
                study(car, [track], threads=threads)
            assert str(e.value) == expect.replace("--threads", "threads")


def test_the_documented_ends_of_the_temperature_range_are_taken():
    # README, "In Python": the temperature range is [-50, 70] C; -50 + 273.15 is 223.14999999999998 in
    # binary, below the nearest double to 223.15, and the lower end was once refused.
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    for t in (-50, "-50 C", "-58 F", 70, "158 F"):
        assert math.isfinite(lapwing.run(car, track, air={"temperature": t}).lap_time_s)
    with pytest.raises(lapwing.InputError, match=r"out of range \(\[-50, 70\] C\)"):
        lapwing.run(car, track, air={"temperature": -50.001})


@pytest.mark.parametrize("key,value", [
    ("temperature", -300), ("temperature", "-300"), ("temperature", "400 K"),
    ("pressure", 985), ("pressure", "985"), ("altitude", 7000), ("altitude", "7 km"),
    ("humidity", 60), ("humidity", "60 %x"),
])
def test_air_errors_are_the_command_line_words(key, value):
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    expect = cli_error("run", "--car", CAR, "--track", TRACK, f"--{key}", str(value))
    with pytest.raises(lapwing.InputError) as e:
        lapwing.run(car, track, air={key: value})
    assert str(e.value) == expect.replace(f"--{key}", f"air['{key}']")


@pytest.mark.parametrize("option,value", [
    ("step", 2), ("step", "2"), ("step", "60 %"), ("span", 0), ("span", "95 %"), ("grid", 2),
    ("grid", 42),
])
def test_trade_option_errors_are_the_command_line_words(option, value):
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    expect = cli_error("trade", "--car", CAR, "--track", TRACK, f"--{option}", str(value))
    expect = expect.removesuffix(" (see lapwing --help)")
    with pytest.raises(lapwing.InputError) as e:
        lapwing.trade(car, [track], **{option: value})
    assert str(e.value) == expect.replace(f"--{option}", option)


def test_a_config_given_twice_is_the_command_line_words():
    car, track = lapwing.load_car(CAR), lapwing.load_track(TRACK)
    expect = cli_error("compare", "--car", CAR, "--track", TRACK, "--config", "low", "--config",
                       "low")
    assert expect == "--config low is given twice"
    with pytest.raises(lapwing.InputError) as e:
        lapwing.compare(car, [track], configs=["low", "low"])
    assert str(e.value) == "configs: low is given twice"


def test_two_files_of_one_name_in_two_folders_are_two_tracks(tmp_path, monkeypatch):
    # A track is the file it was loaded from, whatever the working directory is later: the same
    # name loaded in two folders is two tracks (a helper's finding: refused as one given twice).
    car = lapwing.load_car(CAR)
    tracks = []
    for folder in ("a", "b"):
        (tmp_path / folder).mkdir()
        (tmp_path / folder / "loop.yaml").write_text((SOURCE / "tracks/skidpad.yaml").read_text())
        monkeypatch.chdir(tmp_path / folder)
        tracks.append(lapwing.load_track("loop.yaml"))
    result = lapwing.compare(car, tracks)
    assert len(result["tracks"]) == 2


def test_an_empty_path_is_no_file():
    # As --car and --track given an empty value (CLI11's words there): named, not a file that
    # cannot be opened under no name.
    assert "--car" in cli("check", "--car", "", "--track", TRACK, expect=2).stderr
    for load in (lapwing.load_car, lapwing.load_track):
        with pytest.raises(lapwing.InputError, match=r"^path is given an empty value$"):
            load("")
