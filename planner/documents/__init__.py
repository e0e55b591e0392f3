"""Printed documents (PDF, reportlab): the changeover record, and later the plan and procedure.

- :mod:`planner.documents.pdf_common`: the shared page (A4, margins, header
  and footer with "page N of M" and the printed-at time), title block,
  tables, signature lines and caution box, for every document;
- :mod:`planner.documents.record_pdf`: the changeover record printed from
  the journal.

reportlab is imported inside the functions only, so importing this package
costs nothing; the command line imports the modules when a PDF is asked for.
"""
