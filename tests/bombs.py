"""Hostile-file builders used by the tests (made by code, not committed as binaries)."""

from __future__ import annotations

import zipfile
from pathlib import Path

BOMB_DTD = ('<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
            '<!DOCTYPE lolz [<!ENTITY lol "lol">'
            + "".join(f'<!ENTITY lol{i} "{("&lol" + (str(i - 1) if i > 1 else "") + ";") * 10}">' for i in range(1, 10))
            + ']>\n')


def entity_bomb(good: Path, out: Path, member: str = "xl/workbook.xml") -> Path:
    """Copy workbook ``good`` to ``out`` with a billion-laughs entity declaration in ``member``."""
    with zipfile.ZipFile(good) as zin, zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for item in zin.infolist():
            data = zin.read(item.filename)
            if item.filename == member:
                text = data.decode("utf-8")
                body = text.split("?>", 1)[1] if text.startswith("<?xml") else text
                body = body.replace("<sheets>", "<sheets>&lol9;", 1) if "<sheets>" in body else body
                data = (BOMB_DTD + body).encode("utf-8")
            zout.writestr(item, data)
    return out
