"""The parts of the review reports: words and units, figures, schematics, the HTML and Markdown
renderers and the product-line index. :mod:`reviewer.report` gathers the data and is the public
entry point (``render``, ``write_report``, ``write_line_index``)."""
