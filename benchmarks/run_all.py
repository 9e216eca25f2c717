"""Run every benchmark script in this folder (``bench_*.py``), passing the same flags.

``python benchmarks/run_all.py --quick`` is what CI runs: each script finishes in
seconds, so the benchmarks never rot. Without ``--quick`` each script measures
its full case counts (minutes); read the tables it prints.
"""

import pathlib
import subprocess
import sys
import time


def main(argv):
    here = pathlib.Path(__file__).resolve().parent
    scripts = sorted(here.glob("bench_*.py"))
    failed = []
    for script in scripts:
        print(f"\n===== {script.name} {' '.join(argv)}", flush=True)
        start = time.perf_counter()
        result = subprocess.run([sys.executable, str(script), *argv])
        print(f"===== {script.name}: exit {result.returncode}, "
              f"{time.perf_counter() - start:.1f} s", flush=True)
        if result.returncode:
            failed.append(script.name)
    if failed:
        print("benchmarks that failed: " + ", ".join(failed))
        return 1
    print(f"\n{len(scripts)} benchmark scripts ran")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
