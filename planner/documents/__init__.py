"""Printed documents (PDF, reportlab): the voyage plan, the procedure and the record.

- :mod:`planner.documents.pdf_common`: the shared page (A4, margins, header
  and footer with "page N of M" and the printed-at time), title block,
  tables, signature lines and caution box, for every document;
- :mod:`planner.documents.plan_pdf`: the voyage plan for signature, from the
  plan's JSON document (its pieces in ``plan_pdf_cells``, ``plan_pdf_tables``
  and ``plan_pdf_sections``);
- :mod:`planner.documents.procedure_pdf`: the ship's written changeover
  procedure;
- :mod:`planner.documents.record_pdf`: the changeover record printed from
  the journal.

reportlab is imported inside the functions only, so importing this package
costs nothing; the command line imports the modules when a PDF is asked for.
"""
