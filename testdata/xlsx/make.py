#!/usr/bin/python3
"""Builds the .xlsx test workbooks of pcqc with openpyxl (Debian
python3-openpyxl 3.0.9), run once; the workbooks are committed. Run from the
repository root: /usr/bin/python3 testdata/xlsx/make.py

openpyxl writes formulas without a cached result (it does not calculate), so
formula-cached.xlsx gets its cached value by a raw-XML step (see
add_cached_value): the <v> element Excel would have saved is written into the
sheet's XML and the zip is rewritten entry by entry."""
import csv, datetime, os, zipfile
import openpyxl

HERE = os.path.dirname(os.path.abspath(__file__))
BAD = os.path.join(HERE, "..", "bad")


def book(rows, title="Sheet1"):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = title
    for r in rows:
        ws.append(r)
    return wb, ws


def save(wb, name, where=HERE):
    path = os.path.join(where, name)
    wb.save(path)
    fix_times(path)
    return path


def fix_times(path):
    """Pins the zip entries' times and docProps dates so that re-running
    the script writes the same bytes."""
    with zipfile.ZipFile(path) as z:
        items = [(i.filename, z.read(i.filename)) for i in z.infolist()]
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for name, data in items:
            if name == "docProps/core.xml":
                import re
                data = re.sub(rb"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ", b"2024-01-01T00:00:00Z", data)
            info = zipfile.ZipInfo(name, date_time=(2024, 1, 1, 0, 0, 0))
            info.compress_type = zipfile.ZIP_DEFLATED
            z.writestr(info, data)


BASE = [
    ["id", "a", "b", "c"],
    ["s1", 0.1234567, 10, 3.5],
    ["s2", 0.2345678, 12, 2.5],
    ["s3", 0.3456789, 9, 4.0],
    ["s4", 0.4567891, 15, 1.5],
    ["s5", 0.5678912, 11, 3.0],
]

# layout.xlsx: a title row, a comment row, the header, a units row and a
# comment among the rows, for --skip 1 --comment '#' --units-row.
wb, ws = book([["River survey, spring run"], ["# exported by hand"], BASE[0], ["", "mg/L", "µS/cm", "°C"]]
              + BASE[1:3] + [["# re-measured below"]] + BASE[3:])
save(wb, "layout.xlsx")

# values.xlsx: two sheets; the first shows column a rounded to 2 decimals
# (number format 0.00), which must not round the values read.
wb, ws = book(BASE, "Lab")
for r in range(2, 7):
    ws.cell(r, 2).number_format = "0.00"
ws2 = wb.create_sheet("Field data")
for r in [["id", "x", "y", "z"], ["f1", 1, 2, 4], ["f2", 2, 1, 3], ["f3", 3, 5, 1], ["f4", 4, 3, 2]]:
    ws2.append(r)
save(wb, "values.xlsx")

# formula-cached.xlsx: C3 holds =B3*2 with its cached result 24.
wb, ws = book(BASE)
ws["C3"] = "=B3*2"
path = save(wb, "formula-cached.xlsx")


def add_cached_value(path, cell, value):
    with zipfile.ZipFile(path) as z:
        items = [(i.filename, z.read(i.filename)) for i in z.infolist()]
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for name, data in items:
            if name == "xl/worksheets/sheet1.xml":
                import re
                pat = re.compile(rb'(<c r="' + cell.encode() + rb'"[^>]*>)(<f>[^<]*</f>)(<v\s*/>|<v></v>)?(</c>)')
                data, n = pat.subn(lambda m: m.group(1) + m.group(2) + b"<v>" + value.encode() + b"</v>" + m.group(4), data)
                assert n == 1, data
            info = zipfile.ZipInfo(name, date_time=(2024, 1, 1, 0, 0, 0))
            info.compress_type = zipfile.ZIP_DEFLATED
            z.writestr(info, data)


add_cached_value(path, "C3", "24")

# xlsx-formula-nocache.xlsx: the same formula as openpyxl writes it, without a
# result (bad: the cell is named).
wb, ws = book(BASE)
ws["C3"] = "=B3*2"
save(wb, "xlsx-formula-nocache.xlsx", BAD)

# dates.xlsx: the id column holds dates (one with a time of day).
rows = [["sampled", "a", "b"]]
for i, (d, a, b) in enumerate([(datetime.date(2024, 3, 5), 1.5, 2), (datetime.date(2024, 3, 6), 2.5, 1),
                                (datetime.datetime(2024, 3, 7, 14, 30), 3.0, 4), (datetime.date(2024, 3, 8), 1.0, 3)]):
    rows.append([d, a, b])
wb, ws = book(rows)
save(wb, "dates.xlsx")

# date-variable.xlsx: a date in a variable column (bad).
rows = [["id", "a", "b"], ["s1", 1, 2], ["s2", 2, datetime.date(2024, 3, 6)], ["s3", 3, 1], ["s4", 4, 3]]
wb, ws = book(rows)
save(wb, "xlsx-date-variable.xlsx", BAD)

# xlsx-error-cell.xlsx: #DIV/0! in B4 (bad); #N/A elsewhere is a missing cell.
rows = [r[:] for r in BASE]
rows[3][1] = "#DIV/0!"
wb, ws = book(rows)
save(wb, "xlsx-error-cell.xlsx", BAD)

