"""Reading a PDF back as a person reads it: poppler's ``pdftotext`` (installed for the
tests, see DEVELOPERS.md)."""

from __future__ import annotations

import re
import subprocess
from pathlib import Path


def pdf_words(pdf: Path) -> list[tuple[str, float, float]]:
    """(text, x centre, y centre) of every word pdftotext finds, in points."""
    xml = subprocess.run(["pdftotext", "-bbox", str(pdf), "-"], capture_output=True,
                         text=True, check=True, timeout=60).stdout
    out = []
    for m in re.finditer(r'xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">'
                         r"([^<]*)</word>", xml):
        x0, y0, x1, y1 = (float(m.group(k)) for k in range(1, 5))
        out.append((m.group(5).replace("&#39;", "'"), (x0 + x1) / 2, (y0 + y1) / 2))
    return out


def pdf_flat(pdf: Path) -> str:
    """The text in reading order (``pdftotext -raw``), every run of white space one space."""
    raw = subprocess.run(["pdftotext", "-raw", str(pdf), "-"], capture_output=True, text=True,
                         check=True, timeout=60).stdout
    return " ".join(raw.split())


def pdf_pages(pdf: Path) -> list[str]:
    """Each page's text (``pdftotext -raw``), white space made single spaces."""
    raw = subprocess.run(["pdftotext", "-raw", str(pdf), "-"], capture_output=True, text=True,
                         check=True, timeout=60).stdout
    return [" ".join(p.split()) for p in raw.rstrip("\f").split("\f")]
