"""Which wing level at which circuit? The Pellion FR-2's wing levels on the three bundled
circuits, from Python (README, "In Python").

For each circuit it runs every config asked for (default: the three wing levels low, medium,
high), prints the lap times and the best, and plots two rows into one PNG: speed against
distance for every config, and the cumulative time delta of each config to the circuit's best,
t_config(s) - t_best(s) (above zero: behind the best; its slope shows where the time is lost).

  PYTHONPATH=build/python python3 examples/python/wing_choice.py [--out docs/wing_choice.png]
"""
import argparse
import pathlib

import matplotlib

matplotlib.use("Agg")  # files only: no display needed
import matplotlib.pyplot as plt  # noqa: E402

import lapwing  # noqa: E402

ROOT = pathlib.Path(__file__).resolve().parents[2]
CIRCUITS = ["brannock-park", "saltmere-flats", "cairnholt"]
# Okabe and Ito's colour-blind-safe palette (Color Universal Design, 2002).
COLOURS = ["#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00", "#F0E442"]


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--out", default=str(ROOT / "docs" / "wing_choice.png"),
                        help="the PNG to write (default docs/wing_choice.png)")
    parser.add_argument("--configs", nargs="+", default=["low", "medium", "high"],
                        help="the car's configs to run (default: low medium high)")
    args = parser.parse_args()

    car = lapwing.load_car(str(ROOT / "cars" / "pellion-fr2.yaml"))
    fig, axes = plt.subplots(2, len(CIRCUITS), figsize=(16, 8.5), sharex="col",
                             gridspec_kw={"height_ratios": [3, 2]})
    for col, name in enumerate(CIRCUITS):
        track = lapwing.load_track(str(ROOT / "tracks" / f"{name}.yaml"))
        laps = {c: lapwing.run(car, track, config=c) for c in args.configs}
        best = min(laps, key=lambda c: laps[c].lap_time_s)
        print(f"{track.name}: " + ", ".join(
            f"{c} {laps[c].lap_time_s:.3f} s" for c in args.configs) + f"; best {best}")
        speed_ax, delta_ax = axes[0][col], axes[1][col]
        t_best = laps[best].trace["time_s"]
        for k, (config, lap) in enumerate(laps.items()):
            s = lap.trace["distance_m"]
            colour = COLOURS[k % len(COLOURS)]
            speed_ax.plot(s, lap.trace["speed_kph"], color=colour, linewidth=0.9)
            # Every config's lap is on the same mesh of the track: point i is the same place.
            delta_ax.plot(s, lap.trace["time_s"] - t_best, color=colour, linewidth=1.2,
                          label=f"{config}  {lap.lap_time_s:.3f} s")
        for corner in laps[best].corners:
            speed_ax.annotate(str(corner["id"]), (corner["apex_m"], corner["apex_kph"]),
                              textcoords="offset points", xytext=(0, -11), ha="center",
                              fontsize=7, color="#555555")
        speed_ax.set_title(f"{track.name} ({track.length_m / 1000:.2f} km): best {best}")
        speed_ax.grid(alpha=0.3)
        delta_ax.axhline(0.0, color="#888888", linewidth=0.6)
        delta_ax.grid(alpha=0.3)
        delta_ax.legend(loc="best", fontsize=8, title="config, lap", title_fontsize=8)
        delta_ax.set_xlabel("distance (m)")
        if col == 0:
            speed_ax.set_ylabel("speed (km/h)")
            delta_ax.set_ylabel("time behind the best (s)")
    fig.suptitle(f"{car.name}: wing level by circuit (lapwing {lapwing.__version__}, "
                 f"{car.model} model; corner numbers at the best config's apexes)")
    fig.tight_layout()
    out = pathlib.Path(args.out)
    out.parent.mkdir(parents=True, exist_ok=True)
    fig.savefig(out, dpi=90)
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
