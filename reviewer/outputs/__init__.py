"""Machine outputs of a run over one or many projects, each written as results stream in.

- :mod:`.document`: the ``latchbook.results/1`` JSON shape, verdicts and the JSON Schema;
- :mod:`.json_out`: that document streamed project by project;
- :mod:`.junit`: JUnit XML, one test case per project × stage × check;
- :mod:`.csv_out`: one CSV row per check for spreadsheets.

:mod:`reviewer.cli_run` feeds each project to the outputs a command was asked for.
"""
