"""A SAS XPORT file as pandas reads it (Debian's python3-pandas, pandas.read_sas with format="xport").

Usage: /usr/bin/python3 xport_read.py FILE
Prints one JSON object: the member's name and label, each variable's name, label, type and length
as pandas parsed its NAMESTR record, and the rows (numbers as floats, missing as null, text with
trailing blanks removed, as pandas returns it).
"""
import json
import math
import sys

import pandas as pd


def text(v):
    return (v.decode("ascii") if isinstance(v, bytes) else v).strip()


path = sys.argv[1]
reader = pd.read_sas(path, format="xport", iterator=True, encoding="ascii")
frame = reader.read()
reader.close()


# pandas 1.5 decodes the IBM zero (eight zero bytes) as 16**-65, not 0.0: its conversion keeps the
# fraction's implicit bias (pandas.io.sas.sas_xport._parse_float_vec(bytes(8)) gives 5.4e-79).
# No value our tables hold lies there, so that one number is read back as the zero it encodes.
IBM_ZERO_AS_PANDAS_READS_IT = 16.0 ** -65


def value(v):
    if isinstance(v, float):
        if math.isnan(v):
            return None
        return 0.0 if v == IBM_ZERO_AS_PANDAS_READS_IT else v
    return v


print(json.dumps({
    "name": text(reader.member_info["set_name"]),
    "label": text(reader.member_info["label"]),
    "variables": [
        {"name": text(f["name"]), "label": text(f["label"]), "type": f["ntype"], "length": f["field_length"]}
        for f in reader.fields
    ],
    "rows": [[value(v) for v in row] for row in frame.itertuples(index=False)],
}))
