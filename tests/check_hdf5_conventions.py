#!/usr/bin/env python3
"""Round trip through h5py (an HDF5 client other than gapwise) over every kind of
result file gapwise writes, checking the conventions of the user guide's
"HDF5 conventions" section:

- the root carries `format` (str) and `format_version` (int);
- every string (dataset or attribute) is stored as UTF-8 and reads back as
  str; a problem file with a UTF-8 description comes back intact from
  /provenance/input_texts with .asstr();
- every numeric dataset has a `units` attribute that parses by the whitelist
  grammar of src/io/units_grammar.hpp (a subset of UDUNITS-2 syntax, the
  CF metadata conventions' units); flag codes sit in `flag_values` /
  `flag_meanings` (CF conventions, section 3.5) with one meaning per value;
- NaN appears only in datasets with `nan_meaning`, +inf only with
  `inf_meaning`, and never -inf; the known "infinite / not applicable" datasets
  (tts_ns, repetitions, p_landau_zener, p_adiabatic) never hold the old -1;
- every 2-D dataset has an HDF5 dimension scale attached to each axis, of the
  axis' length;
- an instance set annotated in place by h5py (one attribute added) is still
  accepted by gapwise, a truncated copy and a copy whose data h5py changed are
  refused.

Usage: check_hdf5_conventions.py GAPWISE_EXE REPO_ROOT
Exit status 0 when every check holds; each failure is printed.
"""
import pathlib
import re
import shutil
import subprocess
import sys
import tempfile

import h5py
import numpy as np

# src/io/units_grammar.hpp, the same whitelist.
SYMBOL = r"(?:ns|us|ms|s|GHz|MHz|kHz|Hz|K|mK)"
FACTOR = SYMBOL + r"(?:\^-?[0-9]+)?"
UNITS = re.compile(r"^(?:1|" + FACTOR + r"(?:[./]" + FACTOR + r")*)$")

UTF8_DESCRIPTION = "Dreieck mit Gr\u00fc\u00dfen \u2014 \u4e09\u89d2\u5f62, \u0394 \u2265 0"

failures = []


def fail(where, what):
    failures.append(f"{where}: {what}")
    print("FAIL", failures[-1], flush=True)


# Attributes of the HDF5 dimension-scale specification, written by the HDF5
# library itself (fixed-length ASCII by that specification), not by gapwise.
DIMENSION_SCALE_ATTRS = {"CLASS", "NAME", "REFERENCE_LIST", "DIMENSION_LIST", "DIMENSION_LABELS"}


def check_string_attrs(fname, name, obj):
    for key in obj.attrs:
        if key in DIMENSION_SCALE_ATTRS:
            continue
        tid = obj.attrs.get_id(key).get_type()
        if isinstance(tid, h5py.h5t.TypeStringID):
            if tid.get_cset() != h5py.h5t.CSET_UTF8:
                fail(fname, f"{name}@{key} is a string but not UTF-8")
            if not isinstance(obj.attrs[key], str):
                fail(fname, f"{name}@{key} does not read back as str")


def check_file(path, expected_format):
    fname = path.name
    with h5py.File(path, "r") as f:
        fmt = f.attrs.get("format")
        if fmt != expected_format:
            fail(fname, f"root format is {fmt!r}, expected {expected_format!r}")
        ver = f.attrs.get("format_version")
        if not isinstance(ver, (int, np.integer)) or ver < 1:
            fail(fname, f"root format_version is {ver!r}")
        check_string_attrs(fname, "/", f)
        counts = {"datasets": 0, "matrices": 0}

        def visit(name, obj):
            check_string_attrs(fname, name, obj)
            if not isinstance(obj, h5py.Dataset):
                return
            counts["datasets"] += 1
            if obj.dtype.kind in ("O", "S", "U"):
                tid = obj.id.get_type()
                if tid.get_cset() != h5py.h5t.CSET_UTF8:
                    fail(fname, f"/{name}: string dataset not UTF-8")
                for s in obj.asstr()[()].ravel() if obj.shape else [obj.asstr()[()]]:
                    if not isinstance(s, str):
                        fail(fname, f"/{name}: does not read back as str")
                return
            if "CLASS" in obj.attrs and obj.attrs["CLASS"] == b"DIMENSION_SCALE" and "units" not in obj.attrs:
                fail(fname, f"/{name}: dimension scale without units")
            units = obj.attrs.get("units")
            if units is None:
                fail(fname, f"/{name}: numeric dataset without a units attribute")
            elif not UNITS.match(units):
                fail(fname, f"/{name}: units {units!r} do not parse")
            if "unit" in obj.attrs:
                fail(fname, f"/{name}: the old prose attribute 'unit' is still written")
            if "flag_values" in obj.attrs:
                values = list(obj.attrs["flag_values"])
                meanings = obj.attrs.get("flag_meanings", "").split()
                if len(values) != len(meanings):
                    fail(fname, f"/{name}: {len(values)} flag_values, {len(meanings)} flag_meanings")
                data = obj[()]
                if data.size and not np.isin(data, values).all():
                    fail(fname, f"/{name}: a value outside flag_values {values}")
            data = np.asarray(obj[()], dtype=float)
            if np.isnan(data).any() and "nan_meaning" not in obj.attrs:
                fail(fname, f"/{name}: NaN without nan_meaning")
            if np.isposinf(data).any() and "inf_meaning" not in obj.attrs:
                fail(fname, f"/{name}: +inf without inf_meaning")
            if np.isneginf(data).any():
                fail(fname, f"/{name}: -inf")
            leaf = name.rsplit("/", 1)[-1]
            if leaf in ("tts_ns", "repetitions", "p_landau_zener", "p_adiabatic") and (data == -1).any():
                fail(fname, f"/{name}: holds the old -1 marker")
            if obj.ndim == 2:
                counts["matrices"] += 1
                for axis in range(2):
                    scales = list(obj.dims[axis].values())
                    if not scales:
                        fail(fname, f"/{name}: no dimension scale on axis {axis}")
                    for sc in scales:
                        if sc.shape != (obj.shape[axis],):
                            fail(fname, f"/{name}: scale {sc.name} of shape {sc.shape} on an axis of {obj.shape[axis]}")

        f.visititems(visit)
        if counts["datasets"] == 0:
            fail(fname, "no datasets")
        if "provenance" in f and "input_texts" in f["provenance"]:
            texts = f["/provenance/input_texts"].asstr()[()]
            if len(texts) and "utf8-triangle" in f["/provenance/input_files"].asstr()[0]:
                if UTF8_DESCRIPTION not in texts[0]:
                    fail(fname, "the UTF-8 problem description does not come back from /provenance/input_texts")
        return counts


