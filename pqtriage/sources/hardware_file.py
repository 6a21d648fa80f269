"""Read the hardware file: the shipped default, or a user's YAML file over it (--hardware)."""

from __future__ import annotations

import math
from importlib import resources
from pathlib import Path

from pqtriage.errors import Place, ProfileError
from pqtriage.threat.hardware import NUMBERS, Hardware, HardwareValue
from pqtriage.yamlio import Node, decode_text, load_yaml

SHIPPED = "hardware.yaml"
_RANGES: dict[str, tuple[float, float]] = {
    "physical_error_rate": (1e-9, 0.5),
    "cycle_us": (1e-6, 1e9),
    "reaction_us": (1e-6, 1e9),
    "qubit_doubling_years": (0.1, 50.0),
    "good_physical_qubits_today": (1.0, 1e12),
    "runtime_limit_hours": (1e-3, 1e7),
}
_KEYS = set(NUMBERS) | {"reference_task", "monte_carlo"}
_FLAGS = ("V", "V2", "M", "A")


def _fail(path: str, node: Node, message: str, hint: str | None = None) -> ProfileError:
    return ProfileError(message, place=Place(path, node.key_line or node.line,
                                             node.key_column or node.column), hint=hint)


def _number(path: str, node: Node, label: str, low: float, high: float) -> float:
    value = node.value
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise _fail(path, node, f"'{label}' must be a number", "write digits without quotes")
    if not low <= value <= high:
        raise _fail(path, node, f"'{label}' is {value:g}, outside {low:g}..{high:g}")
    return float(value)


def _text(node: Node | None, default: str) -> str:
    if node is None or not isinstance(node.value, str):
        return default
    return " ".join(node.value.split())


def _parse(data: bytes, path: str) -> dict[str, Node]:
    root = load_yaml(decode_text(data, path, ProfileError), path, ProfileError)
    if root is None:
        return {}
    if not isinstance(root.value, dict):
        raise ProfileError("a hardware file must be a mapping", place=Place(path, 1, 1),
                           hint="for example 'qubit_doubling_years: 1.5'")
    raw: dict[str, Node] = root.value
    for key, node in raw.items():
        if key not in _KEYS:
            import difflib

            close = difflib.get_close_matches(key, sorted(_KEYS), n=1)
            raise _fail(path, node, f"unknown field '{key}' in the hardware file",
                        f"did you mean '{close[0]}'?" if close else f"known: {', '.join(sorted(_KEYS))}")
    return raw


def _value(path: str, name: str, node: Node, default: HardwareValue | None) -> HardwareValue:
    low_limit, high_limit = _RANGES[name]
    low: float | None
    high: float | None
    if not isinstance(node.value, dict):
        value = _number(path, node, name, low_limit, high_limit)
        if default is not None and default.low is not None and default.high is not None:
            low, high = min(default.low, value), max(default.high, value)
        else:
            low = high = None
        return HardwareValue(name, value, low, high, "A", f"user value ({path})")
    fields: dict[str, Node] = node.value
    unknown = set(fields) - {"value", "low", "high", "flag", "source"}
    if unknown or "value" not in fields:
        raise _fail(path, node, f"'{name}' needs 'value' (and may have low, high, flag, source)")
    value = _number(path, fields["value"], f"{name}.value", low_limit, high_limit)
    low = high = None
    if "low" in fields or "high" in fields:
        if name != "qubit_doubling_years" or not ("low" in fields and "high" in fields):
            raise _fail(path, node, "only qubit_doubling_years has a range, given as both 'low' and 'high'")
        low = _number(path, fields["low"], f"{name}.low", low_limit, high_limit)
        high = _number(path, fields["high"], f"{name}.high", low_limit, high_limit)
        if not low <= value <= high:
            raise _fail(path, node, f"'{name}' needs low <= value <= high")
    elif default is not None and default.low is not None and default.high is not None:
        low, high = min(default.low, value), max(default.high, value)
    flag = str(fields["flag"].value) if "flag" in fields else "A"
    if flag not in _FLAGS:
        raise _fail(path, fields["flag"], f"'flag' must be one of {', '.join(_FLAGS)}")
    source = _text(fields.get("source"), f"user value ({path})")
    return HardwareValue(name, value, low, high, flag, source)


def parse_hardware(data: bytes, path: str, defaults: Hardware | None = None) -> Hardware:
    """Validate a hardware document; keys it leaves out keep the ``defaults``' values."""
    raw = _parse(data, path)
    values = []
    for name in NUMBERS:
        default = defaults.value(name) if defaults is not None else None
        if name in raw:
            values.append(_value(path, name, raw[name], default))
        elif default is not None:
            values.append(default)
        else:
            raise ProfileError(f"the hardware file lacks '{name}'", place=Place(path, 1, 1))
    if values[0].value >= 1e-2:
        node = raw.get("physical_error_rate")
        place = Place(path, node.line, node.column) if node else Place(path, 1, 1)
        raise ProfileError(f"physical_error_rate {values[0].value:g} is not below the surface-code "
                           "threshold 0.01: no code distance suppresses errors", place=place,
                           hint="give a physical error rate below the threshold, for example 1e-3")
    algorithm, hours, reference_source = (
        (defaults.reference_algorithm, defaults.reference_hours, defaults.reference_source)
        if defaults is not None else ("RSA-2048", 24.0, "")
    )
    if "reference_task" in raw:
        node = raw["reference_task"]
        fields = node.value if isinstance(node.value, dict) else None
        if fields is None or "within_hours" not in fields:
            raise _fail(path, node, "'reference_task' needs 'within_hours' (and may name the algorithm)")
        algorithm = _text(fields.get("algorithm"), algorithm)
        if algorithm != "RSA-2048":
            raise _fail(path, node, "the reference task must be RSA-2048: the survey profiles are about it")
        hours = _number(path, fields["within_hours"], "reference_task.within_hours", 1e-3, 1e7)
        reference_source = _text(fields.get("source"), reference_source)
    samples, seed = (defaults.samples, defaults.seed) if defaults is not None else (256, 20261202)
    if "monte_carlo" in raw:
        node = raw["monte_carlo"]
        fields = node.value if isinstance(node.value, dict) else {}
        if "samples" in fields:
            samples = int(_number(path, fields["samples"], "monte_carlo.samples", 8, 65536))
            if samples % 8:
                raise _fail(path, fields["samples"], "'monte_carlo.samples' must be a multiple of 8",
                            "one equal share per stratum of the band")
        if "seed" in fields:
            seed = int(_number(path, fields["seed"], "monte_carlo.seed", 0, 2**63 - 1))
    origin = "shipped default" if defaults is None else f"{path} over the shipped default"
    return Hardware(origin, tuple(values), algorithm, hours, reference_source, samples, seed)


def shipped_hardware() -> Hardware:
    """The shipped hardware file."""
    data = (resources.files("pqtriage") / "data" / SHIPPED).read_bytes()
    return parse_hardware(data, f"<shipped {SHIPPED}>")


def load_hardware(path: str | None) -> Hardware:
    """The shipped hardware file, or a user file over it (--hardware FILE)."""
    shipped = shipped_hardware()
    if path is None:
        return shipped
    file = Path(path)
    try:
        data = file.read_bytes()
    except FileNotFoundError as exc:
        raise ProfileError("no such hardware file", place=Place(path),
                           hint="give a YAML file like pqtriage/data/hardware.yaml") from exc
    except OSError as exc:
        raise ProfileError(f"cannot read: {exc.strerror}", place=Place(path)) from exc
    return parse_hardware(data, path, shipped)
