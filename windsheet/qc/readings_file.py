"""A readings file from disk: YAML (the measured-values document) or CSV (the readings form)."""

from __future__ import annotations

from windsheet.common.errors import InputError
from windsheet.common.fileio import read_limited
from windsheet.common.yaml_reading import MAX_YAML_BYTES, read_yaml_file

from .measured import MeasuredFile, measured_from_dict
from .readings_form import measured_from_csv
from .transformer_readings import TransformerReadings, is_transformer_readings, transformer_readings


def load_measured(path) -> MeasuredFile | TransformerReadings:
    """Read a measured-values file: YAML (size, depth and alias limits apply), or CSV
    (``.csv``: one row per unit, one column per QC line, see readings_form.py).

    A YAML file whose units are read winding by winding is a transformer's
    (:class:`~windsheet.qc.transformer_readings.TransformerReadings`)."""
    if str(path).lower().endswith(".csv"):
        raw = read_limited(path, MAX_YAML_BYTES)
        if len(raw) > MAX_YAML_BYTES:
            raise InputError(str(path), f"is larger than {MAX_YAML_BYTES} bytes; not a readings file")
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError:
            raise InputError(str(path), "is not UTF-8 text") from None
        return measured_from_csv(text, str(path))
    data = read_yaml_file(path)
    try:
        if is_transformer_readings(data):
            return transformer_readings(data)
        return measured_from_dict(data)
    except InputError:
        raise
    except RecursionError:
        raise InputError(str(path), "nested too deeply") from None