def run(exe, args, cwd):
    proc = subprocess.run([exe] + args, cwd=cwd, capture_output=True, text=True)
    if proc.returncode != 0:
        fail(" ".join(args[:2]), f"exit {proc.returncode}: {proc.stderr.strip()[-600:]}")
    return proc


def main():
    exe, root = str(pathlib.Path(sys.argv[1]).resolve()), pathlib.Path(sys.argv[2]).resolve()
    tmp = pathlib.Path(tempfile.mkdtemp(prefix="gapwise-h5conv-"))
    try:
        problem = tmp / "utf8-triangle.toml"
        text = (root / "data-samples" / "triangle.toml").read_text(encoding="utf-8")
        text = re.sub(r'^description = .*$', f'description = "{UTF8_DESCRIPTION}"', text, flags=re.M)
        problem.write_text(text, encoding="utf-8")
        lin = str(root / "schedules" / "linear.toml")
        tri = str(problem)
        # One run per result kind: (file, expected format, gapwise arguments).
        jobs = [
            ("anneal.h5", "gapwise-anneal",
             ["anneal", tri, lin, "-d", "5", "--observe-s", "0.3,0.6", "--levels", "3"]),
            ("gap.h5", "gapwise-gap", ["gap", tri, lin]),
            ("durations.h5", "gapwise-durations", ["durations", tri, lin, "-d", "log:0.5:20:5", "--quiet"]),
            ("pause.h5", "gapwise-pause-map",
             ["pause-map", tri, lin, "-d", "5", "--at", "0.3,0.6", "--pause-ns", "0,1,2"]),
            ("pause1.h5", "gapwise-pause-map",
             ["pause-map", tri, lin, "-d", "5", "--at", "0.3,0.6", "--pause-ns", "1"]),
            ("reverse.h5", "gapwise-reverse-map",
             ["reverse-map", tri, str(root / "schedules" / "reverse.toml"), "--turn", "0.5,1", "--dwell-ns", "0,2",
              "--ramp-ns", "2"]),
            ("compare.h5", "gapwise-compare-paths",
             ["compare-paths", tri, lin, "--pause", "0.5:0.2", "-d", "5,10", "--levels", "4"]),
            ("embed.h5", "gapwise-embed-cost",
             ["embed-cost", str(root / "data-samples" / "triangle.toml"),
              str(root / "data-samples" / "triangle-ring-embedding.toml"), lin, "--strengths", "1,2"]),
            ("diagnose.h5", "gapwise-diagnosis",
             ["diagnose", str(root / "data-samples" / "weak-field-ring.toml"), lin, "-d", "10", "--samples", "0"]),
            # A perturbative crossing (Amin & Choi 2009) and levels not tracked everywhere (NaN).
            ("diagnose-pc.h5", "gapwise-diagnosis",
             ["diagnose", str(root / "data-samples" / "hub-and-leaves.toml"), lin, "-d", "20", "--samples", "0"]),
            # With a bath (branch h18-studies): /compare/bath and the thermal channel /thermal.
            ("compare-bath.h5", "gapwise-compare-paths",
             ["compare-paths", tri, lin, "--pause", "0.5:0.2", "-d", "5", "-q", "--bath",
              str(root / "data-samples" / "bath-12mk.toml")]),
            ("diagnose-bath.h5", "gapwise-diagnosis",
             ["diagnose", tri, lin, "-d", "5", "--samples", "0", "-q", "--thermal-points", "11", "--bath",
              str(root / "data-samples" / "bath-12mk.toml")]),
            ("set.h5", "gapwise-instance-set",
             ["generate", "--graph", "ring-chords", "--couplings", "gaussian", "--sizes", "lin:4:6:2", "--count", "2",
              "--seed", "3"]),
        ]
        for out, fmt, args in jobs:
            run(exe, args + ["--out", str(tmp / out)], tmp)
        run(exe, ["ensemble", str(tmp / "set.h5"), lin, "-d", "0.5,2,8", "--out", str(tmp / "ens.h5")], tmp)
        jobs.append(("ens.h5", "gapwise-ensemble-result", None))
        # ensemble --bath (branch h18-ensemble2): /ensemble/bath and the bath_* datasets.
        run(exe, ["ensemble", str(tmp / "set.h5"), lin, "-d", "0.5", "-q", "--bath",
                  str(root / "data-samples" / "bath-12mk.toml"), "--out", str(tmp / "ens-bath.h5")], tmp)
        jobs.append(("ens-bath.h5", "gapwise-ensemble-result", None))
        matrices = 0
        for out, fmt, _ in jobs:
            if (tmp / out).exists():
                matrices += check_file(tmp / out, fmt)["matrices"]
            else:
                fail(out, "not written")
        if matrices < 10:
            fail("all files", f"only {matrices} matrices seen: the dimension-scale checks ran on too little")

        if failures:
            return 1
        # The reverse map's p = 0 cells: TTS +inf, read as such by NumPy.
        with h5py.File(tmp / "reverse.h5", "r") as f:
            tts = f["/reverse_map/tts_ns"][()]
            if not np.isposinf(tts[1]).all():
                fail("reverse.h5", f"turn s = 1 (p = 0) should give TTS +inf, got {tts[1]}")
            if f["/reverse_map/tts_ns"].dims[0][0].name != "/reverse_map/turn_s":
                fail("reverse.h5", "the row scale of tts_ns is not turn_s")
        # Durations on the triangle with a linear schedule: Landau-Zener not applicable -> NaN.
        with h5py.File(tmp / "durations.h5", "r") as f:
            lz = f["/durations/points/p_landau_zener"]
            if not np.isnan(lz[()]).all() or "nan_meaning" not in lz.attrs:
                fail("durations.h5", "p_landau_zener should be NaN with nan_meaning on this problem")

        # An instance set annotated in place by h5py is still a valid input.
        shutil.copy(tmp / "set.h5", tmp / "annotated.h5")
        with h5py.File(tmp / "annotated.h5", "a") as f:
            name = f["/instance_names"].asstr()[0]
            f[f"/instances/{name}"].attrs["reviewed_by"] = "Ren\u00e9e"
        run(exe, ["ensemble", str(tmp / "annotated.h5"), lin, "-d", "0.5,2,8", "--out",
                  str(tmp / "ens-annotated.h5")], tmp)
        with h5py.File(tmp / "ens.h5", "r") as a, h5py.File(tmp / "ens-annotated.h5", "r") as b:
            pa, pb = a["/ensemble/instances/ground_probability"][()], b["/ensemble/instances/ground_probability"][()]
            if not np.array_equal(pa, pb):
                fail("ens-annotated.h5", "an annotated set gave other probabilities")
        # Truncated: refused, with the file named.
        data = (tmp / "annotated.h5").read_bytes()
        (tmp / "truncated.h5").write_bytes(data[: len(data) - 100])
        proc = subprocess.run([exe, "ensemble", str(tmp / "truncated.h5"), lin, "-d", "1", "--out",
                               str(tmp / "x.h5")], cwd=tmp, capture_output=True, text=True)
        if proc.returncode == 0 or "truncated" not in proc.stderr or "truncated.h5" not in proc.stderr:
            fail("truncated.h5", f"not refused as truncated (exit {proc.returncode}): {proc.stderr.strip()}")
        # Data changed by h5py: refused, the dataset named.
        shutil.copy(tmp / "set.h5", tmp / "altered.h5")
        with h5py.File(tmp / "altered.h5", "a") as f:
            name = f["/instance_names"].asstr()[0]
            f[f"/instances/{name}/fields"][0] = 0.75
        proc = subprocess.run([exe, "ensemble", str(tmp / "altered.h5"), lin, "-d", "1", "--out",
                               str(tmp / "y.h5")], cwd=tmp, capture_output=True, text=True)
        if proc.returncode == 0 or "/fields" not in proc.stderr:
            fail("altered.h5", f"a changed dataset was not refused by name (exit {proc.returncode}): {proc.stderr.strip()}")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
        print(f"{len(failures)} failure(s)")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
