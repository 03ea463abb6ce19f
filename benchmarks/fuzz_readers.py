"""Fuzz the input readers: mutated data and device files, counted by outcome.

Every mutated file must end in a clean parse or in one of mechid's own errors (a message that
names the file and what to fix); anything else (a traceback) is a defect and is listed.

Usage::

    python benchmarks/fuzz_readers.py [--n 10000] [--seed 0]

Prints, for data files and device files: clean parse / mechid error / anything else.
"""

from __future__ import annotations

import argparse
import tempfile
import traceback
import warnings
from collections import Counter
from pathlib import Path

import numpy as np

from mechid.data import read_series
from mechid.device import read_device_toml
from mechid.errors import MechidError, MechidWarning

#: Characters the mutations insert: separators, signs, digits, letters, and the characters
#: behind earlier reader defects (NUL, full-width digit, byte-order mark, underscore).
ALPHABET = list("0123456789eE.,;:_-+#=[]() \t\nKCVAmnu°\"'") + ["\x00", "\uff13", "\ufeff", "\u0661"]

DATA_BASES = (
    "temperature_K,voltage_V,current_A\n77,0.1,1e-9\n77,0.2,2e-9\n77,0.3,3e-9\n"
    "300,0.1,1e-8\n300,0.2,2e-8\n300,0.3,3e-8\n",
    "# temperature_K = 77\nvoltage_V,current_A\n0.1,1e-9\n0.2,2.1e-9\n0.3,3.3e-9\n",
    "# sweep\nvoltage [mV]\tcurrent [nA]\ttemperature [K]\n100\t1\t77\n200\t2\t77\n300\t3\t77\n",
    "# T = 7.5 K\nV_V;I_A\n0.1;1e-9\n0.2;2e-9\n0.3;3e-9\n",
    "# temperature [C] = -20\nvoltage_mV current_pA\n10 1\n20 2\n30 3\n",
)
DEVICE_BASE = ('name = "pad B2"\nthickness_nm = 6.0\nthickness_sd_nm = 0.3\narea_cm2 = 1e-4\n'
               "effective_mass_ratio = 0.4\noptical_dielectric_constant = 3.0\n")


def mutate(text: str, rng: np.random.Generator) -> str:
    """Apply one to three random insertions, deletions, replacements or duplications."""
    chars = list(text)
    for _ in range(int(rng.integers(1, 4))):
        where = int(rng.integers(0, len(chars) + 1))
        piece = [ALPHABET[k] for k in rng.integers(0, len(ALPHABET), size=int(rng.integers(1, 5)))]
        action = rng.integers(0, 5)
        if action == 0 or not chars:
            chars[where:where] = piece
        elif action == 1:
            del chars[where:where + len(piece)]
        elif action == 2:
            chars[where:where + 1] = piece
        elif action == 3:
            chars[where:where] = chars[max(0, where - 20):where]  # repeat a stretch
        else:  # a very long run of digits (float overflow, Python's 4300-digit limit)
            chars[where:where] = ["9"] * int(rng.choice([30, 320, 5000]))
    return "".join(chars)


def encoded(text: str, rng: np.random.Generator) -> bytes:
    """UTF-8 bytes, or one time in ten Latin-1 bytes (not valid UTF-8 beyond ASCII)."""
    if rng.random() < 0.1:
        return text.encode("latin-1", errors="replace")
    return text.encode("utf-8")


def _outcome(call) -> tuple[str, str | None]:
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", MechidWarning)
            call()
    except MechidError:
        return "mechid error", None
    except Exception:  # noqa: BLE001 - counting exactly these is the point
        return "anything else", traceback.format_exc(limit=3)
    return "clean parse", None


def run(n: int, seed: int) -> dict[str, Counter]:
    rng = np.random.default_rng(seed)
    counts = {"data files": Counter(), "device files": Counter()}
    failures: list[str] = []
    with tempfile.TemporaryDirectory() as folder:
        data_path, device_path = Path(folder) / "s_77K.csv", Path(folder) / "device.toml"
        for k in range(n):
            base = DATA_BASES[k % len(DATA_BASES)]
            data_path.write_bytes(encoded(mutate(base, rng), rng))
            outcome, failure = _outcome(lambda: read_series(data_path))
            counts["data files"][outcome] += 1
            if failure:
                failures.append(repr(data_path.read_bytes()[:300]) + "\n" + failure)
            device_path.write_bytes(encoded(mutate(DEVICE_BASE, rng), rng))
            outcome, failure = _outcome(lambda: read_device_toml(device_path))
            counts["device files"][outcome] += 1
            if failure:
                failures.append(repr(device_path.read_bytes()[:300]) + "\n" + failure)
    for text in failures[:5]:
        print("---- a mutated input that escaped mechid's errors:\n" + text)
    return counts


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=10_000, help="mutated files of each kind")
    parser.add_argument("--seed", type=int, default=0)
    args = parser.parse_args()
    counts = run(args.n, args.seed)
    print(f"{'input':<14}{'clean parse':>13}{'mechid error':>14}{'anything else':>15}")
    for kind, c in counts.items():
        print(f"{kind:<14}{c['clean parse']:>13}{c['mechid error']:>14}{c['anything else']:>15}")


if __name__ == "__main__":
    main()
