from cfa_tool.cli import program

raise SystemExit(program())
