"""The one reader of the program's CSV files: '# key: value' (or plain '# comment') lines, blank
lines, then a header row and data rows."""

from __future__ import annotations

import csv


def read_commented_csv(text: str) -> tuple[dict[str, str], list[list[str]]]:
    """(metadata, rows): '# key: value' lines as metadata (keys lower case, values stripped; other
    comment lines and blank lines skipped), every other line as one CSV row (cells as written).

    >>> read_commented_csv("# Bath_C: 60\\n# a note\\n\\nsurface_c,htc_w_m2k\\n850, 300\\n")
    ({'bath_c': '60'}, [['surface_c', 'htc_w_m2k'], ['850', ' 300']])
    """
    meta: dict[str, str] = {}
    lines = []
    for line in text.splitlines():
        s = line.strip()
        if not s:
            continue
        if s.startswith("#"):
            body = s.lstrip("#").strip()
            if ":" in body:
                k, v = body.split(":", 1)
                meta[k.strip().lower()] = v.strip()
            continue
        lines.append(s)
    return meta, list(csv.reader(lines))


def commented_csv_dicts(text: str) -> list[dict[str, str]]:
    """The data rows of a commented CSV as dicts keyed by its header row.

    >>> commented_csv_dicts("# source: memory\\nhv,hrc\\n200,\\n")
    [{'hv': '200', 'hrc': ''}]
    """
    _, rows = read_commented_csv(text)
    if not rows:
        return []
    header = rows[0]
    return [dict(zip(header, row)) for row in rows[1:]]
