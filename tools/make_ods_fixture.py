"""Writes tests/fixtures/check_sheet.ods: the rows of examples/check_sheet.csv as an
OpenDocument spreadsheet (numbers as number cells), in a sheet named "checks" after a first
sheet "notes", so that the tests read a real workbook and choose a sheet by name.

    python3 tools/make_ods_fixture.py

Standard library only (Python 3.9 or later); the file is committed, so CI does not run this.
"""

import csv
import pathlib
import zipfile
from xml.sax.saxutils import escape

ROOT = pathlib.Path(__file__).resolve().parents[1]
NS = (
    'xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" '
    'xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" '
    'xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0"'
)


def cell(text):
    if text == "":
        return "<table:table-cell/>"
    try:
        value = float(text)
        return (
            f'<table:table-cell office:value-type="float" office:value="{escape(text)}">'
            f"<text:p>{escape(text)}</text:p></table:table-cell>"
        )
    except ValueError:
        return f'<table:table-cell office:value-type="string"><text:p>{escape(text)}</text:p></table:table-cell>'


def table(name, rows):
    body = "".join("<table:table-row>" + "".join(cell(c) for c in r) + "</table:table-row>" for r in rows)
    return f'<table:table table:name="{escape(name)}">{body}</table:table>'


def main():
    lines = (ROOT / "examples" / "check_sheet.csv").read_text().splitlines()
    rows = list(csv.reader(l for l in lines if l.strip() and not l.startswith("#")))
    notes = [["INVENTED check cases: the rows of examples/check_sheet.csv, whose header names their sources."]]
    content = (
        '<?xml version="1.0" encoding="UTF-8"?>'
        f'<office:document-content {NS} office:version="1.2"><office:body><office:spreadsheet>'
        + table("notes", notes)
        + table("checks", rows)
        + "</office:spreadsheet></office:body></office:document-content>"
    )
    manifest = (
        '<?xml version="1.0" encoding="UTF-8"?>'
        '<manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0" manifest:version="1.2">'
        '<manifest:file-entry manifest:full-path="/" manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/>'
        '<manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/>'
        "</manifest:manifest>"
    )
    out = ROOT / "tests" / "fixtures" / "check_sheet.ods"
    with zipfile.ZipFile(out, "w") as z:
        z.writestr(zipfile.ZipInfo("mimetype"), "application/vnd.oasis.opendocument.spreadsheet", zipfile.ZIP_STORED)
        z.writestr("META-INF/manifest.xml", manifest, zipfile.ZIP_DEFLATED)
        z.writestr("content.xml", content, zipfile.ZIP_DEFLATED)
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
