from cfa_tool.cli import main

raise SystemExit(main())