# na.xlsx: #N/A in C4 reads as missing (with --missing mean it is filled).
rows = [r[:] for r in BASE]
rows[3][2] = "#N/A"
wb, ws = book(rows)
save(wb, "na.xlsx")

# xlsx-merged-header.xlsx: B1:C1 merged (bad).
wb, ws = book(BASE)
ws.merge_cells("B1:C1")
save(wb, "xlsx-merged-header.xlsx", BAD)

# xlsx-logical-cell.xlsx: a logical cell (TRUE) in a numeric column, C5
# (bad: not read as 1).
rows = [r[:] for r in BASE]
rows[4][2] = True
wb, ws = book(rows)
save(wb, "xlsx-logical-cell.xlsx", BAD)

# xlsx-text-cell.xlsx: text in a numeric column, D5 (bad).
rows = [r[:] for r in BASE]
rows[4][3] = "n.d."
wb, ws = book(rows)
save(wb, "xlsx-text-cell.xlsx", BAD)

# wine.xlsx: testdata/datasets/wine.csv cell for cell, numbers as numbers.
wb = openpyxl.Workbook()
ws = wb.active
ws.title = "wine"
with open(os.path.join(HERE, "..", "datasets", "wine.csv"), newline="") as f:
    for i, r in enumerate(csv.reader(f)):
        if i == 0:
            ws.append(r)
            continue
        out = []
        for c in r:
            try:
                v = float(c)
                out.append(int(v) if v.is_integer() and "." not in c and "e" not in c.lower() else v)
            except ValueError:
                out.append(c)
        ws.append(out)
save(wb, "wine.xlsx")

# Formats pcqc refuses, each written by the library that makes them (bad):
# a legacy .xls (Debian python3-xlwt 1.3.0), an .ods (python3-odf 1.4.1),
# the container of a password-protected .xlsx (written by hand, see
# cfb_encrypted_container), and a zip archive that holds no workbook.
import io
import xlwt
wb = xlwt.Workbook()
ws = wb.add_sheet("Sheet1")
for i, r in enumerate(BASE):
    for j, v in enumerate(r):
        ws.write(i, j, v)
wb.save(os.path.join(BAD, "xlsx-legacy-xls.xls"))

from odf.opendocument import OpenDocumentSpreadsheet
from odf.table import Table, TableRow, TableCell
from odf.text import P
doc = OpenDocumentSpreadsheet()
t = Table(name="Sheet1")
for r in BASE:
    tr = TableRow()
    for v in r:
        if isinstance(v, str):
            c = TableCell(valuetype="string")
        else:
            c = TableCell(valuetype="float", value=v)
        c.addElement(P(text=str(v)))
        tr.addElement(c)
    t.addElement(tr)
doc.spreadsheet.addElement(t)
doc.save(os.path.join(BAD, "xlsx-opendocument.ods"))

import struct


def cfb_encrypted_container():
    """A minimal compound file (MS-CFB, version 3, 512-byte sectors) holding
    the two streams a password-protected OOXML workbook is stored as
    (MS-OFFCRYPTO 2.3.4: EncryptionInfo and EncryptedPackage), both empty.
    Debian's msoffcrypto-tool 5.0.0 decrypts but cannot encrypt, so the
    container is written by hand; pcqc must recognise it by its structure
    and refuse it before anything is decrypted."""
    FREE, END, FATSECT = 0xFFFFFFFF, 0xFFFFFFFE, 0xFFFFFFFD
    header = b"\xD0\xCF\x11\xE0\xA1\xB1\x1A\xE1" + bytes(16)
    header += struct.pack("<HHHHH", 0x003E, 3, 0xFFFE, 9, 6) + bytes(6)
    header += struct.pack("<IIIIIIIII", 0, 1, 1, 0, 4096, END, 0, END, 0)
    header += struct.pack("<I", 0) + struct.pack("<I", FREE) * 108  # DIFAT: FAT in sector 0
    fat = struct.pack("<II", FATSECT, END) + struct.pack("<I", FREE) * 126

    def entry(name, kind, left, right, child):
        n = (name + "\0").encode("utf-16-le")
        return (n + bytes(64 - len(n)) + struct.pack("<HBB", len(n), kind, 1)
                + struct.pack("<III", left, right, child) + bytes(16 + 4 + 16)
                + struct.pack("<IQ", END, 0))
    nostream = 0xFFFFFFFF
    directory = (entry("Root Entry", 5, nostream, nostream, 1)
                 + entry("EncryptionInfo", 2, nostream, 2, nostream)
                 + entry("EncryptedPackage", 2, nostream, nostream, nostream)
                 + bytes(128))
    return header + fat + directory


with open(os.path.join(BAD, "xlsx-encrypted.xlsx"), "wb") as out:
    out.write(cfb_encrypted_container())

with zipfile.ZipFile(os.path.join(BAD, "xlsx-not-a-workbook.xlsx"), "w") as z:
    info = zipfile.ZipInfo("notes.txt", date_time=(2024, 1, 1, 0, 0, 0))
    z.writestr(info, "a zip archive with a text file, not a workbook\n")

# xlsx-empty-first-sheet.xlsx: the table is on the second sheet; the first,
# read by default, is empty (bad: the message lists the sheets).
wb = openpyxl.Workbook()
wb.active.title = "Notes"
ws = wb.create_sheet("Data")
for r in BASE:
    ws.append(r)
save(wb, "xlsx-empty-first-sheet.xlsx", BAD)
